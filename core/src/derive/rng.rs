//! A small deterministic generator, so that a randomised run order can be recorded as one seed
//! and replayed anywhere.
//!
//! SplitMix64 (Steele, Lea and Flood, "Fast splittable pseudorandom number generators",
//! OOPSLA 2014): the state advances by the odd constant 0x9E3779B97F4A7C15 (2⁶⁴/φ), and each
//! output is the state passed through a 64-bit mixing function (two xor-shift-multiply rounds
//! and a final xor-shift). It is not cryptographic; it is here because it is short enough to
//! re-implement in a few lines in any language, which is what a reader checking a published
//! randomisation needs. [`SplitMix64::shuffle`] is Fisher–Yates (Durstenfeld's form, from the
//! last position down), drawing each index by rejection so every permutation is equally likely.
//!
//! The exact procedure, for re-implementation: for i = len−1 down to 1, draw j uniform in 0..=i
//! by taking outputs x until x < 2⁶⁴ − (2⁶⁴ mod (i+1)), setting j = x mod (i+1); swap items i, j.

/// The SplitMix64 generator.
#[derive(Clone, Debug)]
pub struct SplitMix64 {
    state: u64,
}

impl SplitMix64 {
    /// A generator whose first output depends only on `seed`.
    pub fn new(seed: u64) -> SplitMix64 {
        SplitMix64 { state: seed }
    }

    /// The next 64-bit output.
    pub fn next_u64(&mut self) -> u64 {
        self.state = self.state.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.state;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in `0..bound` (`bound` ≥ 1), by rejection of the top partial range.
    pub fn below(&mut self, bound: u64) -> u64 {
        let bound = bound.max(1);
        // 2⁶⁴ mod bound; outputs at or above 2⁶⁴ minus it are rejected, so the rest split evenly.
        let rest = bound.wrapping_neg() % bound;
        loop {
            let x = self.next_u64();
            if x <= u64::MAX - rest {
                return x % bound;
            }
        }
    }

    /// Shuffles `items` in place (Fisher–Yates from the top, as in the module docs).
    pub fn shuffle<T>(&mut self, items: &mut [T]) {
        for i in (1..items.len()).rev() {
            let j = self.below(i as u64 + 1) as usize;
            items.swap(i, j);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn matches_the_published_reference_outputs() {
        // The reference implementation (Vigna's splitmix64.c) from seed 0 starts with these.
        let mut g = SplitMix64::new(0);
        assert_eq!(g.next_u64(), 0xE220_A839_7B1D_CDAF);
        assert_eq!(g.next_u64(), 0x6E78_9E6A_A1B9_65F4);
    }

    #[test]
    fn shuffle_is_a_permutation_and_reproducible() {
        let mut a: Vec<usize> = (0..100).collect();
        let mut b = a.clone();
        SplitMix64::new(42).shuffle(&mut a);
        SplitMix64::new(42).shuffle(&mut b);
        assert_eq!(a, b);
        let mut s = a.clone();
        s.sort();
        assert_eq!(s, (0..100).collect::<Vec<_>>());
        assert_ne!(a, (0..100).collect::<Vec<_>>());
    }

    #[test]
    fn below_stays_in_range() {
        let mut g = SplitMix64::new(7);
        for bound in [1u64, 2, 3, 7, 1000, u64::MAX] {
            for _ in 0..100 {
                assert!(g.below(bound) < bound);
            }
        }
    }
}
