//! Timing whole runs of a program, with the peak memory the program reports of itself, and the
//! line that says on what machine the tables were measured.

use std::process::Command;
use std::time::Instant;

use crate::paths::root;

/// Timed runs per measurement in the speed table; the fastest is kept.
pub const RUNS: usize = 5;

pub struct Measured {
    pub seconds: f64,
    pub peak_mib: f64,
}

/// Runs a command that reports `peak memory N MiB` on standard error (`throughline track --stats`
/// and the Python peer both read their own `VmHWM`), returning wall time and that peak. A child's
/// own report is used because `wait4`'s figure includes the memory of the parent at fork time.
pub fn measure(program: &str, args: &[&str]) -> Result<Measured, String> {
    let start = Instant::now();
    let out = Command::new(program)
        .args(args)
        .current_dir(root())
        .stdout(std::process::Stdio::null())
        .output()
        .map_err(|e| format!("cannot start {program}: {e}"))?;
    let seconds = start.elapsed().as_secs_f64();
    let stderr = String::from_utf8_lossy(&out.stderr);
    if !out.status.success() {
        return Err(format!("{program} {} failed: {stderr}", args.join(" ")));
    }
    let peak_mib = stderr
        .split("peak memory ")
        .nth(1)
        .and_then(|rest| rest.split_whitespace().next())
        .and_then(|v| v.parse().ok())
        .unwrap_or(f64::NAN);
    Ok(Measured { seconds, peak_mib })
}

/// The fastest of `runs` runs (the usual way to take timings on a machine that does other things).
pub fn best_of(runs: usize, program: &str, args: &[&str]) -> Result<Measured, String> {
    let mut best: Option<Measured> = None;
    for _ in 0..runs {
        let m = measure(program, args)?;
        if best.as_ref().is_none_or(|b| m.seconds < b.seconds) {
            best = Some(m);
        }
    }
    best.ok_or_else(|| "no run".to_string())
}

/// "CPU model, N cores, date" for the tables' first line.
pub fn machine_line() -> String {
    let cpu = std::fs::read_to_string("/proc/cpuinfo")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("model name"))
                .and_then(|l| l.split(':').nth(1))
                .map(|s| s.trim().to_string())
        })
        .unwrap_or_else(|| "an unknown CPU".into());
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let date = Command::new("date")
        .arg("+%Y-%m-%d")
        .output()
        .ok()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim().to_string())
        .unwrap_or_default();
    format!("{cpu}, {cores} cores, {date}")
}

/// The least of `runs` runs of the number a program prints on standard error after `key`.
pub fn least_reported(runs: usize, program: &str, args: &[&str], key: &str) -> Result<f64, String> {
    let mut best = f64::INFINITY;
    for _ in 0..runs.max(1) {
        let o = std::process::Command::new(program)
            .args(args)
            .current_dir(crate::paths::root())
            .output()
            .map_err(|e| format!("cannot start {program}: {e}"))?;
        let err = String::from_utf8_lossy(&o.stderr);
        let seconds = err
            .split(key)
            .nth(1)
            .and_then(|r| r.split_whitespace().next())
            .and_then(|v| v.parse::<f64>().ok())
            .ok_or_else(|| format!("{program} printed no `{key}` time: {err}"))?;
        best = best.min(seconds);
    }
    Ok(best)
}
