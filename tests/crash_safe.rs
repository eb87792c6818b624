//! No kill and no full disk corrupts a saved file. Every file the tool writes (scenario
//! saves, the recovery file, exports, `--out` files) goes through `atomic::write_atomic`:
//! here the real binary writes an `--out` file and is killed (SIGKILL) at random moments,
//! hundreds of times, alternating two different outputs; after each kill the file is
//! absent (before the first success), or exactly one of the two outputs, never a mix.
//! A write that fails for lack of room (a file-size limit makes the write fail, as a
//! full disk does) reports the error and leaves the previous file as it was.

#![cfg(unix)]

use shelfwind::synthetic::Lcg;
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

fn shelfwind() -> Command {
    Command::new(env!("CARGO_BIN_EXE_shelfwind"))
}

fn fixture(path: &str) -> std::path::PathBuf {
    std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(path)
}

/// The index of a small coast and forecast as CSV or JSON, written to `out`.
fn index(json: bool, out: &Path) -> Command {
    let mut c = shelfwind();
    c.arg("index")
        .arg("--coast")
        .arg(fixture("tests/fixtures/coast/three_segments.geojson"))
        .arg("--wind")
        .arg(fixture("tests/fixtures/grib2/simple_hours.grib2"))
        .args(["--format", if json { "json" } else { "csv" }, "--out"])
        .arg(out)
        .stdout(Stdio::null())
        .stderr(Stdio::null());
    c
}

/// The demo's seven files (scenario, forecasts, records), written into `dir`.
fn demo(dir: &Path) -> Command {
    let mut c = shelfwind();
    c.args(["demo", "--out"])
        .arg(dir)
        .stdout(Stdio::null())
        .stderr(Stdio::null());
    c
}

/// Runs `command`, killing it after a random share of `longest`; true when it was
/// killed before it ended.
fn run_or_kill(mut command: Command, rng: &mut Lcg, longest: Duration) -> bool {
    let mut child = command.spawn().expect("spawns");
    std::thread::sleep(longest.mul_f64(rng.next_unit()));
    let killed = child.try_wait().expect("status").is_none();
    if killed {
        child.kill().expect("SIGKILL");
    }
    child.wait().expect("reaped");
    killed
}

fn timed(mut command: Command) -> Duration {
    let start = Instant::now();
    assert!(command.status().expect("runs").success());
    start.elapsed()
}

/// The kill tests time their kills by how long a run takes: they run one at a time.
static ONE_AT_A_TIME: std::sync::Mutex<()> = std::sync::Mutex::new(());

/// Waits for the other kill test to end; held until the returned guard drops.
fn one_at_a_time() -> std::sync::MutexGuard<'static, ()> {
    ONE_AT_A_TIME
        .lock()
        .unwrap_or_else(std::sync::PoisonError::into_inner)
}

#[test]
fn a_kill_at_any_moment_leaves_the_old_file_or_the_new_one() {
    let _one = one_at_a_time();
    let dir = tempfile::tempdir().expect("temp dir");
    // The outputs, whole, and how long each run takes.
    let whole = dir.path().join("whole");
    let t_demo = timed(demo(&whole));
    let t_csv = timed(index(false, &whole.join("index.csv")));
    let t_json = timed(index(true, &whole.join("index.json")));
    let csv = std::fs::read(whole.join("index.csv")).expect("csv");
    let json = std::fs::read(whole.join("index.json")).expect("json");
    assert_ne!(csv, json);
    let demo_files: Vec<(std::ffi::OsString, Vec<u8>)> = std::fs::read_dir(&whole)
        .expect("list")
        .filter_map(Result::ok)
        .filter(|e| !e.file_name().to_string_lossy().starts_with("index."))
        .map(|e| (e.file_name(), std::fs::read(e.path()).expect("read")))
        .collect();
    assert_eq!(demo_files.len(), 7);

    let (out, target) = (dir.path().join("index.out"), dir.path().join("demo"));
    let mut rng = Lcg(42);
    let mut killed = 0;
    for k in 0..300 {
        let was_killed = if k % 3 == 0 {
            run_or_kill(demo(&target), &mut rng, t_demo.mul_f64(1.3))
        } else {
            run_or_kill(
                index(k % 3 == 2, &out),
                &mut rng,
                t_csv.max(t_json).mul_f64(1.3),
            )
        };
        killed += usize::from(was_killed);
        if let Ok(bytes) = std::fs::read(&out) {
            assert!(
                bytes == csv || bytes == json,
                "after run {k}, the index is neither output whole ({} bytes)",
                bytes.len()
            );
        }
        for (name, bytes) in &demo_files {
            if let Ok(got) = std::fs::read(target.join(name)) {
                assert!(got == *bytes, "after run {k}, {name:?} is not whole");
            }
        }
    }
    assert!(killed > 60 && killed < 290, "{killed} of 300 killed");
}

/// A write that runs out of room (`ulimit -f`, with SIGXFSZ ignored, makes the write
/// fail with "file too large", as a full disk fails it) says so and keeps the old file.
#[test]
fn a_write_that_runs_out_of_room_keeps_the_old_file() {
    let dir = tempfile::tempdir().expect("temp dir");
    let status = shelfwind()
        .args(["demo", "--out"])
        .arg(dir.path())
        .stdout(Stdio::null())
        .status()
        .expect("demo");
    assert!(status.success());
    let scenario = dir.path().join("north-reach.shelfwind.json");
    let out = dir.path().join("index.csv");
    std::fs::write(&out, "the previous export, whole\n").expect("old file");
    // 20 blocks of 512 bytes: far less than the index needs.
    let o = Command::new("sh")
        .arg("-c")
        .arg(r#"trap '' XFSZ; ulimit -f 20; exec "$0" "$@""#)
        .arg(env!("CARGO_BIN_EXE_shelfwind"))
        .arg("index")
        .arg("--coast")
        .arg(&scenario)
        .arg("--out")
        .arg(&out)
        .output()
        .expect("runs");
    assert_eq!(o.status.code(), Some(2), "{o:?}");
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("index.csv"), "{err}");
    assert_eq!(
        std::fs::read_to_string(&out).expect("still there"),
        "the previous export, whole\n"
    );
    let strays = std::fs::read_dir(dir.path())
        .expect("list")
        .filter_map(Result::ok)
        .filter(|e| e.file_name().to_string_lossy().starts_with(".shelfwind-"))
        .count();
    assert_eq!(strays, 0, "the failed write cleans up after itself");
}

/// The directory a child copy of this test binary saves into (see below).
const SAVE_LOOP_DIR: &str = "SHELFWIND_TEST_SAVE_LOOP_DIR";

/// Two different scenarios as the app saves them.
fn two_scenarios() -> [shelfwind::scenario::Scenario; 2] {
    let a = shelfwind::scenario::demo_scenario().expect("demo");
    let mut b = a.clone();
    b.name = "A renamed co-op plan".into();
    b.segments.truncate(b.segments.len() / 2);
    [a, b]
}

/// Not a test of its own: run by `a_kill_while_the_app_saves_leaves_whole_files` as a
/// child process (this binary again, with `SAVE_LOOP_DIR` set), it saves the two
/// scenarios in turn through the app's save (`save_scenario`, keeping a backup) and its
/// recovery writer until it is killed. Without the variable it returns at once.
#[test]
fn saves_scenarios_until_killed() {
    let Some(dir) = std::env::var_os(SAVE_LOOP_DIR) else {
        return;
    };
    let dir = Path::new(&dir);
    let scenarios = two_scenarios();
    let start = Instant::now();
    for k in 0usize.. {
        let s = &scenarios[k % 2];
        shelfwind::scenario::save_scenario(&dir.join("plan.shelfwind.json"), s).expect("save");
        shelfwind::app::write_recovery(&dir.join("recovery.shelfwind.json"), s).expect("recovery");
        // A guard should the parent fail to kill it.
        if start.elapsed() > Duration::from_secs(20) {
            break;
        }
    }
}

/// The app's scenario save (with its backup) and its recovery file, killed (SIGKILL) at
/// random moments 200 times while saving two different scenarios in turn: the saved
/// file, its backup and the recovery file are each absent or one of the two scenarios
/// whole, never a mix, and each reads back as a scenario.
#[test]
fn a_kill_while_the_app_saves_leaves_whole_files() {
    let _one = one_at_a_time();
    let dir = tempfile::tempdir().expect("temp dir");
    let whole: Vec<String> = two_scenarios()
        .iter()
        .map(|s| shelfwind::scenario::scenario_to_json(s).expect("json"))
        .collect();
    let mut rng = Lcg(7);
    let mut saves_seen = 0;
    for k in 0..200 {
        let mut child = Command::new(std::env::current_exe().expect("this test binary"));
        child
            .args([
                "saves_scenarios_until_killed",
                "--exact",
                "--test-threads=1",
            ])
            .env(SAVE_LOOP_DIR, dir.path())
            .stdout(Stdio::null())
            .stderr(Stdio::null());
        // Long enough to start and save a few times, at a different moment each time.
        let killed = run_or_kill(child, &mut rng, Duration::from_millis(60));
        assert!(killed, "run {k} ended by itself");
        for name in [
            "plan.shelfwind.json",
            "plan.shelfwind.json.bak",
            "recovery.shelfwind.json",
        ] {
            if let Ok(text) = std::fs::read_to_string(dir.path().join(name)) {
                assert!(
                    whole.contains(&text),
                    "after kill {k}, {name} is neither scenario whole ({} bytes)",
                    text.len()
                );
                shelfwind::scenario::parse_scenario(&text).expect("reads back");
                saves_seen += 1;
            }
        }
    }
    assert!(
        saves_seen > 300,
        "only {saves_seen} files seen in 200 kills"
    );
}
