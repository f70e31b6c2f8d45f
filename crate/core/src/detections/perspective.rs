//! The expected size of one person at each row of a fixed camera's picture: the detector's
//! perspective rule, carried with the boxes it found so that the tracker can tell a box two
//! people wide from one (see `track::merges`).

/// The expected size of one upright person (or one of the objects to count) whose feet are at a
/// given row. Pixels; rows counted from the top of the picture (y down).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Perspective {
    /// Expected height of a person standing at the top row and at the bottom row; in between it
    /// is interpolated in a straight line.
    pub far_height: f64,
    pub near_height: f64,
    /// Rows of the picture.
    pub picture_height: f64,
    /// A person's width as a fraction of their height.
    pub width_ratio: f64,
}

impl Perspective {
    /// Expected height (pixels) of a person whose feet are at row `y`.
    pub fn height_at(&self, y: f64) -> f64 {
        let t = y / self.picture_height.max(1.0);
        self.far_height + (self.near_height - self.far_height) * t
    }

    /// Expected width (pixels) of a person whose feet are at row `y`.
    pub fn width_at(&self, y: f64) -> f64 {
        self.height_at(y) * self.width_ratio
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn interpolates_between_the_two_heights() {
        let p = Perspective {
            far_height: 34.0,
            near_height: 91.0,
            picture_height: 360.0,
            width_ratio: 0.35,
        };
        assert_eq!(p.height_at(0.0), 34.0);
        assert_eq!(p.height_at(360.0), 91.0);
        assert!((p.height_at(180.0) - 62.5).abs() < 1e-12);
        assert!((p.width_at(360.0) - 31.85).abs() < 1e-12);
    }
}
