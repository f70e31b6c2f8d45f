//! Plane geometry in image pixels: boxes, points, segments and polygons.
//!
//! Image coordinates: x to the right, y **down**, origin at the top-left pixel corner. Degenerate shapes
//! give well-defined values (an empty box has IoU 0 with everything), never NaN and never an error.

use serde::{Deserialize, Serialize};

/// An axis-aligned box in pixels: top-left corner `(x, y)`, width `w`, height `h`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct BBox {
    pub x: f64,
    pub y: f64,
    pub w: f64,
    pub h: f64,
}

impl BBox {
    /// A box from its top-left corner and size, in pixels.
    pub const fn new(x: f64, y: f64, w: f64, h: f64) -> Self {
        Self { x, y, w, h }
    }

    /// A box from its centre and size, in pixels.
    pub fn from_centre(cx: f64, cy: f64, w: f64, h: f64) -> Self {
        Self::new(cx - w / 2.0, cy - h / 2.0, w, h)
    }

    /// Area in square pixels; zero for empty or inverted boxes.
    pub fn area(&self) -> f64 {
        if self.is_empty() {
            0.0
        } else {
            self.w * self.h
        }
    }

    /// True when the box has no area (zero, negative or non-finite size).
    pub fn is_empty(&self) -> bool {
        !(self.w > 0.0 && self.h > 0.0 && self.w.is_finite() && self.h.is_finite())
    }

    /// Centre of the box.
    pub fn centre(&self) -> Point {
        Point::new(self.x + self.w / 2.0, self.y + self.h / 2.0)
    }

    /// Bottom-centre of the box: where a standing person or a wheel meets the ground.
    pub fn bottom_centre(&self) -> Point {
        Point::new(self.x + self.w / 2.0, self.y + self.h)
    }

    /// Area of the overlap of two boxes, in square pixels.
    pub fn intersection(&self, other: &BBox) -> f64 {
        if self.is_empty() || other.is_empty() {
            return 0.0;
        }
        let w = (self.x + self.w).min(other.x + other.w) - self.x.max(other.x);
        let h = (self.y + self.h).min(other.y + other.h) - self.y.max(other.y);
        if w > 0.0 && h > 0.0 {
            w * h
        } else {
            0.0
        }
    }

    /// Intersection over union, in `[0, 1]`. Empty boxes give 0.
    pub fn iou(&self, other: &BBox) -> f64 {
        let inter = self.intersection(other);
        if inter <= 0.0 {
            return 0.0;
        }
        let union = self.area() + other.area() - inter;
        if union > 0.0 {
            (inter / union).clamp(0.0, 1.0)
        } else {
            0.0
        }
    }
}

/// Intersection over union of two boxes; see [`BBox::iou`].
pub fn iou(a: &BBox, b: &BBox) -> f64 {
    a.iou(b)
}

/// A point in image pixels.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Point {
    pub x: f64,
    pub y: f64,
}

impl Point {
    pub const fn new(x: f64, y: f64) -> Self {
        Self { x, y }
    }

    pub fn distance(&self, other: &Point) -> f64 {
        (self.x - other.x).hypot(self.y - other.y)
    }
}

/// A straight segment from `a` to `b`, in image pixels.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Segment {
    pub a: Point,
    pub b: Point,
}

impl Segment {
    pub const fn new(a: Point, b: Point) -> Self {
        Self { a, b }
    }

    pub fn length(&self) -> f64 {
        self.a.distance(&self.b)
    }

    /// The 2-D cross product `(b - a) x (q - a)`. With image y pointing down, it is positive when `q`
    /// lies on the right-hand side of the segment as seen on screen looking from `a` to `b`.
    pub fn side(&self, q: &Point) -> f64 {
        (self.b.x - self.a.x) * (q.y - self.a.y) - (self.b.y - self.a.y) * (q.x - self.a.x)
    }

    /// Signed distance of `q` from the segment's supporting line, in pixels (positive on the right).
    /// Zero for a zero-length segment.
    pub fn signed_distance(&self, q: &Point) -> f64 {
        let len = self.length();
        if len > 0.0 {
            self.side(q) / len
        } else {
            0.0
        }
    }

    /// Distance in pixels from `q` to the nearest point of the segment (not its supporting line).
    pub fn distance_to(&self, q: &Point) -> f64 {
        let (dx, dy) = (self.b.x - self.a.x, self.b.y - self.a.y);
        let len2 = dx * dx + dy * dy;
        if len2 == 0.0 {
            return self.a.distance(q);
        }
        let t = (((q.x - self.a.x) * dx + (q.y - self.a.y) * dy) / len2).clamp(0.0, 1.0);
        Point::new(self.a.x + t * dx, self.a.y + t * dy).distance(q)
    }

    /// Where the segment `p -> q` meets this one, as the fraction `t` along `p -> q` (0 at `p`, 1 at
    /// `q`); `None` when they do not meet or are parallel. Touching an end point counts as meeting.
    pub fn intersect_param(&self, p: &Point, q: &Point) -> Option<f64> {
        let r = (q.x - p.x, q.y - p.y);
        let s = (self.b.x - self.a.x, self.b.y - self.a.y);
        let denom = r.0 * s.1 - r.1 * s.0;
        if denom == 0.0 {
            return None;
        }
        let ap = (self.a.x - p.x, self.a.y - p.y);
        let t = (ap.0 * s.1 - ap.1 * s.0) / denom;
        let u = (ap.0 * r.1 - ap.1 * r.0) / denom;
        ((0.0..=1.0).contains(&t) && (0.0..=1.0).contains(&u)).then_some(t)
    }
}

/// A simple polygon in image pixels, given by its corners in order (either winding).
#[derive(Debug, Clone, PartialEq)]
pub struct Polygon {
    pub corners: Vec<Point>,
}

impl Polygon {
    pub fn new(corners: Vec<Point>) -> Self {
        Self { corners }
    }

    /// Area in square pixels (shoelace formula); zero for fewer than three corners.
    pub fn area(&self) -> f64 {
        let n = self.corners.len();
        if n < 3 {
            return 0.0;
        }
        let twice: f64 = (0..n)
            .map(|i| {
                let (p, q) = (self.corners[i], self.corners[(i + 1) % n]);
                p.x * q.y - q.x * p.y
            })
            .sum();
        twice.abs() / 2.0
    }

    /// Two edges that cross each other (edge `i` runs from corner `i` to the next), when the
    /// corners are not listed in order around the area; `None` for a simple polygon. Edges that
    /// share a corner are not compared.
    pub fn crossing_edges(&self) -> Option<(usize, usize)> {
        let n = self.corners.len();
        let edge = |i: usize| Segment::new(self.corners[i], self.corners[(i + 1) % n]);
        for i in 0..n {
            for j in i + 2..n {
                if i == 0 && j == n - 1 {
                    continue;
                }
                let (e, f) = (edge(i), edge(j));
                if f.intersect_param(&e.a, &e.b).is_some() {
                    return Some((i, j));
                }
            }
        }
        None
    }

    /// Distance in pixels from `q` to the nearest edge.
    pub fn distance_to_edge(&self, q: &Point) -> f64 {
        let n = self.corners.len();
        (0..n)
            .map(|i| Segment::new(self.corners[i], self.corners[(i + 1) % n]).distance_to(q))
            .fold(f64::INFINITY, f64::min)
    }

    /// Whether `q` is inside (even-odd rule). Points exactly on an edge may fall either way.
    pub fn contains(&self, q: &Point) -> bool {
        let n = self.corners.len();
        if n < 3 {
            return false;
        }
        let mut inside = false;
        let mut j = n - 1;
        for i in 0..n {
            let (pi, pj) = (self.corners[i], self.corners[j]);
            if (pi.y > q.y) != (pj.y > q.y) {
                let x_at = pj.x + (q.y - pj.y) / (pi.y - pj.y) * (pi.x - pj.x);
                if q.x < x_at {
                    inside = !inside;
                }
            }
            j = i;
        }
        inside
    }
}
