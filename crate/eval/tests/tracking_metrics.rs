//! Tracking metrics on hand-worked cases. Agreement with TrackEval and py-motmetrics on real data is
//! the subject of its own fixtures.

use throughline_core::geometry::BBox;
use throughline_core::track::files::IdBox;
use throughline_eval::tracking_metrics::score;

fn row(frame: u32, id: i64, x: f64) -> IdBox {
    IdBox {
        frame,
        id,
        bbox: BBox::new(x, 0.0, 10.0, 10.0),
        score: 1.0,
    }
}

#[test]
fn perfect_tracks_score_one() {
    let gt: Vec<IdBox> = (1..=10)
        .flat_map(|f| [row(f, 1, 0.0), row(f, 2, 50.0)])
        .collect();
    let s = score(&gt, &gt).unwrap();
    for v in [s.mota, s.motp, s.idf1, s.hota, s.deta, s.assa, s.loca] {
        assert!((v - 1.0).abs() < 1e-12, "{s:?}");
    }
    assert_eq!(
        (s.id_switches, s.false_positives, s.misses, s.mostly_tracked),
        (0, 0, 0, 2)
    );
}

#[test]
fn an_identity_swap_half_way_is_one_switch_per_object() {
    // Two objects far apart; the tracker swaps their ids at frame 6.
    let gt: Vec<IdBox> = (1..=10)
        .flat_map(|f| [row(f, 1, 0.0), row(f, 2, 50.0)])
        .collect();
    let tr: Vec<IdBox> = (1..=10)
        .flat_map(|f| {
            let (a, b) = if f <= 5 { (7, 8) } else { (8, 7) };
            [row(f, a, 0.0), row(f, b, 50.0)]
        })
        .collect();
    let s = score(&gt, &tr).unwrap();
    assert_eq!(s.id_switches, 2);
    // MOTA = 1 - (FN + FP + IDSW) / GT = 1 - 2/20.
    assert!((s.mota - 0.9).abs() < 1e-12);
    // IDF1: the best id pairing covers 5 of 10 frames per object: IDTP 10 of 20.
    assert!((s.idf1 - 0.5).abs() < 1e-12);
    // HOTA: every box is detected (DetA 1); each matched pair shares 5 frames of the 10 + 10 the two
    // ids are present, A = 5 / (10 + 10 - 5) = 1/3, so AssA = 1/3 and HOTA = sqrt(1/3).
    assert!(
        (s.deta - 1.0).abs() < 1e-12 && (s.assa - 1.0 / 3.0).abs() < 1e-12,
        "{s:?}"
    );
    assert!((s.hota - (1.0f64 / 3.0).sqrt()).abs() < 1e-12);
}

#[test]
fn empty_tracker_output_misses_everything() {
    let gt: Vec<IdBox> = (1..=4).map(|f| row(f, 1, 0.0)).collect();
    let s = score(&gt, &[]).unwrap();
    assert_eq!((s.misses, s.false_positives, s.mostly_lost), (4, 0, 1));
    assert_eq!((s.mota, s.hota, s.idf1), (0.0, 0.0, 0.0));
}

#[test]
fn duplicate_ids_in_one_frame_are_an_error() {
    let gt = vec![row(1, 1, 0.0), row(1, 1, 40.0)];
    let e = score(&gt, &gt).unwrap_err();
    assert!(e.message.contains("id 1 twice in frame 1"), "{e}");
}
