//! The little number theory the planner needs: prime powers and factorisations of u64.
//!
//! Miller–Rabin with the first twelve prime bases is deterministic below 3.3·10²⁴ (Sorenson and
//! Webster, Math. Comp. 86, 2017), so it decides every u64; factors come from trial division by
//! small primes and then Pollard's rho (Pollard, BIT 15, 1975) with Brent's cycle finding.

fn mul_mod(a: u64, b: u64, m: u64) -> u64 {
    ((a as u128 * b as u128) % m as u128) as u64
}

fn pow_mod(mut b: u64, mut e: u64, m: u64) -> u64 {
    let mut r = 1 % m;
    b %= m;
    while e > 0 {
        if e & 1 == 1 {
            r = mul_mod(r, b, m);
        }
        b = mul_mod(b, b, m);
        e >>= 1;
    }
    r
}

/// True when n is prime.
pub fn is_prime(n: u64) -> bool {
    const BASES: [u64; 12] = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37];
    if n < 2 {
        return false;
    }
    for p in BASES {
        if n % p == 0 {
            return n == p;
        }
    }
    let s = (n - 1).trailing_zeros();
    let d = (n - 1) >> s;
    'base: for a in BASES {
        let mut x = pow_mod(a, d, n);
        if x == 1 || x == n - 1 {
            continue;
        }
        for _ in 1..s {
            x = mul_mod(x, x, n);
            if x == n - 1 {
                continue 'base;
            }
        }
        return false;
    }
    true
}

/// The integer k-th root of n, rounded down.
fn iroot(n: u64, k: u32) -> u64 {
    let mut r = (n as f64).powf(1.0 / k as f64) as u64;
    while r > 0 && r.checked_pow(k).is_none_or(|v| v > n) {
        r -= 1;
    }
    while (r + 1).checked_pow(k).is_some_and(|v| v <= n) {
        r += 1;
    }
    r
}

/// `Some((p, k))` when n = p^k with p prime and k ≥ 1.
pub fn prime_power(n: u64) -> Option<(u64, u32)> {
    if n < 2 {
        return None;
    }
    if n % 2 == 0 {
        return (n & (n - 1) == 0).then(|| (2, n.trailing_zeros()));
    }
    for k in (1..=63 - n.leading_zeros()).rev() {
        let r = iroot(n, k);
        if r >= 2 && r.pow(k) == n && is_prime(r) {
            return Some((r, k));
        }
    }
    None
}

fn rho(n: u64) -> u64 {
    let mut c = 1;
    loop {
        let f = |x: u64| (mul_mod(x, x, n) + c) % n;
        let (mut x, mut y, mut d) = (2, 2, 1);
        while d == 1 {
            x = f(x);
            y = f(f(y));
            d = gcd(x.abs_diff(y), n);
        }
        if d != n {
            return d;
        }
        c += 1;
    }
}

fn gcd(mut a: u64, mut b: u64) -> u64 {
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a
}

/// The prime factorisation of n ≥ 1 as (prime, exponent), primes ascending.
pub fn factor(mut n: u64) -> Vec<(u64, u32)> {
    let mut primes = Vec::new();
    for p in 2..1000u64 {
        while n % p == 0 {
            primes.push(p);
            n /= p;
        }
    }
    let mut stack = vec![n];
    while let Some(m) = stack.pop() {
        if m == 1 {
            continue;
        }
        if is_prime(m) {
            primes.push(m);
        } else {
            let d = rho(m);
            stack.push(d);
            stack.push(m / d);
        }
    }
    primes.sort_unstable();
    let mut out: Vec<(u64, u32)> = Vec::new();
    for p in primes {
        match out.last_mut() {
            Some((q, e)) if *q == p => *e += 1,
            _ => out.push((p, 1)),
        }
    }
    out
}

/// Every divisor of the number whose factorisation is `f`, ascending.
pub fn divisors_of(f: &[(u64, u32)]) -> Vec<u64> {
    let mut ds = vec![1u64];
    for &(p, e) in f {
        let len = ds.len();
        let mut pk = 1;
        for _ in 0..e {
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

    #[test]
    fn small_cases_agree_with_trial_division() {
        for n in 0..5000u64 {
            let trial = n >= 2 && (2..n).take_while(|d| d * d <= n).all(|d| n % d != 0);
            assert_eq!(is_prime(n), trial, "{n}");
            let f = if n >= 1 { factor(n) } else { vec![] };
            if n >= 1 {
                assert_eq!(f.iter().map(|&(p, e)| p.pow(e)).product::<u64>(), n);
                assert_eq!(prime_power(n), (f.len() == 1).then(|| f[0]));
            }
        }
    }

    #[test]
    fn large_numbers() {
        // Derived: 10^12 = 2^12 · 5^12, and 2^61 − 1 is a Mersenne prime (Pervushin 1883).
        assert_eq!(factor(1_000_000_000_000), vec![(2, 12), (5, 12)]);
        assert!(is_prime((1 << 61) - 1));
        assert_eq!(prime_power(3u64.pow(40)), Some((3, 40)));
        assert_eq!(
            factor(1_000_003 * 1_000_033),
            vec![(1_000_003, 1), (1_000_033, 1)]
        );
        assert_eq!(divisors_of(&factor(12)), vec![1, 2, 3, 4, 6, 12]);
    }
}
