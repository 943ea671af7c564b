//! LSD radix sort for u64 keys: only as many passes as the largest key has significant bits.
//!
//! Kruskal's keys pack (cost, edge id) into few significant bits, so two to four passes of 8 bytes
//! per key beat a comparison sort several-fold.

/// Sorts `keys` ascending.
pub fn sort_u64(keys: &mut Vec<u64>) {
    let n = keys.len();
    if n < 256 {
        keys.sort_unstable();
        return;
    }
    let max = keys.iter().copied().max().unwrap_or(0);
    let bits = 64 - max.leading_zeros();
    if bits == 0 {
        return;
    }
    let passes = bits.div_ceil(12);
    let width = bits.div_ceil(passes);
    let mask = (1u64 << width) - 1;
    let mut buf = vec![0u64; n];
    let mut counts = vec![0usize; 1 << width];
    for pass in 0..passes {
        let shift = pass * width;
        counts.iter_mut().for_each(|c| *c = 0);
        for &k in keys.iter() {
            counts[((k >> shift) & mask) as usize] += 1;
        }
        let mut sum = 0;
        for c in counts.iter_mut() {
            let here = *c;
            *c = sum;
            sum += here;
        }
        for &k in keys.iter() {
            let d = ((k >> shift) & mask) as usize;
            buf[counts[d]] = k;
            counts[d] += 1;
        }
        std::mem::swap(keys, &mut buf);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #[test]
        fn sorts_like_the_standard_library(mut v in proptest::collection::vec(any::<u64>(), 0..2000), shift in 0u32..60) {
            for x in v.iter_mut() { *x >>= shift; }
            let mut want = v.clone();
            want.sort_unstable();
            sort_u64(&mut v);
            prop_assert_eq!(v, want);
        }
    }
}
