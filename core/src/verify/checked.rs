//! The exact check in two steps, for a caller that computes the id elsewhere: [`check_with`]
//! checks every pair and computes the properties, and [`Checked::report`] adds the id. The
//! `hadamard verify` command hashes the id straight from a canonical input file on one thread
//! while it parses and checks on the others ([`crate::id::canonical_text_id`]).

use super::{gram_pass, properties, report_from, Facts, Kernel, PairTally, Properties, Report};
use crate::matrix::Matrix;

/// Every pair of `m` checked, and its properties: a [`Report`] without the id.
pub struct Checked {
    order: usize,
    cols: usize,
    tally: PairTally,
    properties: Properties,
    kernel: Kernel,
}

/// Checks every pair of `m` with `kernel` (keeping at most `cap` failing pairs) and computes
/// its properties beside the check.
///
/// # Panics
/// When this CPU lacks the kernel ([`Kernel::is_available`]).
pub fn check_with(m: &Matrix, cap: usize, kernel: Kernel) -> Checked {
    kernel.assert_available();
    let check = || {
        let mut tally = PairTally::new(cap);
        gram_pass(m, kernel, &mut tally);
        tally
    };
    #[cfg(not(target_arch = "wasm32"))]
    let (tally, properties) = rayon::join(check, || properties(m));
    #[cfg(target_arch = "wasm32")]
    let (tally, properties) = (check(), properties(m));
    Checked {
        order: m.rows(),
        cols: m.cols(),
        tally,
        properties,
        kernel,
    }
}

impl Checked {
    /// True when the check found no failing pair.
    pub fn pairs_orthogonal(&self) -> bool {
        self.tally.total == 0
    }

    /// The report, with `sha256` as the id: it must be [`crate::id::matrix_id`] of the matrix
    /// checked (the caller computed it, on another thread or from the canonical text).
    pub fn report(self, sha256: String) -> Report {
        let facts = Facts {
            order: self.order,
            cols: self.cols,
            sha256,
            properties: self.properties,
        };
        report_from(facts, self.tally, self.kernel)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::id::matrix_id;
    use crate::verify::pass::gram_pass;
    use crate::verify::report::{facts, report_from};
    use crate::verify::verify_with;

    #[test]
    fn two_steps_give_the_one_step_report_with_every_kernel() {
        // Sylvester's matrix of order 256 (entry (i, j) is −1 when i AND j has an odd number
        // of ones: Sylvester 1867, common practice), whole, with three entries flipped, and
        // cut to 100 rows; the one-step report is compared with a naive count elsewhere.
        let mut m = Matrix::from_fn(256, 256, |i, j| (i & j).count_ones() % 2 == 1);
        let whole = m.clone();
        for (i, j) in [(3, 7), (200, 11), (255, 255)] {
            m.set(i, j, if m.is_negative(i, j) { 1 } else { -1 });
        }
        let cut = Matrix::from_fn(100, 256, |i, j| m.is_negative(i, j));
        for kernel in Kernel::available() {
            for x in [&whole, &m, &cut] {
                let two = check_with(x, 5, kernel);
                assert_eq!(two.pairs_orthogonal(), x == &whole);
                // The reference: the facts (id and properties) computed alone, and the pairs
                // counted by the portable tile.
                let mut tally = PairTally::new(5);
                gram_pass(x, Kernel::Scalar, &mut tally);
                let reference = report_from(facts(x), tally, kernel);
                assert_eq!(two.report(matrix_id(x)), reference, "{kernel}");
                assert_eq!(verify_with(x, 5, kernel), reference, "{kernel}");
            }
        }
        let best = Kernel::best();
        assert!(best.is_available());
        assert_eq!(
            check_with(&m, 5, best).report(matrix_id(&m)),
            crate::verify::verify_with_cap(&m, 5)
        );
    }
}
