//! Finite fields GF(q), q = p^k ≤ 2²⁰, with constant-time arithmetic on `u32` element indices.
//!
//! One idea: the nonzero elements of GF(q) are the powers of one primitive element g, so after
//! tabulating g⁰, g¹, …, g^(q−2) once (the antilog table) and its inverse (the log table),
//! multiplication and inversion are additions of logarithms, the quadratic character is the
//! parity of the logarithm, and addition is `gᵃ + gᵇ = gᵃ·(1 + g^(b−a))`, one lookup in Zech's
//! table `1 + gⁿ = g^Z(n)`. Every operation is a few table reads.
//!
//! Elements are numbered 0..q. For a prime field the index is the residue itself. For k > 1
//! an element is a polynomial c₀ + c₁x + … + c_(k−1)x^(k−1) over GF(p) modulo the field's
//! modulus, and its index is Σ cᵢ·pⁱ (constant term lowest). The modulus is the first monic
//! primitive polynomial of degree k when the polynomials xᵏ + c_(k−1)x^(k−1) + … + c₀ are
//! ordered by Σ cᵢ·pⁱ; x (index p) is then the primitive element. For k = 1 the primitive
//! element is the least primitive root mod p, and the modulus is x − g.
//!
//! A polynomial f of degree k is primitive when x has multiplicative order exactly p^k − 1
//! modulo f; that also proves f irreducible, because modulo a reducible f fewer than p^k − 1
//! residues are invertible.

use crate::arith::{factor, prime_power};

/// The largest field order [`Field::new`] accepts. The tables take 16 bytes per element.
pub const MAX_Q: u64 = 1 << 20;

/// The field GF(p^k), with its log, antilog and Zech tables.
#[derive(Clone)]
pub struct Field {
    p: u32,
    k: u32,
    q: u32,
    /// The monic modulus, coefficients c₀..c_k (c_k = 1).
    modulus: Vec<u32>,
    /// The index of the primitive element g.
    generator: u32,
    /// exp[i] = gⁱ for 0 ≤ i < 2(q − 1), so sums of two logs need no reduction.
    exp: Vec<u32>,
    /// log[x] for x ≠ 0; log[0] is unused.
    log: Vec<u32>,
    /// zech[n] = log(1 + gⁿ), or `NONE` when 1 + gⁿ = 0.
    zech: Vec<u32>,
}

const NONE: u32 = u32::MAX;

impl std::fmt::Debug for Field {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "GF({}^{}) mod {:?}", self.p, self.k, self.modulus)
    }
}

/// Digitwise arithmetic on indices, used only while the tables are built.
struct Digits {
    p: u32,
    k: u32,
}

impl Digits {
    fn split(&self, mut x: u32) -> Vec<u32> {
        (0..self.k)
            .map(|_| {
                let d = x % self.p;
                x /= self.p;
                d
            })
            .collect()
    }
    fn join(&self, d: &[u32]) -> u32 {
        d.iter().rev().fold(0, |acc, &c| acc * self.p + c)
    }
    fn add(&self, a: u32, b: u32) -> u32 {
        let (x, y) = (self.split(a), self.split(b));
        let s: Vec<u32> = x.iter().zip(&y).map(|(u, v)| (u + v) % self.p).collect();
        self.join(&s)
    }
    /// a·x modulo the monic polynomial with lower coefficients `low` (c₀..c_(k−1)).
    fn times_x(&self, a: u32, low: &[u32]) -> u32 {
        let mut d = self.split(a);
        let top = d[self.k as usize - 1];
        d.rotate_right(1);
        d[0] = 0;
        // xᵏ = −(c₀ + … + c_(k−1)x^(k−1)).
        for (di, &c) in d.iter_mut().zip(low) {
            *di = (*di + (self.p - c) * top) % self.p;
        }
        self.join(&d)
    }
}

/// Multiplies polynomials a, b (coefficient vectors of length k) modulo the monic f.
fn poly_mul_mod(a: &[u64], b: &[u64], low: &[u64], p: u64) -> Vec<u64> {
    let k = low.len();
    let mut prod = vec![0u64; 2 * k];
    for (i, &x) in a.iter().enumerate() {
        if x == 0 {
            continue;
        }
        for (j, &y) in b.iter().enumerate() {
            prod[i + j] = (prod[i + j] + x * y) % p;
        }
    }
    for d in (k..2 * k).rev() {
        let t = prod[d];
        if t != 0 {
            prod[d] = 0;
            for (i, &c) in low.iter().enumerate() {
                prod[d - k + i] = (prod[d - k + i] + (p - c) * t) % p;
            }
        }
    }
    prod.truncate(k);
    prod
}

fn poly_pow_x(e: u64, low: &[u64], p: u64) -> Vec<u64> {
    let k = low.len();
    let mut result = vec![0u64; k];
    result[0] = 1;
    let mut base = vec![0u64; k];
    if k == 1 {
        base[0] = (p - low[0]) % p;
    } else {
        base[1] = 1;
    }
    let mut e = e;
    while e > 0 {
        if e & 1 == 1 {
            result = poly_mul_mod(&result, &base, low, p);
        }
        base = poly_mul_mod(&base, &base, low, p);
        e >>= 1;
    }
    result
}

/// True when x has order exactly p^k − 1 modulo xᵏ + low.
fn is_primitive(low: &[u64], p: u64, q1: u64, prime_divisors: &[u64]) -> bool {
    if low[0] == 0 {
        return false;
    }
    let is_one = |v: &[u64]| v[0] == 1 && v[1..].iter().all(|&c| c == 0);
    is_one(&poly_pow_x(q1, low, p))
        && prime_divisors
            .iter()
            .all(|&r| !is_one(&poly_pow_x(q1 / r, low, p)))
}

impl Field {
    /// GF(q), or `None` when q is not a prime power or exceeds [`MAX_Q`].
    pub fn new(q: u64) -> Option<Field> {
        if q > MAX_Q {
            return None;
        }
        let (p, k) = prime_power(q)?;
        let q1 = q - 1;
        let prime_divisors: Vec<u64> = factor(q1).into_iter().map(|(r, _)| r).collect();
        let d = Digits { p: p as u32, k };
        let (modulus, generator) = if k == 1 {
            // The least primitive root g; x − g has x ≡ g as its root.
            let g = (1..p)
                .find(|&g| is_primitive(&[(p - g) % p], p, q1, &prime_divisors))
                .unwrap_or(1);
            (vec![((p - g) % p) as u32, 1], g as u32)
        } else {
            let low = (0..q)
                .map(|i| {
                    d.split(i as u32)
                        .into_iter()
                        .map(u64::from)
                        .collect::<Vec<u64>>()
                })
                .find(|low| is_primitive(low, p, q1, &prime_divisors))?;
            let mut m: Vec<u32> = low.iter().map(|&c| c as u32).collect();
            m.push(1);
            (m, p as u32)
        };
        let qi = q as u32;
        let n = q1 as usize;
        let mut exp = vec![0u32; 2 * n.max(1)];
        let mut log = vec![0u32; q as usize];
        let mut x = 1u32;
        for (i, slot) in exp.iter_mut().take(n).enumerate() {
            *slot = x;
            log[x as usize] = i as u32;
            x = if k == 1 {
                ((x as u64 * generator as u64) % q) as u32
            } else {
                d.times_x(x, &modulus[..k as usize])
            };
        }
        for i in n..2 * n {
            exp[i] = exp[i - n];
        }
        let zech = (0..n)
            .map(|i| {
                let s = if k == 1 {
                    (exp[i] + 1) % qi
                } else {
                    d.add(exp[i], 1)
                };
                if s == 0 {
                    NONE
                } else {
                    log[s as usize]
                }
            })
            .collect();
        Some(Field {
            p: p as u32,
            k,
            q: qi,
            modulus,
            generator,
            exp,
            log,
            zech,
        })
    }

    /// The order q.
    #[inline]
    pub fn q(&self) -> u64 {
        self.q as u64
    }
    /// The characteristic p.
    #[inline]
    pub fn p(&self) -> u64 {
        self.p as u64
    }
    /// The degree k over GF(p).
    #[inline]
    pub fn k(&self) -> u32 {
        self.k
    }
    /// The monic modulus, coefficients c₀, c₁, …, c_k = 1.
    pub fn modulus(&self) -> &[u32] {
        &self.modulus
    }
    /// The primitive element the tables use.
    pub fn generator(&self) -> u32 {
        self.generator
    }

    /// The discrete logarithm of x ≠ 0 to the base [`Field::generator`], in 0..q−1.
    #[inline]
    pub fn log(&self, x: u32) -> u32 {
        debug_assert!(x != 0 && x < self.q);
        self.log[x as usize]
    }
    /// g^e, for any e.
    #[inline]
    pub fn exp(&self, e: u64) -> u32 {
        self.exp[(e % (self.q as u64 - 1).max(1)) as usize]
    }

    /// a + b.
    #[inline]
    pub fn add(&self, a: u32, b: u32) -> u32 {
        if self.k == 1 {
            let s = a + b;
            return if s >= self.q { s - self.q } else { s };
        }
        if a == 0 {
            return b;
        }
        if b == 0 {
            return a;
        }
        let (la, lb) = (self.log[a as usize], self.log[b as usize]);
        let n = self.q - 1;
        let diff = if lb >= la { lb - la } else { lb + n - la };
        match self.zech[diff as usize] {
            NONE => 0,
            z => self.exp[(la + z) as usize],
        }
    }
    /// −a.
    #[inline]
    pub fn neg(&self, a: u32) -> u32 {
        if a == 0 || self.p == 2 {
            return a;
        }
        if self.k == 1 {
            return self.q - a;
        }
        // −1 = g^((q−1)/2) in odd characteristic.
        self.exp[(self.log[a as usize] + (self.q - 1) / 2) as usize]
    }
    /// a − b.
    #[inline]
    pub fn sub(&self, a: u32, b: u32) -> u32 {
        if self.k == 1 {
            return if a >= b { a - b } else { a + self.q - b };
        }
        self.add(a, self.neg(b))
    }
    /// a·b.
    #[inline]
    pub fn mul(&self, a: u32, b: u32) -> u32 {
        if a == 0 || b == 0 {
            return 0;
        }
        if self.k == 1 {
            return ((a as u64 * b as u64) % self.q as u64) as u32;
        }
        self.exp[(self.log[a as usize] + self.log[b as usize]) as usize]
    }
    /// a⁻¹, or `None` for a = 0.
    #[inline]
    pub fn inv(&self, a: u32) -> Option<u32> {
        if a == 0 {
            return None;
        }
        let n = self.q - 1;
        let l = self.log[a as usize];
        Some(self.exp[((n - l) % n) as usize])
    }
    /// aᵉ (with 0⁰ = 1).
    pub fn pow(&self, a: u32, e: u64) -> u32 {
        if e == 0 {
            return 1;
        }
        if a == 0 {
            return 0;
        }
        let n = self.q as u64 - 1;
        self.exp[((self.log[a as usize] as u64 % n) * (e % n) % n) as usize]
    }
    /// The quadratic character: 0 for 0, 1 for a nonzero square, −1 for a non-square. In
    /// characteristic 2 every element is a square.
    #[inline]
    pub fn chi(&self, a: u32) -> i8 {
        if a == 0 {
            0
        } else if self.p == 2 || self.log[a as usize] & 1 == 0 {
            1
        } else {
            -1
        }
    }
    /// The quadratic character of every element, indexed by element.
    pub fn chi_table(&self) -> Vec<i8> {
        (0..self.q).map(|a| self.chi(a)).collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Field axioms on every pair for small q, and on a sample for larger q.
    fn check_axioms(f: &Field) {
        let q = f.q() as u32;
        let step = (q / 60).max(1);
        for a in (0..q).step_by(step as usize) {
            assert_eq!(f.add(a, 0), a);
            assert_eq!(f.mul(a, 1), a);
            assert_eq!(f.add(a, f.neg(a)), 0);
            if a != 0 {
                assert_eq!(f.mul(a, f.inv(a).unwrap()), 1);
            }
            for b in (0..q).step_by(step as usize) {
                assert_eq!(f.add(a, b), f.add(b, a));
                assert_eq!(f.mul(a, b), f.mul(b, a));
                assert_eq!(f.sub(f.add(a, b), b), a);
                assert_eq!(f.chi(f.mul(a, b)), f.chi(a) * f.chi(b));
                for c in [1u32, 2 % q, q - 1] {
                    assert_eq!(f.mul(a, f.add(b, c)), f.add(f.mul(a, b), f.mul(a, c)));
                    assert_eq!(f.add(a, f.add(b, c)), f.add(f.add(a, b), c));
                }
            }
        }
    }

    #[test]
    fn small_fields_satisfy_the_axioms() {
        for q in [
            2u64, 3, 4, 5, 7, 8, 9, 16, 25, 27, 32, 49, 81, 121, 125, 243, 256, 343, 1024, 2187,
            4096,
        ] {
            let f = Field::new(q).unwrap();
            assert_eq!(f.p().pow(f.k()), q);
            check_axioms(&f);
        }
    }

    #[test]
    fn non_prime_powers_are_refused() {
        for q in [0u64, 1, 6, 10, 12, 100, MAX_Q + 1] {
            assert!(Field::new(q).is_none(), "q={q}");
        }
    }

    #[test]
    fn the_additive_group_is_digitwise_mod_p() {
        // The index convention: Σ cᵢpⁱ, so addition is digitwise mod p.
        let f = Field::new(3u64.pow(4)).unwrap();
        let d = Digits { p: 3, k: 4 };
        for a in 0..81 {
            for b in 0..81 {
                assert_eq!(f.add(a, b), d.add(a, b));
            }
        }
        // In characteristic 2 addition is XOR.
        let f = Field::new(1 << 10).unwrap();
        for a in (0..1024).step_by(7) {
            for b in (0..1024).step_by(5) {
                assert_eq!(f.add(a, b), a ^ b);
            }
        }
    }

    #[test]
    fn first_primitive_moduli() {
        // x² + x + 1 is the only irreducible quadratic over GF(2) [standard].
        assert_eq!(Field::new(4).unwrap().modulus(), &[1, 1, 1]);
        // x³ + x + 1 is the first primitive cubic over GF(2) [standard]; x³ + 1 and x³ + x
        // have roots, so it comes first in our order.
        assert_eq!(Field::new(8).unwrap().modulus(), &[1, 1, 0, 1]);
        // Over GF(3): x² + 1 is irreducible but x has order 4, not 8; x² + x + 2 is primitive
        // [derived: x² = 2x + 1, x⁴ = 2, x⁸ = 1], and x² + 2x + 2 comes later in our order.
        assert_eq!(Field::new(9).unwrap().modulus(), &[2, 1, 1]);
        // 3 is the least primitive root mod 7, 2 mod 11 and 2 mod 13 [standard].
        assert_eq!(Field::new(7).unwrap().generator(), 3);
        assert_eq!(Field::new(11).unwrap().generator(), 2);
        assert_eq!(Field::new(13).unwrap().generator(), 2);
    }

    #[test]
    fn quadratic_character_by_euler_criterion() {
        // Euler's criterion: χ(a) = a^((q−1)/2) for odd q [standard].
        for q in [3u64, 9, 25, 27, 49, 81, 125, 169, 243, 1009, 2401] {
            let f = Field::new(q).unwrap();
            let minus_one = f.neg(1);
            for a in 1..q as u32 {
                let e = f.pow(a, (q - 1) / 2);
                assert_eq!(f.chi(a), if e == 1 { 1 } else { -1 }, "q={q} a={a}");
                assert!(e == 1 || e == minus_one);
            }
            let squares = (1..q as u32).filter(|&a| f.chi(a) == 1).count() as u64;
            assert_eq!(squares, (q - 1) / 2);
        }
    }

    #[test]
    fn the_largest_field_builds() {
        let f = Field::new(MAX_Q).unwrap();
        assert_eq!((f.p(), f.k()), (2, 20));
        let f = Field::new(1_048_573).unwrap(); // the largest prime below 2^20 [derived: is_prime]
        assert_eq!(f.mul(f.inv(12345).unwrap(), 12345), 1);
    }
}
