//! IoU and plane geometry on hand-worked examples (each worked out in the comment beside it).

use throughline_core::geometry::{iou, BBox, Point, Polygon, Segment};

fn check_iou(a: [f64; 4], b: [f64; 4], expected: f64) {
    let (a, b) = (
        BBox::new(a[0], a[1], a[2], a[3]),
        BBox::new(b[0], b[1], b[2], b[3]),
    );
    let got = iou(&a, &b);
    assert!(
        (got - expected).abs() < 1e-12,
        "iou({a:?}, {b:?}) = {got}, expected {expected}"
    );
    assert!((iou(&b, &a) - got).abs() < 1e-15, "IoU must be symmetric");
}

#[test]
fn iou_hand_worked() {
    // Same box: 1.
    check_iou([0.0, 0.0, 10.0, 10.0], [0.0, 0.0, 10.0, 10.0], 1.0);
    // Shifted by half the width: overlap 5x10 = 50, union 100 + 100 - 50 = 150 -> 1/3.
    check_iou([0.0, 0.0, 10.0, 10.0], [5.0, 0.0, 10.0, 10.0], 1.0 / 3.0);
    // Quarter overlap: 5x5 = 25, union 175 -> 1/7.
    check_iou([0.0, 0.0, 10.0, 10.0], [5.0, 5.0, 10.0, 10.0], 25.0 / 175.0);
    // One inside the other: 4x4 = 16 inside 10x10 -> 16/100.
    check_iou([0.0, 0.0, 10.0, 10.0], [3.0, 3.0, 4.0, 4.0], 0.16);
    // Touching edges: no area in common.
    check_iou([0.0, 0.0, 10.0, 10.0], [10.0, 0.0, 10.0, 10.0], 0.0);
    // Far apart.
    check_iou([0.0, 0.0, 10.0, 10.0], [50.0, 50.0, 5.0, 5.0], 0.0);
    // Different shapes: 20x10 and 10x20 crossing at the centre: overlap 10x10 = 100,
    // union 200 + 200 - 100 = 300 -> 1/3.
    check_iou([0.0, 5.0, 20.0, 10.0], [5.0, 0.0, 10.0, 20.0], 1.0 / 3.0);
    // Fractional pixels: [0,0,2.5,2] and [1.5,1,2,2]: overlap 1.0 x 1.0 = 1, union 5 + 4 - 1 = 8.
    check_iou([0.0, 0.0, 2.5, 2.0], [1.5, 1.0, 2.0, 2.0], 1.0 / 8.0);
}

#[test]
fn degenerate_boxes_give_zero_never_nan() {
    check_iou([0.0, 0.0, 0.0, 0.0], [0.0, 0.0, 0.0, 0.0], 0.0);
    check_iou([0.0, 0.0, 0.0, 10.0], [0.0, 0.0, 10.0, 10.0], 0.0);
    check_iou([0.0, 0.0, -5.0, 10.0], [-5.0, 0.0, 10.0, 10.0], 0.0);
    check_iou([0.0, 0.0, f64::NAN, 10.0], [0.0, 0.0, 10.0, 10.0], 0.0);
    check_iou([0.0, 0.0, f64::INFINITY, 10.0], [0.0, 0.0, 10.0, 10.0], 0.0);
}

#[test]
fn anchors_of_a_box() {
    let b = BBox::new(10.0, 20.0, 30.0, 40.0);
    assert_eq!(b.centre(), Point::new(25.0, 40.0));
    assert_eq!(b.bottom_centre(), Point::new(25.0, 60.0));
    assert_eq!(BBox::from_centre(25.0, 40.0, 30.0, 40.0), b);
}

#[test]
fn side_of_a_segment_with_y_down() {
    // Looking from (0,0) to (10,0) on screen (y down), the point (5,5) is below: the right-hand side.
    let s = Segment::new(Point::new(0.0, 0.0), Point::new(10.0, 0.0));
    assert!(s.side(&Point::new(5.0, 5.0)) > 0.0);
    assert!(s.side(&Point::new(5.0, -5.0)) < 0.0);
    assert_eq!(s.side(&Point::new(5.0, 0.0)), 0.0);
    assert_eq!(s.signed_distance(&Point::new(3.0, 4.0)), 4.0);
    // The path (5,-5) -> (5,5) meets it half way.
    assert_eq!(
        s.intersect_param(&Point::new(5.0, -5.0), &Point::new(5.0, 5.0)),
        Some(0.5)
    );
    assert_eq!(
        s.intersect_param(&Point::new(15.0, -5.0), &Point::new(15.0, 5.0)),
        None
    );
}

#[test]
fn polygon_area_and_inside() {
    let square = Polygon::new(vec![
        Point::new(0.0, 0.0),
        Point::new(10.0, 0.0),
        Point::new(10.0, 10.0),
        Point::new(0.0, 10.0),
    ]);
    assert_eq!(square.area(), 100.0);
    assert!(square.contains(&Point::new(5.0, 5.0)));
    assert!(!square.contains(&Point::new(15.0, 5.0)));
    // An L shape of area 3 unit squares: the notch is outside.
    let l = Polygon::new(vec![
        Point::new(0.0, 0.0),
        Point::new(2.0, 0.0),
        Point::new(2.0, 1.0),
        Point::new(1.0, 1.0),
        Point::new(1.0, 2.0),
        Point::new(0.0, 2.0),
    ]);
    assert_eq!(l.area(), 3.0);
    assert!(!l.contains(&Point::new(1.5, 1.5)));
    assert!(l.contains(&Point::new(0.5, 1.5)));
    assert_eq!(Polygon::new(vec![Point::new(0.0, 0.0)]).area(), 0.0);
}
