//! Tracking quality against ground truth: CLEAR MOT, identity metrics (IDF1) and HOTA.
//!
//! The algorithms follow the papers (Bernardin & Stiefelhagen 2008; Ristani et al. 2016; Luiten et
//! al. 2021) in the form of the reference evaluation code (TrackEval 1.3): box IoU as similarity, a
//! 0.5 IoU threshold for CLEAR and identity matching, and HOTA averaged over α = 0.05, 0.10 … 0.95.
//! Ratios are fractions in `[0, 1]`.

use serde::Serialize;
use std::collections::BTreeMap;
use std::fmt;
use throughline_core::track::assign::{maximise_edges, CostMatrix, Edge};
use throughline_core::track::files::IdBox;

/// The scores of one tracker output against one ground truth.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scores {
    pub mota: f64,
    pub motp: f64,
    pub idf1: f64,
    pub idp: f64,
    pub idr: f64,
    pub id_switches: u64,
    pub fragmentations: u64,
    pub mostly_tracked: u64,
    pub partially_tracked: u64,
    pub mostly_lost: u64,
    pub false_positives: u64,
    pub misses: u64,
    pub true_positives: u64,
    pub hota: f64,
    pub deta: f64,
    pub assa: f64,
    pub loca: f64,
    pub gt_ids: u64,
    pub tracker_ids: u64,
}

/// Input that cannot be scored.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ScoreError {
    pub message: String,
}

impl fmt::Display for ScoreError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for ScoreError {}

/// One frame: dense ground-truth and tracker ids and the IoU matrix (gt rows × tracker columns).
struct Frame {
    gt: Vec<usize>,
    tr: Vec<usize>,
    iou: CostMatrix,
}

const EPS: f64 = f64::EPSILON;

fn dense_ids(rows: &[IdBox]) -> BTreeMap<i64, usize> {
    let mut ids: BTreeMap<i64, usize> = rows.iter().map(|r| (r.id, 0)).collect();
    for (i, v) in ids.values_mut().enumerate() {
        *v = i;
    }
    ids
}

fn frames(gt: &[IdBox], tr: &[IdBox]) -> Result<(Vec<Frame>, usize, usize), ScoreError> {
    let gt_ids = dense_ids(gt);
    let tr_ids = dense_ids(tr);
    let mut by_frame: BTreeMap<u32, (Vec<&IdBox>, Vec<&IdBox>)> = BTreeMap::new();
    for r in gt {
        by_frame.entry(r.frame).or_default().0.push(r);
    }
    for r in tr {
        by_frame.entry(r.frame).or_default().1.push(r);
    }
    let mut out = Vec::with_capacity(by_frame.len());
    for (frame, (g, t)) in by_frame {
        for (rows, what) in [(&g, "ground truth"), (&t, "tracker output")] {
            let mut seen: Vec<i64> = rows.iter().map(|r| r.id).collect();
            seen.sort_unstable();
            if let Some(w) = seen.windows(2).find(|w| w[0] == w[1]) {
                return Err(ScoreError {
                    message: format!(
                        "the {what} has id {} twice in frame {frame}: each id may appear once per frame",
                        w[0]
                    ),
                });
            }
        }
        let iou = CostMatrix::from_fn(g.len(), t.len(), |r, c| g[r].bbox.iou(&t[c].bbox));
        out.push(Frame {
            gt: g.iter().map(|r| gt_ids[&r.id]).collect(),
            tr: t.iter().map(|r| tr_ids[&r.id]).collect(),
            iou,
        });
    }
    Ok((out, gt_ids.len(), tr_ids.len()))
}

/// Maximum-score assignment of a score matrix (SciPy's `linear_sum_assignment(-score)`), keeping
/// the pairs with a positive score: the only ones any metric uses.
fn maximise(score: &CostMatrix) -> Vec<(usize, usize)> {
    let mut edges = Vec::new();
    for row in 0..score.rows {
        for col in 0..score.cols {
            let cost = score.get(row, col);
            if cost > 0.0 {
                edges.push(Edge { row, col, cost });
            }
        }
    }
    maximise_edges(score.rows, score.cols, &edges)
}

/// Values by (ground-truth id, tracker id), for the pairs that have one.
type Sparse = BTreeMap<(usize, usize), f64>;

/// [`maximise`] over a sparse table (absent pairs are zero), edges in row-major order as the dense
/// table gives them.
fn maximise_sparse(values: &Sparse, rows: usize, cols: usize) -> Vec<(usize, usize)> {
    let edges: Vec<Edge> = values
        .iter()
        .filter(|(_, &v)| v > 0.0)
        .map(|(&(row, col), &cost)| Edge { row, col, cost })
        .collect();
    maximise_edges(rows, cols, &edges)
}

/// Scores tracker boxes against ground-truth boxes (both as `frame,id,box` rows, any order).
pub fn score(gt: &[IdBox], tr: &[IdBox]) -> Result<Scores, ScoreError> {
    let (frames, n_gt, n_tr) = frames(gt, tr)?;
    let clear = clear(&frames, n_gt, n_tr);
    let identity = identity(&frames, n_gt, n_tr);
    let hota = hota(&frames, n_gt, n_tr);
    Ok(Scores {
        mota: clear.mota,
        motp: clear.motp,
        idf1: identity.0,
        idp: identity.1,
        idr: identity.2,
        id_switches: clear.idsw,
        fragmentations: clear.frag,
        mostly_tracked: clear.mt,
        partially_tracked: clear.pt,
        mostly_lost: clear.ml,
        false_positives: clear.fp,
        misses: clear.fn_,
        true_positives: clear.tp,
        hota: hota.0,
        deta: hota.1,
        assa: hota.2,
        loca: hota.3,
        gt_ids: n_gt as u64,
        tracker_ids: n_tr as u64,
    })
}

struct Clear {
    mota: f64,
    motp: f64,
    tp: u64,
    fp: u64,
    fn_: u64,
    idsw: u64,
    frag: u64,
    mt: u64,
    pt: u64,
    ml: u64,
}

/// CLEAR MOT with the keep-previous rule: a pair matched in the previous frame is kept when its IoU
/// still passes the threshold; an ID switch is a match to another tracker id than the one the ground
/// truth object was last matched to, at any earlier frame.
fn clear(frames: &[Frame], n_gt: usize, _n_tr: usize) -> Clear {
    let (mut tp, mut fp, mut fn_, mut idsw) = (0u64, 0u64, 0u64, 0u64);
    let mut motp_sum = 0.0;
    let mut prev_id: Vec<Option<usize>> = vec![None; n_gt];
    let mut prev_step: Vec<Option<usize>> = vec![None; n_gt];
    let mut gt_count = vec![0u64; n_gt];
    let mut matched_count = vec![0u64; n_gt];
    let mut frag_count = vec![0u64; n_gt];
    for f in frames {
        if f.gt.is_empty() {
            fp += f.tr.len() as u64;
            continue;
        }
        if f.tr.is_empty() {
            fn_ += f.gt.len() as u64;
            for &g in &f.gt {
                gt_count[g] += 1;
            }
            continue;
        }
        let pairs = clear_matches(f, &prev_step);
        for &(r, c) in &pairs {
            let (g, t) = (f.gt[r], f.tr[c]);
            if prev_id[g].is_some_and(|p| p != t) {
                idsw += 1;
            }
        }
        for &g in &f.gt {
            gt_count[g] += 1;
        }
        let not_previously: Vec<bool> = prev_step.iter().map(Option::is_none).collect();
        prev_step.iter_mut().for_each(|p| *p = None);
        for &(r, c) in &pairs {
            let (g, t) = (f.gt[r], f.tr[c]);
            matched_count[g] += 1;
            prev_id[g] = Some(t);
            prev_step[g] = Some(t);
            motp_sum += f.iou.get(r, c);
        }
        for g in 0..n_gt {
            if not_previously[g] && prev_step[g].is_some() {
                frag_count[g] += 1;
            }
        }
        let m = pairs.len() as u64;
        tp += m;
        fn_ += f.gt.len() as u64 - m;
        fp += f.tr.len() as u64 - m;
    }
    let (mt, pt) = coverage(&gt_count, &matched_count);
    let frag = frag_count.iter().filter(|&&c| c > 0).map(|c| c - 1).sum();
    Clear {
        mota: (tp as f64 - fp as f64 - idsw as f64) / ((tp + fn_) as f64).max(1.0),
        motp: motp_sum / (tp as f64).max(1.0),
        tp,
        fp,
        fn_,
        idsw,
        frag,
        mt,
        pt,
        ml: n_gt as u64 - mt - pt,
    }
}

/// One frame's CLEAR matches at IoU 0.5, keeping last frame's pairs where they still pass
/// (`prev_step[g]`: the tracker id ground-truth object `g` was matched to in the previous frame).
fn clear_matches(f: &Frame, prev_step: &[Option<usize>]) -> Vec<(usize, usize)> {
    let threshold = 0.5;
    let score = CostMatrix::from_fn(f.gt.len(), f.tr.len(), |r, c| {
        let sim = f.iou.get(r, c);
        if sim < threshold - EPS {
            0.0
        } else if prev_step[f.gt[r]] == Some(f.tr[c]) {
            1000.0 + sim
        } else {
            sim
        }
    });
    maximise(&score)
        .into_iter()
        .filter(|&(r, c)| score.get(r, c) > EPS)
        .collect()
}

/// Mostly tracked (matched in over 80% of its frames) and partly tracked (20% or more) objects.
fn coverage(gt_count: &[u64], matched_count: &[u64]) -> (u64, u64) {
    let (mut mt, mut pt) = (0, 0);
    for (&n, &m) in gt_count.iter().zip(matched_count) {
        if n == 0 {
            continue;
        }
        let ratio = m as f64 / n as f64;
        if ratio > 0.8 {
            mt += 1;
        } else if ratio >= 0.2 {
            pt += 1;
        }
    }
    (mt, pt)
}

/// IDF1, IDP, IDR: the one-to-one matching of ground-truth ids to tracker ids that maximises the
/// number of frames in which the matched pair overlaps with IoU ≥ 0.5.
fn identity(frames: &[Frame], n_gt: usize, n_tr: usize) -> (f64, f64, f64) {
    // Only pairs of ids that ever overlap are held: memory grows with the pairs seen together,
    // not with the number of ground-truth ids times tracker ids.
    let mut potential: Sparse = BTreeMap::new();
    let (mut gt_total, mut tr_total) = (0.0, 0.0);
    for f in frames {
        gt_total += f.gt.len() as f64;
        tr_total += f.tr.len() as f64;
        for (r, &g) in f.gt.iter().enumerate() {
            for (c, &t) in f.tr.iter().enumerate() {
                if f.iou.get(r, c) >= 0.5 {
                    *potential.entry((g, t)).or_insert(0.0) += 1.0;
                }
            }
        }
    }
    let idtp: f64 = maximise_sparse(&potential, n_gt, n_tr)
        .into_iter()
        .map(|gt| potential[&gt])
        .sum();
    let idfn = gt_total - idtp;
    let idfp = tr_total - idtp;
    let idf1 = idtp / (idtp + 0.5 * idfp + 0.5 * idfn).max(1.0);
    let idp = idtp / (idtp + idfp).max(1.0);
    let idr = idtp / (idtp + idfn).max(1.0);
    (idf1, idp, idr)
}

/// HOTA's global alignment of each ground-truth id with each tracker id (the soft IoU of their
/// whole tracks), and how many frames each id is in.
fn alignment(frames: &[Frame], n_gt: usize, n_tr: usize) -> (Sparse, Vec<f64>, Vec<f64>) {
    let mut potential: Sparse = BTreeMap::new();
    let mut gt_count = vec![0.0; n_gt];
    let mut tr_count = vec![0.0; n_tr];
    for f in frames {
        for &g in &f.gt {
            gt_count[g] += 1.0;
        }
        for &t in &f.tr {
            tr_count[t] += 1.0;
        }
        if f.gt.is_empty() || f.tr.is_empty() {
            continue;
        }
        let row_sum: Vec<f64> = (0..f.gt.len())
            .map(|r| (0..f.tr.len()).map(|c| f.iou.get(r, c)).sum())
            .collect();
        let col_sum: Vec<f64> = (0..f.tr.len())
            .map(|c| (0..f.gt.len()).map(|r| f.iou.get(r, c)).sum())
            .collect();
        for (r, &g) in f.gt.iter().enumerate() {
            for (c, &t) in f.tr.iter().enumerate() {
                let sim = f.iou.get(r, c);
                let denom = row_sum[r] + col_sum[c] - sim;
                if denom > EPS && sim > 0.0 {
                    *potential.entry((g, t)).or_insert(0.0) += sim / denom;
                }
            }
        }
    }
    let alignment = potential
        .into_iter()
        .map(|((g, t), p)| {
            let denom = gt_count[g] + tr_count[t] - p;
            ((g, t), if denom > 0.0 { p / denom } else { 0.0 })
        })
        .collect();
    (alignment, gt_count, tr_count)
}

/// HOTA, DetA, AssA, LocA, each averaged over the 19 localisation thresholds α.
fn hota(frames: &[Frame], n_gt: usize, n_tr: usize) -> (f64, f64, f64, f64) {
    let alphas: Vec<f64> = (1..=19).map(|k| k as f64 * 0.05).collect();
    let (alignment, gt_count, tr_count) = alignment(frames, n_gt, n_tr);
    let na = alphas.len();
    let (mut tp, mut fn_, mut fp, mut loc) =
        (vec![0.0; na], vec![0.0; na], vec![0.0; na], vec![0.0; na]);
    let mut matches: Vec<BTreeMap<(usize, usize), f64>> = vec![BTreeMap::new(); na];
    for f in frames {
        if f.gt.is_empty() || f.tr.is_empty() {
            for a in 0..na {
                fn_[a] += f.gt.len() as f64;
                fp[a] += f.tr.len() as f64;
            }
            continue;
        }
        let score = CostMatrix::from_fn(f.gt.len(), f.tr.len(), |r, c| {
            alignment.get(&(f.gt[r], f.tr[c])).copied().unwrap_or(0.0) * f.iou.get(r, c)
        });
        let pairs = maximise(&score);
        for (a, &alpha) in alphas.iter().enumerate() {
            let kept: Vec<&(usize, usize)> = pairs
                .iter()
                .filter(|&&(r, c)| f.iou.get(r, c) >= alpha - EPS)
                .collect();
            let m = kept.len() as f64;
            tp[a] += m;
            fn_[a] += f.gt.len() as f64 - m;
            fp[a] += f.tr.len() as f64 - m;
            for &&(r, c) in &kept {
                loc[a] += f.iou.get(r, c);
                *matches[a].entry((f.gt[r], f.tr[c])).or_insert(0.0) += 1.0;
            }
        }
    }
    let mut sums = (0.0, 0.0, 0.0, 0.0);
    for a in 0..na {
        let ass_sum: f64 = matches[a]
            .iter()
            .map(|(&(g, t), &m)| m * m / (gt_count[g] + tr_count[t] - m).max(1.0))
            .sum();
        let assa = ass_sum / tp[a].max(1.0);
        let deta = tp[a] / (tp[a] + fn_[a] + fp[a]).max(1.0);
        let loca = if tp[a] > 0.0 {
            loc[a].max(1e-10) / tp[a].max(1e-10)
        } else {
            1.0
        };
        sums.0 += (deta * assa).sqrt();
        sums.1 += deta;
        sums.2 += assa;
        sums.3 += loca;
    }
    let n = na as f64;
    (sums.0 / n, sums.1 / n, sums.2 / n, sums.3 / n)
}
