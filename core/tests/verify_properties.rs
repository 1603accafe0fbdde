//! Property tests of the exact check.
//!
//! The outside fact used here is the definition of equivalence [common practice]: permuting and
//! negating rows and columns maps Hadamard matrices to Hadamard matrices, and non-Hadamard ones
//! to non-Hadamard ones. And a single flipped entry of a Hadamard matrix always breaks
//! orthogonality of its row with every other row [derived: the inner product changes by ±2].

use hadamard_core::repair::single_wrong_entry;
use hadamard_core::verify::{is_hadamard, verify};
use hadamard_core::Matrix;
use proptest::prelude::*;
use proptest::strategy::ValueTree;

fn sylvester(k: u32) -> Matrix {
    let n = 1usize << k;
    Matrix::from_fn(n, n, |i, j| (i & j).count_ones() % 2 == 1)
}

/// Applies row and column permutations and negations.
fn transform(m: &Matrix, rp: &[usize], cp: &[usize], rneg: &[bool], cneg: &[bool]) -> Matrix {
    Matrix::from_fn(m.rows(), m.cols(), |i, j| {
        m.is_negative(rp[i], cp[j]) ^ rneg[i] ^ cneg[j]
    })
}

fn perm_and_signs(
    n: usize,
) -> impl Strategy<Value = (Vec<usize>, Vec<usize>, Vec<bool>, Vec<bool>)> {
    (
        Just((0..n).collect::<Vec<_>>()).prop_shuffle(),
        Just((0..n).collect::<Vec<_>>()).prop_shuffle(),
        proptest::collection::vec(any::<bool>(), n),
        proptest::collection::vec(any::<bool>(), n),
    )
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn equivalence_keeps_the_verdict_hadamard(k in 0u32..8, seed in any::<u64>()) {
        let h = sylvester(k);
        let n = h.rows();
        let mut runner = proptest::test_runner::TestRunner::new_with_rng(
            Default::default(),
            proptest::test_runner::TestRng::from_seed(proptest::test_runner::RngAlgorithm::ChaCha, &seed_bytes(seed)),
        );
        let (rp, cp, rn, cn) = perm_and_signs(n).new_tree(&mut runner).unwrap().current();
        let g = transform(&h, &rp, &cp, &rn, &cn);
        prop_assert!(is_hadamard(&g));
        prop_assert!(verify(&g).hadamard);
    }

    #[test]
    fn equivalence_keeps_the_verdict_not_hadamard(k in 2u32..7, r in 0usize..64, c in 0usize..64, seed in any::<u64>()) {
        let mut h = sylvester(k);
        let n = h.rows();
        h.flip(r % n, c % n);
        let mut runner = proptest::test_runner::TestRunner::new_with_rng(
            Default::default(),
            proptest::test_runner::TestRng::from_seed(proptest::test_runner::RngAlgorithm::ChaCha, &seed_bytes(seed)),
        );
        let (rp, cp, rn, cn) = perm_and_signs(n).new_tree(&mut runner).unwrap().current();
        let g = transform(&h, &rp, &cp, &rn, &cn);
        let rep = verify(&g);
        prop_assert!(!rep.hadamard);
        prop_assert_eq!(rep.failing_pairs_total, verify(&h).failing_pairs_total);
    }

    #[test]
    fn a_random_single_flip_is_detected_and_located(k in 2u32..9, r in 0usize..256, c in 0usize..256) {
        let h = sylvester(k);
        let n = h.rows();
        let (r, c) = (r % n, c % n);
        let mut bad = h.clone();
        bad.flip(r, c);
        let rep = verify(&bad);
        prop_assert!(!rep.hadamard);
        prop_assert_eq!(rep.failing_pairs_total, (n - 1) as u64);
        let fix = single_wrong_entry(&bad, &rep).expect("a single flip is explained");
        prop_assert_eq!((fix.row, fix.col), (r, c));
        prop_assert_eq!(fix.corrected.matrix(), &h);
    }
}

fn seed_bytes(seed: u64) -> [u8; 32] {
    let mut b = [0u8; 32];
    for (k, chunk) in b.chunks_mut(8).enumerate() {
        chunk.copy_from_slice(
            &(seed
                .wrapping_mul(0x9e37_79b9_7f4a_7c15)
                .wrapping_add(k as u64))
            .to_le_bytes(),
        );
    }
    b
}
