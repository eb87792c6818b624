//! The benchmarks' one way to read how much memory their process has used.

/// This process's peak resident memory so far, kB (Linux `VmHWM`); `None` elsewhere.
pub fn peak_memory_kb() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    line.split_whitespace().nth(1)?.parse().ok()
}
