//! What the terminal shows while a command works: progress bars, and with `--stats` the time per
//! stage and the peak memory.

use indicatif::{ProgressBar, ProgressStyle};

/// A bar over `total` steps with a template, or a hidden one when `quiet`.
pub fn bar(quiet: bool, total: u64, template: &str) -> ProgressBar {
    if quiet {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::new(total);
    bar.set_style(
        ProgressStyle::with_template(template).unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    bar
}

/// A spinner with a count, for input of unknown length, or a hidden one when `quiet`.
pub fn spinner(quiet: bool, template: &str) -> ProgressBar {
    if quiet {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::new_spinner();
    bar.set_style(
        ProgressStyle::with_template(template).unwrap_or_else(|_| ProgressStyle::default_spinner()),
    );
    bar
}

/// Runs a command with a [`Timer`]; with `--stats`, prints its laps and peak memory at the end,
/// whether the command succeeded or not.
pub fn timed<T>(stats: bool, run: impl FnOnce(&mut Timer) -> T) -> T {
    let mut timer = Timer::new();
    let result = run(&mut timer);
    if stats {
        timer.print();
    }
    result
}

/// Time per stage of a run, and the peak resident memory (Linux `VmHWM`), for `--stats`.
pub struct Timer {
    started: std::time::Instant,
    last: std::time::Instant,
    laps: Vec<(&'static str, f64)>,
}

impl Timer {
    pub fn new() -> Self {
        let now = std::time::Instant::now();
        Self {
            started: now,
            last: now,
            laps: Vec::new(),
        }
    }

    pub fn lap(&mut self, name: &'static str) {
        let now = std::time::Instant::now();
        self.laps.push((name, (now - self.last).as_secs_f64()));
        self.last = now;
    }

    fn print(&self) {
        let peak = std::fs::read_to_string("/proc/self/status")
            .ok()
            .and_then(|s| {
                s.lines()
                    .find(|l| l.starts_with("VmHWM:"))
                    .and_then(|l| l.split_whitespace().nth(1))
                    .and_then(|kib| kib.parse::<f64>().ok())
            });
        let laps: Vec<String> = self
            .laps
            .iter()
            .map(|(n, t)| format!("{n} {t:.3} s"))
            .collect();
        let total = self.started.elapsed().as_secs_f64();
        let memory = peak.map_or(String::new(), |kib| {
            format!(", peak memory {:.1} MiB", kib / 1024.0)
        });
        eprintln!("stats: {total:.3} s ({}){memory}", laps.join(", "));
    }
}
