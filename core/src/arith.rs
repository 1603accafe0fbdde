//! Integer arithmetic the constructions need: primality, prime powers, factoring, divisors.
//!
//! One idea: everything fits in a `u64`, and products are taken in `u128`, so no step can
//! overflow or round. Primality is the Miller–Rabin test with the first twelve primes as bases,
//! which has no strong pseudoprime below about 3.2·10²³, far above 2⁶⁴ (Sorenson and Webster,
//! "Strong pseudoprimes to twelve prime bases", Math. Comp. 86, 2017 \[recalled\]); the sympy
//! cross-check in `tests/python` confirms the decisions independently. Factoring is trial
//! division by small primes, then Pollard's rho in Brent's form (Brent, "An improved Monte Carlo
//! factorization algorithm", BIT 20, 1980 \[recalled\]) on what is left, each factor confirmed
//! prime.

use num_integer::gcd;

/// The bases that make Miller–Rabin deterministic on all of `u64`.
const MR_BASES: [u64; 12] = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37];

#[inline]
fn mul_mod(a: u64, b: u64, m: u64) -> u64 {
    ((a as u128 * b as u128) % m as u128) as u64
}

fn pow_mod(mut a: u64, mut e: u64, m: u64) -> u64 {
    let mut r = 1 % m;
    a %= m;
    while e > 0 {
        if e & 1 == 1 {
            r = mul_mod(r, a, m);
        }
        a = mul_mod(a, a, m);
        e >>= 1;
    }
    r
}

/// True when n is prime. Deterministic for every `u64`.
pub fn is_prime(n: u64) -> bool {
    if n < 2 {
        return false;
    }
    for &p in &MR_BASES {
        if n.is_multiple_of(p) {
            return n == p;
        }
    }
    let s = (n - 1).trailing_zeros();
    let d = (n - 1) >> s;
    'bases: for &a in &MR_BASES {
        let mut x = pow_mod(a, d, n);
        if x == 1 || x == n - 1 {
            continue;
        }
        for _ in 1..s {
            x = mul_mod(x, x, n);
            if x == n - 1 {
                continue 'bases;
            }
        }
        return false;
    }
    true
}

/// `Some((p, k))` when n = p^k with p prime and k ≥ 1; `None` otherwise (including n < 2).
pub fn prime_power(n: u64) -> Option<(u64, u32)> {
    if n < 2 {
        return None;
    }
    if n & 1 == 0 {
        return (n & (n - 1) == 0).then(|| (2, n.trailing_zeros()));
    }
    // The exponent k divides into at most 40 candidates (3^41 > 2^64); try the largest first
    // so that p is found prime directly.
    for k in (1..=40u32).rev() {
        let r = iroot(n, k);
        if r >= 2 && r.checked_pow(k) == Some(n) && is_prime(r) {
            return Some((r, k));
        }
    }
    None
}

/// True when n = p^k for a prime p and k ≥ 1.
pub fn is_prime_power(n: u64) -> bool {
    prime_power(n).is_some()
}

/// The integer k-th root: the largest r with r^k ≤ n.
fn iroot(n: u64, k: u32) -> u64 {
    if k == 1 {
        return n;
    }
    let mut r = (n as f64).powf(1.0 / k as f64) as u64;
    // The float guess is within a few units; correct it exactly.
    while r > 0 && r.checked_pow(k).is_none_or(|v| v > n) {
        r -= 1;
    }
    while (r + 1).checked_pow(k).is_some_and(|v| v <= n) {
        r += 1;
    }
    r
}

/// A nontrivial factor of the odd composite n, by Brent's variant of Pollard's rho.
fn rho_factor(n: u64) -> u64 {
    let mut c = 1u64;
    loop {
        let f = |x: u64| (mul_mod(x, x, n) + c) % n;
        let (mut y, mut r, mut q, m) = (2u64, 1u64, 1u64, 128u64);
        let (mut x, mut ys, mut g);
        loop {
            x = y;
            for _ in 0..r {
                y = f(y);
            }
            let mut k = 0;
            loop {
                ys = y;
                for _ in 0..m.min(r - k) {
                    y = f(y);
                    q = mul_mod(q, x.abs_diff(y), n);
                }
                g = gcd(q, n);
                k += m;
                if k >= r || g != 1 {
                    break;
                }
            }
            r *= 2;
            if g != 1 {
                break;
            }
        }
        if g == n {
            // The batch overshot; step one at a time from the saved point.
            loop {
                ys = f(ys);
                g = gcd(x.abs_diff(ys), n);
                if g != 1 {
                    break;
                }
            }
        }
        if g != n {
            return g;
        }
        c += 1;
    }
}

fn factor_into(n: u64, out: &mut Vec<u64>) {
    if n == 1 {
        return;
    }
    if is_prime(n) {
        out.push(n);
        return;
    }
    if let Some((p, k)) = prime_power(n) {
        out.extend(std::iter::repeat_n(p, k as usize));
        return;
    }
    let d = rho_factor(n);
    factor_into(d, out);
    factor_into(n / d, out);
}

/// The prime factorisation of n as (prime, exponent) pairs, primes increasing. Empty for n ≤ 1.
pub fn factor(mut n: u64) -> Vec<(u64, u32)> {
    let mut primes = Vec::new();
    if n <= 1 {
        return Vec::new();
    }
    for p in [2u64, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47] {
        while n.is_multiple_of(p) {
            primes.push(p);
            n /= p;
        }
    }
    factor_into(n, &mut primes);
    primes.sort_unstable();
    let mut out: Vec<(u64, u32)> = Vec::new();
    for p in primes {
        match out.last_mut() {
            Some((q, k)) if *q == p => *k += 1,
            _ => out.push((p, 1)),
        }
    }
    out
}

/// All positive divisors of n, increasing. Empty for n = 0.
pub fn divisors(n: u64) -> Vec<u64> {
    if n == 0 {
        return Vec::new();
    }
    let mut ds = vec![1u64];
    for (p, k) in factor(n) {
        let len = ds.len();
        let mut pk = 1u64;
        for _ in 0..k {
            pk *= p;
            for i in 0..len {
                ds.push(ds[i] * pk);
            }
        }
    }
    ds.sort_unstable();
    ds
}

#[cfg(test)]
mod tests {
    use super::*;

    fn naive_prime(n: u64) -> bool {
        n >= 2
            && (2..)
                .take_while(|d| d * d <= n)
                .all(|d| !n.is_multiple_of(d))
    }

    #[test]
    fn primality_agrees_with_trial_division_below_20000() {
        for n in 0..20_000 {
            assert_eq!(is_prime(n), naive_prime(n), "n={n}");
        }
    }

    #[test]
    fn known_large_primes_and_pseudoprimes() {
        // 2^61 − 1 and 2^31 − 1 are Mersenne primes [recalled, standard].
        assert!(is_prime((1 << 61) - 1));
        assert!(is_prime((1 << 31) - 1));
        // The largest prime below 2^64 is 2^64 − 59 [recalled, standard].
        assert!(is_prime(u64::MAX - 58));
        assert!(!is_prime(u64::MAX));
        // 3215031751 = 151·751·28351 is a strong pseudoprime to bases 2, 3, 5, 7 [recalled; re-derived
        // with Python's pow].
        assert!(!is_prime(3_215_031_751));
        // 3825123056546413051 is a strong pseudoprime to every prime base 2..31 [recalled; re-derived
        // with Python's pow], so only the base 37 catches it.
        assert!(!is_prime(3_825_123_056_546_413_051));
        // Carmichael number 561 = 3·11·17 [standard].
        assert!(!is_prime(561));
    }

    #[test]
    fn prime_powers() {
        assert_eq!(prime_power(1), None);
        assert_eq!(prime_power(2), Some((2, 1)));
        assert_eq!(prime_power(243), Some((3, 5)));
        assert_eq!(prime_power(1024), Some((2, 10)));
        assert_eq!(prime_power(36), None);
        assert_eq!(prime_power(1 << 63), Some((2, 63)));
        assert_eq!(prime_power(3u64.pow(40)), Some((3, 40)));
        assert_eq!(
            prime_power(((1u64 << 31) - 1).pow(2)),
            Some(((1 << 31) - 1, 2))
        );
        for n in 2..5000u64 {
            let f = factor(n);
            assert_eq!(is_prime_power(n), f.len() == 1, "n={n}");
        }
    }

    #[test]
    fn factoring_reconstructs_and_uses_primes() {
        let cases = [
            1u64,
            2,
            360,
            600_851_475_143,
            (1 << 61) - 1,
            u64::MAX,
            4_294_967_291 * 4_294_967_279,
            1_000_000_007 * 998_244_353,
            9_999_999_967 * 3,
        ];
        for &n in &cases {
            let f = factor(n);
            assert!(f.windows(2).all(|w| w[0].0 < w[1].0));
            assert!(f.iter().all(|&(p, _)| is_prime(p)));
            assert_eq!(f.iter().map(|&(p, k)| p.pow(k)).product::<u64>(), n);
        }
        // 2^64 − 1 = 3·5·17·257·641·65537·6700417 [standard: the Fermat numbers F0..F5].
        assert_eq!(
            factor(u64::MAX),
            vec![
                (3, 1),
                (5, 1),
                (17, 1),
                (257, 1),
                (641, 1),
                (65537, 1),
                (6_700_417, 1)
            ]
        );
    }

    #[test]
    fn divisors_of_small_numbers() {
        assert_eq!(divisors(1), vec![1]);
        assert_eq!(divisors(12), vec![1, 2, 3, 4, 6, 12]);
        for n in 1..500u64 {
            let naive: Vec<u64> = (1..=n).filter(|d| n % d == 0).collect();
            assert_eq!(divisors(n), naive);
        }
    }
}
