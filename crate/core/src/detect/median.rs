//! Per-pixel medians of a stack of pictures (the first background and each pixel's usual
//! deviation), a run of pixels at a time: each median is found bit by bit, from the highest, as the
//! largest value that enough of the pictures reach, counted for the whole run at once. The loops go
//! along rows and vectorise, where sorting each pixel's values one pixel at a time does not.

/// Pixels looked at together.
const RUN: usize = 64;

/// At each pixel of `out`, from pixel `i0` of the pictures `planes` on: the median (the upper of
/// the middle two, the value a sort puts at index `len / 2`) of the pictures' values there, or of
/// their distances from `around`'s value at that pixel when given (`around` as long as `out`).
/// With no pictures, `out` is left as it is.
pub(super) fn medians_into(planes: &[&[u8]], i0: usize, around: Option<&[u8]>, out: &mut [u8]) {
    let n = planes.len();
    if n == 0 {
        return;
    }
    // The value at index n / 2 of the sorted values is the largest that n - n / 2 of them reach.
    let need = n - n / 2;
    let zero = [0u8; RUN];
    for (k, out) in out.chunks_mut(RUN).enumerate() {
        let (start, len) = (i0 + k * RUN, out.len());
        // Distances from zero are the values themselves.
        let from = around.map_or(&zero[..len], |a| &a[k * RUN..k * RUN + len]);
        let mut value = [0u8; RUN];
        for bit in (0..8).rev() {
            let mut try_value = value;
            try_value.iter_mut().for_each(|v| *v |= 1 << bit);
            let mut reach = [0u16; RUN];
            for plane in planes {
                let px = &plane[start..start + len];
                for ((r, (&x, &f)), &t) in reach.iter_mut().zip(px.iter().zip(from)).zip(&try_value)
                {
                    *r += u16::from(x.abs_diff(f) >= t);
                }
            }
            for ((v, &r), &t) in value.iter_mut().zip(&reach).zip(&try_value) {
                if usize::from(r) >= need {
                    *v = t;
                }
            }
        }
        out.copy_from_slice(&value[..len]);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The median as the definition gives it: sort, take index len / 2 (common practice; the
    /// upper of the middle two for an even count).
    fn by_sorting(mut values: Vec<u8>) -> u8 {
        values.sort_unstable();
        values[values.len() / 2]
    }

    /// A reproducible stream of bytes (xorshift), some runs of it clustered as pictures are.
    fn bytes(len: usize, seed: u64) -> Vec<u8> {
        let mut s = seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1;
        (0..len)
            .map(|i| {
                s ^= s << 13;
                s ^= s >> 7;
                s ^= s << 17;
                if i % 3 == 0 {
                    120 + (s % 9) as u8
                } else {
                    (s >> 24) as u8
                }
            })
            .collect()
    }

    #[test]
    fn the_medians_of_values_and_of_distances_are_those_of_a_sort() {
        for n in [1, 2, 3, 4, 7, 25, 47, 64, 70] {
            let len = 200;
            let pictures: Vec<Vec<u8>> = (0..n).map(|p| bytes(len, (n * 100 + p) as u64)).collect();
            let planes: Vec<&[u8]> = pictures.iter().map(Vec::as_slice).collect();
            let i0 = 13;
            let mut mid = vec![0u8; len - i0 - 5];
            medians_into(&planes, i0, None, &mut mid);
            let mut spread = vec![0u8; mid.len()];
            medians_into(&planes, i0, Some(&mid), &mut spread);
            for (k, (&m, &d)) in mid.iter().zip(&spread).enumerate() {
                let at: Vec<u8> = planes.iter().map(|p| p[i0 + k]).collect();
                assert_eq!(m, by_sorting(at.clone()), "{n} pictures, pixel {k}");
                let off = at.iter().map(|v| v.abs_diff(m)).collect();
                assert_eq!(d, by_sorting(off), "{n} pictures, pixel {k}");
            }
        }
    }

    #[test]
    fn extremes_and_no_pictures() {
        let (lo, hi) = (vec![0u8; 70], vec![255u8; 70]);
        let mut out = vec![7u8; 70];
        medians_into(&[&hi, &lo, &hi], 0, None, &mut out);
        assert_eq!(out, hi);
        medians_into(&[&hi, &lo], 0, Some(&lo), &mut out);
        assert_eq!(out, hi, "the upper of the middle two");
        medians_into(&[], 0, None, &mut out);
        assert_eq!(out, hi, "left as it was");
    }
}
