//! People who walk together as one blob: when the detector's box covers the predictions of two or
//! more of the tracker's confirmed tracks and is wider than one person at its row (the detector's
//! perspective rule), it is cut into one box per track before association, each at its track's
//! predicted place. The tracks carry the split from frame to frame, so each keeps its identity
//! through the merge and goes on when the blob comes apart (the classic handling of merged
//! blobs in fixed-camera tracking). Boxes are pixels, top-left x/y + width/height.

use crate::detections::{Detection, Perspective};
use crate::geometry::BBox;

/// Least share of a prediction's area inside a box for the box to hold it (common practice: most
/// of it).
const HELD_SHARE: f64 = 0.9;
/// A box is cut only when at least this many times as wide as one person at its bottom row.
const WIDE: f64 = 1.25;
/// Two predictions whose centres are nearer than this many person widths go to one piece (one
/// person seen as two tracks, or one hidden behind the other: not two people side by side).
const APART: f64 = 0.4;
/// A track guides a cut only while its predicted box is at least this share of a person's
/// expected height at its row (a track on a piece of a person does not).
const GUIDE_TALL: f64 = 0.6;
/// A cut box is kept between these many times one person's expected size.
const SIZE: (f64, f64) = (0.7, 1.3);

/// The frame's detections with each merged blob cut into one box per group of tracks it holds, or
/// `None` when no box needs cutting. `guides` are the predicted boxes of the confirmed tracks
/// that may guide a cut, in the tracker's order. Pieces keep the blob's score and appearance and
/// take its place in the order of `dets`; they carry no class (the blob's shape says nothing of
/// one person's).
pub(crate) fn split_merged(
    guides: &[BBox],
    dets: &[Detection],
    perspective: &Perspective,
) -> Option<Vec<Detection>> {
    let held = holders(guides, dets, perspective);
    // How many guides each detection holds: most hold one or none, and only those that hold two
    // or more gather their guides.
    let mut holding = vec![0usize; dets.len()];
    for &i in held.iter().flatten() {
        holding[i] += 1;
    }
    let mut out: Option<Vec<Detection>> = None;
    for (i, d) in dets.iter().enumerate() {
        let pieces = if holding[i] >= 2 {
            let mine: Vec<BBox> = held
                .iter()
                .zip(guides)
                .filter(|(h, _)| **h == Some(i))
                .map(|(_, g)| *g)
                .collect();
            pieces(&d.bbox, mine, perspective)
        } else {
            Vec::new()
        };
        if pieces.len() < 2 {
            if let Some(out) = &mut out {
                out.push(*d);
            }
            continue;
        }
        let out = out.get_or_insert_with(|| dets[..i].to_vec());
        out.extend(pieces.into_iter().map(|bbox| Detection {
            bbox,
            class: None,
            ..*d
        }));
    }
    out
}

/// For each guide, the detection that holds it (its centre inside, most of its area inside) with
/// the largest share of it; ties to the first detection.
fn holders(guides: &[BBox], dets: &[Detection], perspective: &Perspective) -> Vec<Option<usize>> {
    guides
        .iter()
        .map(|g| {
            let area = g.area();
            let tall = perspective.height_at(g.y + g.h);
            if area <= 0.0 || g.h < GUIDE_TALL * tall {
                return None;
            }
            let c = g.centre();
            let mut best: Option<(usize, f64)> = None;
            for (i, d) in dets.iter().enumerate() {
                let b = &d.bbox;
                let inside = c.x >= b.x && c.x <= b.x + b.w && c.y >= b.y && c.y <= b.y + b.h;
                let share = b.intersection(g) / area;
                if inside && share >= HELD_SHARE && best.is_none_or(|(_, s)| share > s) {
                    best = Some((i, share));
                }
            }
            best.map(|(i, _)| i)
        })
        .collect()
}

/// The pieces of blob `b` for the predictions it holds: none when it is not wider than one person;
/// else the predictions in order of their centres across, those nearer than [`APART`] grouped,
/// and the blob cut midway between neighbouring groups. Each piece spans its cut across and its
/// group's predicted rows (kept inside the blob) down.
fn pieces(b: &BBox, mut mine: Vec<BBox>, perspective: &Perspective) -> Vec<BBox> {
    let person = perspective.width_at(b.y + b.h);
    if !(person > 0.0 && b.w >= WIDE * person) {
        return Vec::new();
    }
    mine.sort_by(|p, q| p.centre().x.total_cmp(&q.centre().x));
    // Groups as (first centre across, last centre across, left, right, top, bottom).
    let mut groups: Vec<[f64; 6]> = Vec::new();
    for g in &mine {
        let cx = g.centre().x;
        match groups.last_mut() {
            Some(last) if cx - last[1] < APART * person => {
                last[1] = cx;
                last[2] = last[2].min(g.x);
                last[3] = last[3].max(g.x + g.w);
                last[4] = last[4].min(g.y);
                last[5] = last[5].max(g.y + g.h);
            }
            _ => groups.push([cx, cx, g.x, g.x + g.w, g.y, g.y + g.h]),
        }
    }
    if groups.len() < 2 {
        return Vec::new();
    }
    let mut cut = b.x;
    groups
        .iter()
        .enumerate()
        .map(|(k, &[first, last, left, right, top, bottom])| {
            let next_cut = groups
                .get(k + 1)
                .map_or(b.x + b.w, |next| (last + next[0]) / 2.0);
            // The group's predicted width and height, kept near one person's so that a cut box
            // never shrinks from frame to frame as its own prediction is fed back.
            // In hundredths of a pixel: a detections file holds them exactly.
            let w = hundredths(within(right - left, SIZE.0 * person, SIZE.1 * person).min(b.w));
            let tall = perspective.height_at(bottom.min(b.y + b.h)).max(1.0);
            let h = hundredths(within(bottom - top, SIZE.0 * tall, SIZE.1 * tall).min(b.h));
            let cx = within((first + last) / 2.0, cut, next_cut);
            cut = next_cut;
            let x = hundredths(within(cx - w / 2.0, b.x, b.x + b.w - w));
            let y = hundredths(within(bottom - h, b.y, b.y + b.h - h));
            BBox::new(x, y, w, h)
        })
        .collect()
}

/// `v` rounded to a hundredth, as a detections file writes it.
fn hundredths(v: f64) -> f64 {
    (v * 100.0).round() / 100.0
}

/// `v` kept from `lo` to `hi`; never panics (rounding may leave `hi` a hair under `lo`: `lo` wins).
fn within(v: f64, lo: f64, hi: f64) -> f64 {
    v.min(hi).max(lo)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A person is 28 x 80 pixels at every row.
    const PERSON: Perspective = Perspective {
        far_height: 80.0,
        near_height: 80.0,
        picture_height: 360.0,
        width_ratio: 0.35,
    };

    fn det(x: f64, w: f64) -> Detection {
        Detection {
            frame: 1,
            bbox: BBox::new(x, 100.0, w, 80.0),
            score: 0.8,
            class: Some(0),
            embedding: None,
        }
    }

    fn cut(guides: &[BBox], dets: &[Detection]) -> Option<Vec<BBox>> {
        split_merged(guides, dets, &PERSON).map(|d| d.iter().map(|d| d.bbox).collect())
    }

    #[test]
    fn a_blob_over_two_predictions_becomes_one_box_at_each() {
        let guides = [
            BBox::new(234.0, 100.0, 28.0, 80.0),
            BBox::new(200.0, 100.0, 28.0, 80.0),
        ];
        let dets = [det(10.0, 28.0), det(200.0, 62.0)];
        let out = split_merged(&guides, &dets, &PERSON).expect("cut");
        let boxes: Vec<BBox> = out.iter().map(|d| d.bbox).collect();
        // In the detections' order, the blob's pieces left to right, each its prediction.
        assert_eq!(boxes, vec![dets[0].bbox, guides[1], guides[0]]);
        assert_eq!(
            (out[0].class, out[1].class, out[2].class),
            (Some(0), None, None)
        );
        assert!(out.iter().all(|d| d.score == 0.8));
    }

    #[test]
    fn boxes_one_person_wide_or_holding_one_prediction_are_not_cut() {
        let one = [BBox::new(200.0, 100.0, 28.0, 80.0)];
        assert_eq!(cut(&one, &[det(200.0, 62.0)]), None);
        // Two tracks on one person (stacked pieces), in a box 1.1 persons wide.
        let stacked = [
            BBox::new(200.0, 100.0, 28.0, 40.0),
            BBox::new(201.0, 140.0, 28.0, 40.0),
        ];
        assert_eq!(cut(&stacked, &[det(200.0, 31.0)]), None);
        // Wide enough, but the two predictions are 2 px apart across: one piece, no cut.
        let close = [
            BBox::new(210.0, 100.0, 28.0, 80.0),
            BBox::new(212.0, 100.0, 28.0, 80.0),
        ];
        assert_eq!(cut(&close, &[det(200.0, 62.0)]), None);
        // A prediction mostly outside the box is not held by it.
        let out = [
            BBox::new(200.0, 100.0, 28.0, 80.0),
            BBox::new(250.0, 100.0, 28.0, 80.0),
        ];
        assert_eq!(cut(&out, &[det(200.0, 62.0)]), None);
    }

    #[test]
    fn a_piece_stays_inside_the_blob_and_near_one_persons_size() {
        // A prediction grown to 60 px wide is cut back to 1.3 persons (36.4 px) and kept inside.
        let guides = [
            BBox::new(195.0, 100.0, 60.0, 80.0),
            BBox::new(260.0, 100.0, 28.0, 80.0),
        ];
        let boxes = cut(&guides, &[det(195.0, 95.0)]).expect("cut");
        assert_eq!(boxes.len(), 2);
        assert!((boxes[0].w - 36.4).abs() < 1e-9, "{:?}", boxes[0]);
        assert!(boxes.iter().all(|b| b.x >= 195.0 && b.x + b.w <= 290.0));
    }
}
