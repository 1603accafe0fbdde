//! The references the planner writes into route trees, one place each.

pub const SYLVESTER: &str = "Sylvester, Phil. Mag. 34 (1867)";
pub const PALEY: &str = "Paley, J. Math. Phys. 12 (1933)";
pub const KRONECKER: &str =
    "Sylvester, Phil. Mag. 34 (1867): the tensor product of Hadamard matrices";
pub const CONFERENCE: &str = "conference matrix product C⊗H + I⊗(K·H), K = I⊗[[0,1],[−1,0]], over Paley's symmetric conference matrix (Paley, J. Math. Phys. 12, 1933) [derived; see references.md#r5-the-conference-matrix-product]";
pub const TWIN: &str = "Stanton and Sprott, Canad. J. Math. 10 (1958) [recalled]";
pub const WILLIAMSON: &str = "Williamson, Duke Math. J. 11 (1944)";
pub const GOETHALS_SEIDEL: &str = "Goethals and Seidel, J. Austral. Math. Soc. 11 (1970)";
pub const T_SEQUENCES: &str =
    "Turyn, J. Combin. Theory A 16 (1974) [recalled]: T-sequences in the Goethals–Seidel array";
pub const COOPER_WALLIS: &str = "Cooper and Wallis, Bull. Austral. Math. Soc. 7 (1972) [recalled]: T-sequences with Williamson matrices";
pub const SKEW_DOUBLING: &str = "a skew matrix of order h doubles to a skew matrix of order 2h (standard [recalled]; the block form is derived and verified in construct::skew)";
pub const MIYAMOTO: &str = "Miyamoto, J. Combin. Theory A 57 (1991) 86–108: order 4q from a prime power q ≡ 1 mod 4 and any order q − 1 (the array is this program's own, construct::miyamoto)";
pub const MIYAMOTO_YAMADA: &str = "Yamada's first theorem (Yamada, J. Austral. Math. Soc. A 46 (1989)) as the case K = H₂ ⊗ H_{(q−1)/2} of Miyamoto, J. Combin. Theory A 57 (1991) 86–108 (the array is this program's own, construct::miyamoto)";
pub const YAMADA: &str = "Yamada, J. Austral. Math. Soc. A 46 (1989)";
pub const GOLAY: &str = "Golay, IRE Trans. Inform. Theory 7 (1961) [recalled]";
pub const GOLAY_PRODUCT: &str =
    "Turyn, J. Combin. Theory A 16 (1974); Jedwab and Parker, J. Combin. Des. 17 (2009)";
pub const GOLAY_LENGTHS: &str = "Golay pairs of every length 2^a·10^b·26^c: Turyn, J. Combin. Theory A 16 (1974); Jedwab and Parker, J. Combin. Des. 17 (2009)";
pub const GOLAY_TO_T: &str = "T-sequences of lengths g, g+1 and 2g+1 from a Golay pair of length g (Turyn, J. Combin. Theory A 16, 1974 [recalled])";
pub const BASE_TO_T: &str = "T-sequences of length 2n+p from base sequences BS(n+p, n) (Turyn, J. Combin. Theory A 16, 1974 [recalled])";
pub const GOLAY_PAIRS_TO_BASE: &str = "Golay pairs of lengths g₁ ≥ g₂ are base sequences BS(g₁, g₂), so T-sequences of length g₁ + g₂ [references.md#r6-base-sequences-and-t-sequences; checked in construct::t_sequences]";
pub const TURYN_TO_BASE: &str = "BS(2n−1, n) = (C;D, C;−D, A, B) from TT(n): Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21 (2013)";
pub const TT_KNOWN: &str = "Turyn-type sequences TT(n) exist for every even n ≤ 38: Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21 (2013)";
pub const TT36: &str = "TT(36): Kharaghani and Tayfeh-Rezaie, J. Combin. Des. 13 (2005)";
pub const TURYN_WILLIAMSON: &str = "Turyn, J. Combin. Theory A 12 (1972)";
pub const WILLIAMSON_KNOWN: &str = "Williamson matrices of this order are known: Holzmann, Kharaghani and Tayfeh-Rezaie, Des. Codes Cryptogr. 46 (2008), and the works it cites";
pub const WILLIAMSON_23: &str = "Baumert, Golomb and Hall, Bull. Amer. Math. Soc. 68 (1962)";
