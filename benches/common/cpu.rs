//! The processor time a benchmark's process has used: steadier than the wall clock on a
//! shared machine, whose other guests take turns on the same cores.

/// Processor time this process has used so far on all its threads, user and system,
/// seconds (Linux `/proc/self/stat`, in ticks of USER_HZ, 1/100 s on Linux); `None` elsewhere.
pub fn cpu_seconds() -> Option<f64> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    // The fields after the command name, which is in brackets and may hold spaces.
    let fields: Vec<&str> = stat.rsplit_once(')')?.1.split_whitespace().collect();
    let ticks = |k: usize| fields.get(k)?.parse::<f64>().ok();
    // utime and stime are the 14th and 15th fields of the line, the 12th and 13th
    // after the name (proc(5)).
    Some((ticks(11)? + ticks(12)?) / 100.0)
}
