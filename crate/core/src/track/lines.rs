//! Tracks' boxes as benchmark text lines, `frame,id,x,y,w,h,score,-1,-1,-1`, written fast: this
//! is most of the work of `throughline track -o OUT.txt` after the tracking itself.

use crate::track::TrackBox;

/// Benchmark text lines of tracks' boxes, given in order and written a piece at a time: each line
/// is written in place in a buffer of fixed size, which goes out when nearly full.
pub struct BenchmarkLines<W: std::io::Write> {
    out: W,
    buf: Box<[u8]>,
    len: usize,
}

impl<W: std::io::Write> BenchmarkLines<W> {
    const PIECE: usize = 1 << 16;

    pub fn new(out: W) -> Self {
        Self {
            out,
            buf: vec![0; Self::PIECE + Row::MOST].into_boxed_slice(),
            len: 0,
        }
    }

    /// The line of box `b` of track `id` in `frame`.
    pub fn push(&mut self, frame: u32, id: u32, b: &TrackBox) -> std::io::Result<()> {
        if !Row::write(&mut self.buf[self.len..], frame, id, b, &mut self.len) {
            let mut line = Vec::new();
            push_line(&mut line, frame, id, b);
            self.flush()?;
            self.out.write_all(&line)?;
        }
        if self.len >= Self::PIECE {
            self.flush()?;
        }
        Ok(())
    }

    /// Writes what is left in the buffer.
    pub fn flush(&mut self) -> std::io::Result<()> {
        self.out.write_all(&self.buf[..self.len])?;
        self.len = 0;
        Ok(())
    }
}

/// The line of any box, however large or odd its numbers: [`Row`] writes the same bytes faster
/// for the boxes it takes.
fn push_line(buf: &mut Vec<u8>, frame: u32, id: u32, b: &TrackBox) {
    push_digits(buf, u64::from(frame), 0);
    buf.push(b',');
    push_digits(buf, u64::from(id), 0);
    buf.push(b',');
    for v in [b.bbox.x, b.bbox.y, b.bbox.w, b.bbox.h] {
        write_decimal(buf, v, BOX_PLACES);
        buf.push(b',');
    }
    write_decimal(buf, written_score(b), SCORE_PLACES);
    buf.extend_from_slice(b",-1,-1,-1\n");
}

/// Decimal places the tracks files keep: box coordinates (hundredths of a pixel) and scores.
pub(crate) const BOX_PLACES: u32 = 2;
pub(crate) const SCORE_PLACES: u32 = 4;

/// The score a line gives `b`: 0 marks a predicted box (`count` reads it back so), so a seen box
/// whose score would round to 0 is written as the least score above it, 0.0001.
fn written_score(b: &TrackBox) -> f64 {
    if b.observed && round(b.score, SCORE_PLACES as i32) == 0.0 {
        0.0001
    } else {
        b.score
    }
}

/// `v` rounded to `places` decimals, with no negative zero.
pub(crate) fn round(v: f64, places: i32) -> f64 {
    let p = 10f64.powi(places);
    let r = (v * p).round() / p;
    if r == 0.0 {
        0.0
    } else {
        r
    }
}

/// Writes `v` rounded to `places` decimals, without trailing zeros (`12.5`, `3`, `-0.25`): the same
/// text as formatting [`round`]`(v, places)`, written without the general float formatter.
pub fn write_decimal(out: &mut Vec<u8>, v: f64, places: u32) {
    let scale = 10u64.pow(places);
    let scaled = (v.abs() * scale as f64).round();
    if !v.is_finite() || scaled >= 1e15 {
        out.extend_from_slice(round(v, places as i32).to_string().as_bytes());
        return;
    }
    let scaled = scaled as u64;
    if scaled == 0 {
        out.push(b'0');
        return;
    }
    if v < 0.0 {
        out.push(b'-');
    }
    push_digits(out, scaled / scale, 0);
    let mut frac = scaled % scale;
    if frac > 0 {
        let mut digits = places as usize;
        while frac.is_multiple_of(10) {
            frac /= 10;
            digits -= 1;
        }
        out.push(b'.');
        push_digits(out, frac, digits);
    }
}

/// Appends the decimal digits of `n`, padded with leading zeros to at least `width` digits.
fn push_digits(out: &mut Vec<u8>, n: u64, width: usize) {
    let mut digits = [b'0'; 20];
    let start = digits_into(&mut digits, n);
    out.extend_from_slice(&digits[start.min(20 - width.min(20))..]);
}

/// The two digits of every number below 100, one after another.
const PAIRS: [u8; 200] = {
    let mut p = [0u8; 200];
    let mut k = 0;
    while k < 100 {
        p[2 * k] = b'0' + (k / 10) as u8;
        p[2 * k + 1] = b'0' + (k % 10) as u8;
        k += 1;
    }
    p
};

/// Writes the digits of `n` at the end of `buf`, two at a time; returns where they start.
fn digits_into(buf: &mut [u8; 20], mut n: u64) -> usize {
    let mut at = buf.len();
    while n >= 100 {
        let pair = (n % 100) as usize * 2;
        n /= 100;
        at -= 2;
        buf[at..at + 2].copy_from_slice(&PAIRS[pair..pair + 2]);
    }
    if n >= 10 {
        let pair = n as usize * 2;
        at -= 2;
        buf[at..at + 2].copy_from_slice(&PAIRS[pair..pair + 2]);
    } else {
        at -= 1;
        buf[at] = b'0' + n as u8;
    }
    at
}

/// `x` rounded half away from zero, as `x.round()` gives it, for `0 <= x < 2^52`: the whole part
/// by truncation and the fraction measured exactly (`x - trunc(x)` loses nothing in that range),
/// without the library call `round` becomes where the processor has no rounding instruction.
fn round_small(x: f64) -> u64 {
    let whole = x as u64;
    whole + u64::from(x - whole as f64 >= 0.5)
}

/// One line written in place, for a box whose numbers are all in the common range (pixel
/// coordinates, scores): the same bytes as [`push_line`].
struct Row<'a> {
    bytes: &'a mut [u8],
    at: usize,
}

impl Row<'_> {
    /// Two 10-digit numbers, four of at most 17 characters and one of 16, commas and the tail.
    const MOST: usize = 128;
    /// Below these, a coordinate (2 places) or a score (4 places) scaled is under 10^14: exact in
    /// [`round_small`], and written as [`write_decimal`] writes it.
    const MOST_COORDINATE: f64 = 1e12;
    const MOST_SCORE: f64 = 1e10;

    /// Writes the line at the start of `bytes` (at least [`Self::MOST`] long) and adds its
    /// length to `len`; false, writing nothing, for a box with a number out of the common range.
    fn write(bytes: &mut [u8], frame: u32, id: u32, b: &TrackBox, len: &mut usize) -> bool {
        let coordinates = [b.bbox.x, b.bbox.y, b.bbox.w, b.bbox.h];
        // A NaN or an infinity fails these tests too.
        let common = |v: f64, most: f64| v.abs() < most;
        if !coordinates
            .iter()
            .all(|&v| common(v, Self::MOST_COORDINATE))
            || !common(written_score(b), Self::MOST_SCORE)
        {
            return false;
        }
        let mut row = Row { bytes, at: 0 };
        row.digits(u64::from(frame));
        row.byte(b',');
        row.digits(u64::from(id));
        row.byte(b',');
        for v in coordinates {
            row.decimal::<2>(v);
            row.byte(b',');
        }
        row.decimal::<4>(written_score(b));
        row.put(b",-1,-1,-1\n");
        *len += row.at;
        true
    }

    fn byte(&mut self, b: u8) {
        self.bytes[self.at] = b;
        self.at += 1;
    }

    fn put<const N: usize>(&mut self, text: &[u8; N]) {
        self.bytes[self.at..self.at + N].copy_from_slice(text);
        self.at += N;
    }

    /// The two digits of `n`, below 100.
    fn pair(&mut self, n: u64) {
        let pair = n as usize * 2;
        self.bytes[self.at] = PAIRS[pair];
        self.bytes[self.at + 1] = PAIRS[pair + 1];
        self.at += 2;
    }

    /// The digits of `n`.
    fn digits(&mut self, n: u64) {
        let width = match n {
            0..=9 => 1,
            10..=99 => 2,
            100..=999 => 3,
            1000..=9999 => 4,
            _ => n.ilog10() as usize + 1,
        };
        self.fixed(n, width);
    }

    /// The last `width` digits of `n` (with leading zeros where `n` has fewer).
    fn fixed(&mut self, mut n: u64, width: usize) {
        match width {
            1 => self.byte(b'0' + (n % 10) as u8),
            2 => self.pair(n % 100),
            3 => {
                self.byte(b'0' + (n / 100 % 10) as u8);
                self.pair(n % 100);
            }
            4 => {
                self.pair(n / 100 % 100);
                self.pair(n % 100);
            }
            _ => {
                for k in (self.at..self.at + width).rev() {
                    self.bytes[k] = b'0' + (n % 10) as u8;
                    n /= 10;
                }
                self.at += width;
            }
        }
    }

    /// [`write_decimal`] with `P` places, for `v` in the common range.
    fn decimal<const P: u32>(&mut self, v: f64) {
        let scale = 10u64.pow(P);
        let scaled = round_small(v.abs() * scale as f64);
        if scaled == 0 {
            self.byte(b'0');
            return;
        }
        if v < 0.0 {
            self.byte(b'-');
        }
        self.digits(scaled / scale);
        let mut frac = scaled % scale;
        if frac == 0 {
            return;
        }
        let mut width = P as usize;
        while frac.is_multiple_of(10) {
            frac /= 10;
            width -= 1;
        }
        self.byte(b'.');
        self.fixed(frac, width);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::geometry::BBox;
    use throughline_sim::rng::Rng;

    fn reference(frame: u32, id: u32, b: &TrackBox) -> Vec<u8> {
        let mut out = Vec::new();
        push_line(&mut out, frame, id, b);
        out
    }

    #[test]
    fn lines_written_in_place_are_those_written_the_general_way() {
        // Against the general writer (itself checked against Rust's float formatting in
        // tests/tracking.rs): random values of every size, halves on the rounding edge,
        // negatives, zeros, infinities and NaN.
        let mut rng = Rng::new(21);
        let (mut got, mut want) = (Vec::new(), Vec::new());
        let mut lines = BenchmarkLines::new(&mut got);
        let edges = [
            0.0,
            -0.0,
            0.005,
            0.015,
            0.125,
            2.5,
            0.49999999999999994,
            1e12,
            1e10,
            99.995,
            -0.004,
            f64::NAN,
            f64::INFINITY,
            1e300,
            4503599627370495.5,
        ];
        for case in 0..200_000 {
            let mut value = |k: usize| match (case + k) % 5 {
                0 => edges[rng.below(edges.len())] * if rng.chance(0.5) { -1.0 } else { 1.0 },
                1 => rng.range(-2000.0, 2000.0),
                2 => (rng.range(-2e5, 2e5)).round() / 200.0,
                3 => rng.range(-1.0, 1.0) * 10f64.powi(rng.below(16) as i32),
                _ => rng.range(0.0, 1.0),
            };
            let b = TrackBox {
                frame: 1,
                bbox: BBox {
                    x: value(0),
                    y: value(1),
                    w: value(2),
                    h: value(3),
                },
                score: value(4),
                observed: true,
            };
            let (frame, id) = (rng.below(1 << 31) as u32, rng.below(1 << 20) as u32);
            want.extend(reference(frame, id, &b));
            lines.push(frame, id, &b).unwrap();
        }
        lines.flush().unwrap();
        drop(lines);
        // Line by line, so that a difference names its line.
        let (got, want) = (
            String::from_utf8(got).unwrap(),
            String::from_utf8(want).unwrap(),
        );
        for (k, (a, b)) in got.lines().zip(want.lines()).enumerate() {
            assert_eq!(a, b, "line {k}");
        }
        assert_eq!(got.len(), want.len());
    }

    #[test]
    fn rounding_small_numbers_is_the_library_rounding() {
        let mut rng = Rng::new(5);
        for _ in 0..100_000 {
            let x = match rng.below(3) {
                0 => rng.range(0.0, 1e6),
                1 => (rng.range(0.0, 1e6)).floor() + 0.5,
                _ => rng.range(0.0, 4.5e15),
            };
            assert_eq!(round_small(x), x.round() as u64, "{x}");
        }
        for x in [0.0, 0.49999999999999994, 0.5, 1.5, 2.5, 4503599627370495.5] {
            assert_eq!(round_small(x), x.round() as u64, "{x}");
        }
    }
}
