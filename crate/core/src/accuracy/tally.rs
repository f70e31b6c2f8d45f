//! A person's own count of a sample of the footage (a tally: one key press per crossing seen), and
//! how the automated count of the same sample compares with it, with the measures of NCHRP Report
//! 797 over bins of the sample. Several people may tally the same sample; each tally is kept with
//! who made it and when.

use super::measures;
use crate::edits::Way;
use crate::plan::clock::{elapsed, LocalTime};
use crate::report::{Direction, EventKind, Report};
use crate::report::{TallyCheck, TallyGroup};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// One crossing a person saw: where (line, direction), when (frame, 1-based), and the class when
/// they said.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Press {
    pub frame: u32,
    pub screenline: String,
    pub direction: Way,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub class: Option<String>,
}

/// A hand count of frames `from_frame` to `to_frame` (inclusive) of the lines named.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Tally {
    /// Who counted (as they typed it).
    pub who: String,
    /// When they counted, as the page's clock said (local time, `YYYY-MM-DDTHH:MM:SS`).
    pub made: String,
    pub from_frame: u32,
    pub to_frame: u32,
    /// The lines counted.
    pub screenlines: Vec<String>,
    pub presses: Vec<Press>,
}

/// Bins of the plan's interval when the sample holds two or more, else of a minute when it holds
/// two or more, else one bin: enough bins to see the error vary, as long as bins stay countable.
fn bin_seconds(sample: f64, interval: f64) -> f64 {
    if sample >= 2.0 * interval {
        interval
    } else if sample >= 120.0 {
        60.0
    } else {
        sample
    }
}

/// The sample's frames cut into bins: where each frame falls, and each bin's start label.
struct Bins<'a> {
    report: &'a Report,
    from: u32,
    to: u32,
    fps: f64,
    /// Seconds per bin, and the number of bins.
    bin: f64,
    count: usize,
}

impl Bins<'_> {
    fn index(&self, frame: u32) -> Option<usize> {
        (self.from..=self.to).contains(&frame).then(|| {
            let i = (f64::from(frame - self.from) / self.fps / self.bin).floor() as usize;
            i.min(self.count - 1)
        })
    }

    fn label(&self, seconds: f64) -> String {
        clock_label(self.report, seconds)
    }

    /// The first and last frame of bin `i` (the frames `index` puts in it).
    fn frames(&self, i: usize) -> [u32; 2] {
        let per_bin = self.bin * self.fps;
        let first = |k: usize| self.from + (k as f64 * per_bin).ceil() as u32;
        let end = if i + 1 == self.count {
            self.to
        } else {
            first(i + 1).saturating_sub(1).min(self.to)
        };
        [first(i).min(self.to), end]
    }

    fn start(&self, i: usize) -> String {
        self.label((f64::from(self.from) - 1.0) / self.fps + i as f64 * self.bin)
    }
}

/// The classes a tally names for one line and direction: `None` (all) first, then each class
/// pressed, in order of first press.
fn classes<'t>(tally: &'t Tally, name: &str, way: Way) -> Vec<Option<&'t String>> {
    let mut out = vec![None];
    for p in &tally.presses {
        if p.screenline == name && p.direction == way {
            if let Some(c) = &p.class {
                if !out.contains(&Some(c)) {
                    out.push(Some(c));
                }
            }
        }
    }
    out
}

/// One line, direction and class: the hand and automated counts bin by bin.
fn group(
    tally: &Tally,
    bins: &Bins,
    (name, way, dir, dir_label): (&str, Way, Direction, &str),
    class: Option<&String>,
) -> TallyGroup {
    let mut auto = vec![0u64; bins.count];
    let mut manual = vec![0u64; bins.count];
    for e in &bins.report.events {
        let same = e.kind == EventKind::Screenline && e.name == name && e.direction == dir;
        if same && class.is_none_or(|c| e.class == *c) {
            if let Some(i) = bins.index(e.frame) {
                auto[i] += 1;
            }
        }
    }
    for p in &tally.presses {
        let same = p.screenline == name && p.direction == way;
        if same && class.is_none_or(|c| p.class.as_ref() == Some(c)) {
            if let Some(i) = bins.index(p.frame) {
                manual[i] += 1;
            }
        }
    }
    let pairs: Vec<(u64, u64)> = auto.iter().copied().zip(manual.iter().copied()).collect();
    let (a, m): (u64, u64) = (auto.iter().sum(), manual.iter().sum());
    TallyGroup {
        screenline: name.to_string(),
        direction: dir_label.to_string(),
        class: class.cloned().unwrap_or_else(|| "all".into()),
        manual: m,
        automated: a,
        difference: a as i64 - m as i64,
        measures: measures(&pairs),
        per_bin: (0..bins.count)
            .map(|i| (bins.start(i), auto[i], manual[i]))
            .collect(),
    }
}

/// Compares a tally with the report's (corrected) events in the same frames.
pub fn check(tally: &Tally, report: &Report) -> TallyCheck {
    let fps = report.plan.frame_rate;
    // Within the footage: frames past its end hold nothing to compare (and a file saying so
    // must not make the bins grow without bound).
    let last = report.frame_count.max(1);
    let (from, to) = (
        tally.from_frame.min(tally.to_frame).clamp(1, last),
        tally.from_frame.max(tally.to_frame).clamp(1, last),
    );
    let seconds = f64::from(to - from + 1) / fps;
    let bin = bin_seconds(seconds, report.plan.interval_minutes * 60.0);
    let bins = Bins {
        report,
        from,
        to,
        fps,
        bin,
        count: ((seconds / bin).ceil() as usize).max(1),
    };
    let mut groups = Vec::new();
    for name in &tally.screenlines {
        let Some(line) = report.screenlines.iter().find(|l| l.name == *name) else {
            continue;
        };
        for (way, dir, label) in [
            (Way::Forward, Direction::Forward, &line.forward_label),
            (Way::Backward, Direction::Backward, &line.backward_label),
        ] {
            for class in classes(tally, name, way) {
                groups.push(group(tally, &bins, (name, way, dir, label), class));
            }
        }
    }
    let pooled: Vec<(u64, u64)> = groups
        .iter()
        .filter(|g| g.class == "all")
        .flat_map(|g| g.per_bin.iter().map(|(_, a, m)| (*a, *m)))
        .collect();
    let overall = measures(&pooled);
    TallyCheck {
        who: tally.who.clone(),
        made: tally.made.clone(),
        from_frame: from,
        to_frame: to,
        from: bins.label((f64::from(from) - 1.0) / fps),
        to: bins.label(f64::from(to) / fps),
        seconds: (seconds * 1000.0).round() / 1000.0,
        bin_seconds: (bin * 1000.0).round() / 1000.0,
        bin_frames: (0..bins.count).map(|i| bins.frames(i)).collect(),
        caution: caution(seconds, overall.reference_total),
        groups,
        overall,
    }
}

/// The clock label of a moment, as the report's events write it.
fn clock_label(report: &Report, seconds: f64) -> String {
    match report.plan.start.as_deref().and_then(LocalTime::parse) {
        Some(t) => t.plus_seconds(seconds.floor() as i64).to_string(),
        None => elapsed(seconds),
    }
}

/// How far a check can be trusted, from the sample's length and the crossings counted by hand.
/// The thresholds (an hour, a hundred crossings) are our own rule of thumb.
fn caution(seconds: f64, counted: u64) -> String {
    let minutes = seconds / 60.0;
    let length = if seconds < 120.0 {
        format!("{seconds:.0} seconds")
    } else {
        format!("{minutes:.1} minutes")
    };
    let size = format!("{length} and {counted} crossings counted by hand");
    if minutes < 60.0 || counted < 100 {
        format!(
            "A sample of {size} gives only a loose estimate of the error: differences this small \
             can come from a few crossings. Count a longer sample before relying on the measures \
             or applying a correction factor."
        )
    } else {
        format!("A sample of {size}.")
    }
}
