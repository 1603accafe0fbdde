//! The tests of the exact check: every kernel against a naive count, shares, properties.

use super::kernel::{tile, tile_scalar, T};
use super::*;

fn sylvester(k: u32) -> Matrix {
    let n = 1usize << k;
    Matrix::from_fn(n, n, |i, j| (i & j).count_ones() % 2 == 1)
}

/// Runs `f` with every kernel this CPU has, at the same time on threads of their own
/// (the kernel is a parameter, so they cannot race; one after another in wasm32, which
/// has no threads here), and prints which kernels ran and which are absent on this CPU.
fn each_kernel(f: impl Fn(Kernel) + Sync) {
    let (here, absent): (Vec<Kernel>, Vec<Kernel>) =
        Kernel::ALL.into_iter().partition(|k| k.is_available());
    if cfg!(target_arch = "wasm32") {
        here.iter().for_each(|&k| f(k));
    } else {
        std::thread::scope(|s| {
            for &k in &here {
                let f = &f;
                s.spawn(move || f(k));
            }
        });
    }
    // Once per test binary: the list is the same for every call.
    static PRINTED: std::sync::Once = std::sync::Once::new();
    let names = |v: &[Kernel]| v.iter().map(|k| k.name()).collect::<Vec<_>>().join(", ");
    PRINTED.call_once(|| {
        println!(
            "verify tests: kernels that ran on this CPU: {}; absent: {}",
            names(&here),
            if absent.is_empty() {
                "none".to_string()
            } else {
                names(&absent)
            }
        )
    });
}

/// Every pair i < j whose rows are not orthogonal, by the plain inner product.
fn naive_failing_pairs(m: &Matrix) -> Vec<FailingPair> {
    let mut want = Vec::new();
    for i in 0..m.rows() {
        for j in i + 1..m.rows() {
            let dot = m.row_dot(i, j);
            if dot != 0 {
                want.push(FailingPair { i, j, dot });
            }
        }
    }
    want
}

fn random_matrix(rows: usize, cols: usize, seed: &mut u64) -> Matrix {
    Matrix::from_fn(rows, cols, |_, _| {
        *seed ^= *seed << 13;
        *seed ^= *seed >> 7;
        *seed ^= *seed << 17;
        *seed & 1 == 1
    })
}

#[test]
fn every_kernel_counts_like_the_scalar_tile() {
    // Widths around the simd128 kernel's two-word steps and its widening every 31 steps
    // (62 words), and the AVX-512 kernel's eight-word steps.
    #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
    assert_eq!(kernel_name(), "wasm32-simd128-sliced");
    let tiles: Vec<Kernel> = Kernel::available()
        .into_iter()
        .filter(|k| !k.is_sliced())
        .collect();
    let mut seed = 0x2545f4914f6cdd1du64;
    for words in [1, 2, 3, 7, 8, 9, 16, 61, 62, 63, 64, 65, 124, 125, 130] {
        for cols in [words * 64 - 5, words * 64] {
            let m = random_matrix(8, cols, &mut seed);
            let mut want = [[0u32; T]; T];
            tile_scalar(&m, 0, 4, &mut want);
            for &kernel in &tiles {
                let mut got = [[0u32; T]; T];
                tile(kernel, &m, 0, 4, &mut got);
                assert_eq!(got, want, "kernel {kernel}, {cols} columns");
            }
            // All ones against all ones differ nowhere; rows and their negations everywhere.
            let mut h = Matrix::ones(8, cols);
            for i in 4..6 {
                h.negate_row(i);
            }
            tile_scalar(&h, 0, 4, &mut want);
            assert_eq!(want[0], [cols as u32, cols as u32, 0, 0]);
            for &kernel in &tiles {
                let mut got = [[0u32; T]; T];
                tile(kernel, &h, 0, 4, &mut got);
                assert_eq!(got, want, "kernel {kernel}, {cols} columns");
            }
        }
    }
}

#[test]
fn shares_merged_in_any_order_give_the_report() {
    let mut seed = 0x9e3779b97f4a7c15u64;
    let mut flipped = sylvester(9);
    flipped.flip(300, 17);
    let cases = [
        random_matrix(130, 130, &mut seed),
        random_matrix(301, 640, &mut seed),
        flipped,
        sylvester(10),
    ];
    for m in &cases {
        let want = verify_with_cap(m, 20);
        let split = Split::of(m);
        assert_eq!(
            (0..split.shares()).map(|s| split.pairs_in(s)).sum::<u64>(),
            split.pairs()
        );
        // Last share first (the order the browser hands them out), then an interleaving.
        let orders: [Vec<usize>; 2] = [
            (0..split.shares()).rev().collect(),
            (0..split.shares())
                .step_by(2)
                .chain((1..split.shares()).step_by(2))
                .collect(),
        ];
        for order in orders {
            let mut merge = Merge::new(m, 20);
            let mut last = 0.0;
            for &s in &order {
                let f = merge.add(check_share(m, s, 20)).unwrap();
                assert!(f >= last);
                last = f;
            }
            assert!(merge.is_complete() && last == 1.0);
            let mut got = merge.finish(facts(m)).unwrap();
            got.kernel = want.kernel.clone();
            assert_eq!(got, want, "order {}", m.rows());
        }
    }
}

#[test]
fn a_merge_refuses_repeats_strangers_and_gaps() {
    let mut h = sylvester(10);
    h.flip(1000, 3);
    let split = Split::of(&h);
    assert!(split.shares() > 2);
    let mut merge = Merge::new(&h, 10);
    merge.add(check_share(&h, 0, 10)).unwrap();
    assert_eq!(merge.add(check_share(&h, 0, 10)), Err(MergeError::Again(0)));
    let mut stranger = check_share(&h, 1, 10);
    stranger.order = 512;
    assert_eq!(merge.add(stranger), Err(MergeError::OtherMatrix));
    let mut beyond = check_share(&h, 1, 10);
    beyond.share = split.shares();
    assert_eq!(
        merge.add(beyond),
        Err(MergeError::NoSuchShare(split.shares()))
    );
    merge.add(check_share(&h, 2, 10)).unwrap();
    assert!(!merge.is_complete());
    assert_eq!(
        merge.finish(facts(&h)),
        Err(MergeError::Missing {
            first: 1,
            count: split.shares() - 2
        })
    );
    let mut all = Merge::new(&h, 10);
    for s in 0..split.shares() {
        all.add(check_share(&h, s, 10)).unwrap();
    }
    assert_eq!(
        all.finish(facts(&sylvester(9))),
        Err(MergeError::OtherMatrix)
    );
}

#[test]
fn sylvester_passes_every_kernel() {
    // Sylvester's matrices are Hadamard (J. J. Sylvester, Phil. Mag. 34 (1867) 461–475).
    each_kernel(|kernel| {
        for k in 0..=10 {
            let h = sylvester(k);
            let r = verify_with(&h, 10, kernel);
            assert!(r.hadamard, "k={k} kernel={kernel}");
            assert_eq!(r.failing_pairs_total, 0);
            assert_eq!(r.kernel, kernel.for_shape(h.rows(), h.cols()).name());
            assert!(is_hadamard_with(&h, kernel), "k={k} kernel={kernel}");
        }
    });
}

#[test]
fn one_flip_fails_every_pair_through_its_row() {
    // Flipping entry (r, c) changes the dot of row r with every other row by ±2, so exactly
    // n − 1 pairs fail, all containing row r.
    let mut h = sylvester(6);
    h.flip(37, 5);
    let r = verify_with_cap(&h, 1000);
    assert!(!r.hadamard);
    assert_eq!(r.failing_pairs_total, 63);
    assert!(r.failing_pairs.iter().all(|p| p.i == 37 || p.j == 37));
    assert!(r.failing_pairs.iter().all(|p| p.dot.abs() == 2));
}

#[test]
fn failing_pairs_match_a_naive_count() {
    // Random ±1 matrices of awkward shapes, including ones spanning several panels.
    let mut seed = 0x9e3779b97f4a7c15u64;
    for &(n, cols) in &[
        (1, 1),
        (3, 3),
        (5, 7),
        (17, 17),
        (130, 130),
        (301, 64),
        (520, 8),
        (1030, 4),
    ] {
        let m = Matrix::from_fn(n, cols, |_, _| {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            seed & 1 == 1
        });
        let want = naive_failing_pairs(&m);
        each_kernel(|kernel| {
            let r = verify_with(&m, 50, kernel);
            assert_eq!(
                r.failing_pairs_total,
                want.len() as u64,
                "n={n} cols={cols}"
            );
            assert_eq!(
                r.failing_pairs,
                want[..want.len().min(50)].to_vec(),
                "n={n} cols={cols}"
            );
            let mut p = Progressive::with_kernel(&m, 50, kernel);
            p.step(1);
            assert_eq!(p.finish().failing_pairs_total, want.len() as u64);
            assert_eq!(is_hadamard_with(&m, kernel), is_hadamard(&m));
        });
    }
}

#[test]
fn damaged_paley_matrices_fail_exactly_the_naive_pairs() {
    // Paley I matrices (R. E. A. C. Paley, J. Math. Phys. 12 (1933) 311–320) of orders
    // that are not multiples of 64, one spanning two panels of 256 rows, checked whole,
    // cut to fewer rows than columns, with negated rows (rows of every weight, the first
    // with no −1 at all), and with a few entries flipped: every kernel must report exactly
    // the pairs a naive inner product finds.
    let mut seed = 0x51a3_c0de_77e1_f00du64;
    let mut next = |k: usize| {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        (seed % k as u64) as usize
    };
    for q in [11u64, 19, 43, 107, 163, 271, 331] {
        let h = crate::construct::paley::paley_one(q).unwrap().into_matrix();
        let n = h.rows();
        let mut cases = vec![h.clone()];
        cases.push(Matrix::from_fn(n * 2 / 3, n, |i, j| h.is_negative(i, j)));
        let mut negated = h.clone();
        for i in (1..n).step_by(3) {
            negated.negate_row(i);
        }
        cases.push(negated.clone());
        for flips in [1, 2, 5] {
            let mut d = negated.clone();
            for _ in 0..flips {
                let (i, j) = (next(n), next(n));
                d.set(i, j, -d.get(i, j));
            }
            cases.push(d);
        }
        for m in &cases {
            let want = naive_failing_pairs(m);
            each_kernel(|kernel| {
                let r = verify_with(m, 1000, kernel);
                assert_eq!(r.failing_pairs_total, want.len() as u64, "q={q} {kernel}");
                assert_eq!(
                    r.failing_pairs,
                    want[..want.len().min(1000)],
                    "q={q} {kernel}"
                );
                assert_eq!(
                    is_hadamard_with(m, kernel),
                    want.is_empty() && m.is_square()
                );
            });
        }
    }
}

#[test]
fn inner_products_of_every_size_are_told_apart() {
    // Row k is one row of the Sylvester matrix of order 2048 with its first 2k entries
    // negated, so rows k < l have inner product 2048 − 4(l − k) when 2l ≤ 2048: every
    // inner product ≡ 0 (mod 4) between −2048 and 2048 occurs, so the bit-sliced kernel's
    // counts miss their targets by every amount, in every bit. Every kernel must agree
    // with a naive count.
    let n = 2048;
    let rows = 1030;
    let base = |j: usize| (5 & j).count_ones() % 2 == 1;
    let m = Matrix::from_fn(rows, n, |k, j| base(j) ^ (j < 2 * k));
    let want = naive_failing_pairs(&m);
    assert!(want.len() > 500_000, "few failing pairs: {}", want.len());
    each_kernel(|kernel| {
        let r = verify_with(&m, 100, kernel);
        assert_eq!(r.failing_pairs_total, want.len() as u64, "{kernel}");
        assert_eq!(r.failing_pairs, want[..100], "{kernel}");
    });
}

#[test]
fn properties_of_small_matrices() {
    let h2 = sylvester(1);
    let p = properties(&h2);
    assert!(p.normalized && p.symmetric && !p.skew);
    // [[1,1],[-1,1]] is skew: H + Hᵀ = 2I.
    let s = Matrix::from_rows(&[[1i8, 1], [-1, 1]]).unwrap();
    let p = properties(&s);
    assert!(p.skew && !p.symmetric && !p.normalized);
    // A regular Hadamard matrix of order 4: J − 2I (row sums 2).
    let j = Matrix::from_fn(4, 4, |i, k| i == k);
    let p = properties(&j);
    assert!(p.regular && p.symmetric);
    assert_eq!(p.excess, 8);
    assert!(verify(&j).hadamard);
}

#[test]
fn six_by_six_is_never_hadamard() {
    let m = Matrix::ones_square(6);
    let r = verify(&m);
    assert!(!r.hadamard);
    assert!(r.failures.contains(&Failure::ImpossibleOrder));
}

#[test]
fn progressive_matches_verify() {
    let mut h = sylvester(7);
    h.flip(3, 3);
    let mut p = Progressive::new(&h, 10);
    let mut last = 0.0;
    while !p.is_done() {
        let f = p.step(500);
        assert!(f >= last);
        last = f;
    }
    assert_eq!(p.finish(), verify_with_cap(&h, 10));
}
