//! LSD radix sort for u64 keys: only as many passes as the sorted bits need.
//!
//! Kruskal's keys pack (cost, edge id) into few significant bits, so two to four passes of 8 bytes
//! per key beat a comparison sort several-fold. The sort is stable, so keys already in id order need
//! only their cost bits sorted.

/// Stable sort of the concatenation of `parts` by the bit field `lo..hi` alone, into `out`.
///
/// `out` and `scratch` are cleared and reused, so a caller sorting again and again touches no
/// fresh memory (on large arrays, first touches of fresh pages cost as much as the sort).
pub fn sort_parts_by_bits(
    parts: &[&[u64]],
    lo: u32,
    hi: u32,
    out: &mut Vec<u64>,
    scratch: &mut Vec<u64>,
) {
    let n: usize = parts.iter().map(|p| p.len()).sum();
    out.clear();
    let bits = hi.saturating_sub(lo);
    if bits == 0 || n < 256 {
        for p in parts {
            out.extend_from_slice(p);
        }
        if bits > 0 {
            let mask = u64::MAX >> (64 - bits);
            out.sort_by_key(|&k| (k >> lo) & mask);
        }
        return;
    }
    let passes = bits.div_ceil(11);
    let width = bits.div_ceil(passes);
    let mut counts = vec![0usize; 1 << width];
    out.resize(n, 0);
    scratch.clear();
    scratch.resize(if passes > 1 { n } else { 0 }, 0);
    let scatter = |src: &[&[u64]], dst: &mut [u64], shift: u32, counts: &mut [usize]| -> bool {
        // The last digit may be narrower: bits at or above `hi` must not take part.
        let mask = (1u64 << width.min(hi - shift)) - 1;
        counts.iter_mut().for_each(|c| *c = 0);
        for p in src {
            for &k in p.iter() {
                counts[((k >> shift) & mask) as usize] += 1;
            }
        }
        if src.len() == 1 && counts.contains(&n) {
            return false; // every key has the same digit: nothing would move
        }
        let mut sum = 0;
        for c in counts.iter_mut() {
            let here = *c;
            *c = sum;
            sum += here;
        }
        for p in src {
            for &k in p.iter() {
                let d = ((k >> shift) & mask) as usize;
                dst[counts[d]] = k;
                counts[d] += 1;
            }
        }
        true
    };
    scatter(parts, &mut out[..], lo, &mut counts);
    let mut in_out = true; // which buffer holds the keys sorted so far
    for pass in 1..passes {
        let shift = lo + pass * width;
        let moved = if in_out {
            scatter(&[&out[..]], &mut scratch[..], shift, &mut counts)
        } else {
            scatter(&[&scratch[..]], &mut out[..], shift, &mut counts)
        };
        in_out ^= moved;
    }
    if !in_out {
        std::mem::swap(out, scratch);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #[test]
        fn sorts_like_the_standard_library(v in proptest::collection::vec(any::<u64>(), 0..2000), shift in 0u32..60) {
            let v: Vec<u64> = v.into_iter().map(|x| x >> shift).collect();
            let mut want = v.clone();
            want.sort_unstable();
            let (mut out, mut scratch) = (Vec::new(), Vec::new());
            sort_parts_by_bits(&[&v], 0, 64, &mut out, &mut scratch);
            prop_assert_eq!(out, want);
        }

        #[test]
        fn field_sort_is_stable(v in proptest::collection::vec(any::<u64>(), 0..2000), lo in 0u32..40, width in 1u32..24) {
            let hi = (lo + width).min(64);
            let field = |k: u64| (k >> lo) & (u64::MAX >> (64 - (hi - lo)));
            let mut want = v.clone();
            want.sort_by_key(|&k| field(k)); // the standard library's sort_by_key is stable
            let (mut out, mut scratch) = (Vec::new(), Vec::new());
            sort_parts_by_bits(&[&v], lo, hi, &mut out, &mut scratch);
            prop_assert_eq!(out, want);
        }

        #[test]
        fn parts_sort_as_one(a in proptest::collection::vec(any::<u64>(), 0..700), b in proptest::collection::vec(any::<u64>(), 0..700), lo in 0u32..40, width in 1u32..30) {
            let hi = (lo + width).min(64);
            let field = |k: u64| (k >> lo) & (u64::MAX >> (64 - (hi - lo)));
            let mut want: Vec<u64> = a.iter().chain(&b).copied().collect();
            want.sort_by_key(|&k| field(k));
            let (mut out, mut scratch) = (vec![7], vec![9, 9]);
            sort_parts_by_bits(&[&a, &b], lo, hi, &mut out, &mut scratch);
            prop_assert_eq!(out, want);
        }
    }
}
