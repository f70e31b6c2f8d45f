//! A person's own count of a sample of the footage (a tally: one key press per crossing seen), and
//! how the automated count of the same sample compares with it, with the measures of NCHRP Report
//! 797 over bins of the sample. Several people may tally the same sample; each tally is kept with
//! who made it and when.

use super::{measures, Measures};
use crate::edits::Way;
use crate::plan::clock::{elapsed, LocalTime};
use crate::report::{Direction, EventKind, Report};
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

/// One line, direction and class of a check.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct TallyGroup {
    pub screenline: String,
    /// The plan's label of the direction.
    pub direction: String,
    /// `all` for all classes together.
    pub class: String,
    pub manual: u64,
    pub automated: u64,
    /// Automated minus manual.
    pub difference: i64,
    pub measures: Measures,
    /// Each bin: its start label, automated and manual counts.
    pub per_bin: Vec<(String, u64, u64)>,
}

/// A tally beside the automated count of the same frames.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct TallyCheck {
    pub who: String,
    pub made: String,
    pub from_frame: u32,
    pub to_frame: u32,
    /// Clock labels of the sample's start and end.
    pub from: String,
    pub to: String,
    /// The sample's length in seconds, and the bins the measures are taken over.
    pub seconds: f64,
    pub bin_seconds: f64,
    pub groups: Vec<TallyGroup>,
    /// Every group's bins pooled (all classes together).
    pub overall: Measures,
    /// How far to trust it: the sample's size, in words.
    pub caution: String,
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

/// Compares a tally with the report's (corrected) events in the same frames.
pub fn check(tally: &Tally, report: &Report) -> TallyCheck {
    let fps = report.plan.frame_rate;
    let (from, to) = (
        tally.from_frame.min(tally.to_frame),
        tally.from_frame.max(tally.to_frame),
    );
    let seconds = f64::from(to - from + 1) / fps;
    let bin = bin_seconds(seconds, report.plan.interval_minutes * 60.0);
    let bins = ((seconds / bin).ceil() as usize).max(1);
    let index = |frame: u32| ((f64::from(frame - from) / fps / bin).floor() as usize).min(bins - 1);
    let label = |s: f64| clock_label(report, s);
    let start_of = |i: usize| label((f64::from(from) - 1.0) / fps + i as f64 * bin);
    let mut groups = Vec::new();
    for name in &tally.screenlines {
        let Some(line) = report.screenlines.iter().find(|l| l.name == *name) else {
            continue;
        };
        for (way, dir, dir_label) in [
            (Way::Forward, Direction::Forward, &line.forward_label),
            (Way::Backward, Direction::Backward, &line.backward_label),
        ] {
            let mut classes = vec![None];
            for p in &tally.presses {
                if p.screenline == *name && p.direction == way {
                    if let Some(c) = &p.class {
                        if !classes.contains(&Some(c)) {
                            classes.push(Some(c));
                        }
                    }
                }
            }
            for class in classes {
                let mut auto = vec![0u64; bins];
                let mut manual = vec![0u64; bins];
                for e in &report.events {
                    let same_class = class.is_none_or(|c| e.class == *c);
                    if e.kind == EventKind::Screenline
                        && e.name == *name
                        && e.direction == dir
                        && (from..=to).contains(&e.frame)
                        && same_class
                    {
                        auto[index(e.frame)] += 1;
                    }
                }
                for p in &tally.presses {
                    let same_class = class.is_none_or(|c| p.class.as_ref() == Some(c));
                    if p.screenline == *name
                        && p.direction == way
                        && (from..=to).contains(&p.frame)
                        && same_class
                    {
                        manual[index(p.frame)] += 1;
                    }
                }
                let pairs: Vec<(u64, u64)> =
                    auto.iter().copied().zip(manual.iter().copied()).collect();
                let (a, m): (u64, u64) = (auto.iter().sum(), manual.iter().sum());
                groups.push(TallyGroup {
                    screenline: name.clone(),
                    direction: dir_label.clone(),
                    class: class.cloned().unwrap_or_else(|| "all".into()),
                    manual: m,
                    automated: a,
                    difference: a as i64 - m as i64,
                    measures: measures(&pairs),
                    per_bin: (0..bins)
                        .map(|i| (start_of(i), auto[i], manual[i]))
                        .collect(),
                });
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
        from: label((f64::from(from) - 1.0) / fps),
        to: label(f64::from(to) / fps),
        seconds: (seconds * 1000.0).round() / 1000.0,
        bin_seconds: (bin * 1000.0).round() / 1000.0,
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
    let size = format!("{minutes:.1} minutes and {counted} crossings counted by hand");
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
