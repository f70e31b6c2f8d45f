//! Summary statistics the report uses: percentiles, mean and median with the 85th percentile, and
//! the peak hour of interval totals.

use crate::report::Summary;

/// Percentile with linear interpolation between order statistics (NumPy's default method).
pub fn percentile(sorted: &[f64], p: f64) -> Option<f64> {
    if sorted.is_empty() {
        return None;
    }
    let rank = p * (sorted.len() - 1) as f64;
    let (lo, hi) = (rank.floor() as usize, rank.ceil() as usize);
    Some(sorted[lo] + (sorted[hi] - sorted[lo]) * (rank - lo as f64))
}

pub(super) fn summary(mut values: Vec<f64>) -> Summary {
    values.retain(|v| v.is_finite());
    values.sort_by(f64::total_cmp);
    let n = values.len();
    Summary {
        count: n,
        mean: (n > 0).then(|| values.iter().sum::<f64>() / n as f64),
        median: percentile(&values, 0.5),
        p85: percentile(&values, 0.85),
    }
}

/// The busiest run of consecutive intervals.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HourRun {
    /// Index of its first interval.
    pub first: usize,
    /// Its total.
    pub volume: u64,
    /// Its busiest interval's total.
    pub peak_interval_volume: u64,
    /// Peak hour factor: `volume / (per_hour × peak_interval_volume)`; 0 for an empty hour.
    pub phf: f64,
}

/// Peak hour over interval totals: the run of `per_hour` consecutive whole intervals with the highest
/// sum (the earliest among equals).
pub fn peak_hour(totals: &[u64], per_hour: usize) -> Option<HourRun> {
    if per_hour == 0 || totals.len() < per_hour {
        return None;
    }
    let mut best: Option<(usize, u64)> = None;
    for s in 0..=totals.len() - per_hour {
        let v: u64 = totals[s..s + per_hour].iter().sum();
        if best.is_none_or(|(_, b)| v > b) {
            best = Some((s, v));
        }
    }
    let (first, volume) = best?;
    let max = totals[first..first + per_hour]
        .iter()
        .copied()
        .max()
        .unwrap_or(0);
    let phf = if max > 0 {
        volume as f64 / (per_hour as f64 * max as f64)
    } else {
        0.0
    };
    Some(HourRun {
        first,
        volume,
        peak_interval_volume: max,
        phf,
    })
}
