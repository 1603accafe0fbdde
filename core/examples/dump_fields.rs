//! Writes what `hadamard-core` computes for fields, integers and constructions, so independent
//! tools (numpy, scipy, galois, sympy; see `tests/python/`) can check it.
//!
//! Usage: `cargo run -p hadamard-core --example dump_fields -- OUTDIR`
//!
//! Writes `OUTDIR/fields.json`, `OUTDIR/arith.json`, and `OUTDIR/matrices/*.txt` (one row per
//! line, `+` for +1 and `-` for −1) with `OUTDIR/matrices/index.json` describing each matrix.

use hadamard_core::arith::{factor, is_prime, prime_power};
use hadamard_core::construct::sequences::GolayPair;
use hadamard_core::construct::{self as c, ConstructError};
use hadamard_core::field::Field;
use hadamard_core::verify::{properties, Verified};
use serde_json::{json, Value};
use std::path::Path;

/// A fixed xorshift generator, so every run dumps the same samples.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
}

fn fields(rng: &mut Rng) -> Value {
    let mut qs: Vec<u64> = vec![
        27, 25, 49, 243, 3, 5, 7, 11, 101, 1009, 65_521, 169, 625, 2401,
    ];
    qs.extend((2..=8).map(|k| 1u64 << k));
    let out: Vec<Value> = qs
        .iter()
        .map(|&q| {
            let f = Field::new(q).expect("a prime power below the limit");
            let samples: Vec<Value> = (0..200)
                .map(|_| {
                    let a = (rng.next() % q) as u32;
                    let b = (rng.next() % q) as u32;
                    json!([
                        a,
                        b,
                        f.add(a, b),
                        f.sub(a, b),
                        f.mul(a, b),
                        f.inv(a),
                        f.chi(a)
                    ])
                })
                .collect();
            json!({
                "q": q, "p": f.p(), "k": f.k(), "modulus": f.modulus(), "generator": f.generator(),
                "samples": samples,
            })
        })
        .collect();
    json!(out)
}

fn arith(rng: &mut Rng) -> Value {
    let limit = 100_000u64;
    let primes: String = (0..=limit)
        .map(|n| if is_prime(n) { '1' } else { '0' })
        .collect();
    let powers: Vec<Value> = (0..=limit)
        .filter_map(|n| prime_power(n).map(|(p, k)| json!([n, p, k])))
        .collect();
    let mut large: Vec<u64> = (0..60).map(|_| rng.next()).collect();
    // Products of two primes near 2³², and prime powers, to exercise Pollard's rho and
    // the prime-power test.
    large.extend([
        4_294_967_291u64 * 4_294_967_279,
        1_000_000_007 * 998_244_353,
        3u64.pow(40),
        65_521u64.pow(4),
    ]);
    large.extend([
        (1u64 << 61) - 1,
        u64::MAX,
        u64::MAX - 58,
        3_825_123_056_546_413_051,
    ]);
    let large: Vec<Value> = large
        .iter()
        .map(|&n| json!({"n": n.to_string(), "is_prime": is_prime(n), "prime_power": prime_power(n).map(|(p, k)| json!([p.to_string(), k])), "factors": factor(n).iter().map(|&(p, k)| json!([p.to_string(), k])).collect::<Vec<_>>()}))
        .collect();
    json!({"limit": limit, "is_prime": primes, "prime_powers": powers, "large": large})
}

fn matrices() -> Vec<(String, Result<Verified, ConstructError>)> {
    let mut out: Vec<(String, Result<Verified, ConstructError>)> = Vec::new();
    for k in 0..=10 {
        out.push((format!("sylvester-{k}"), c::sylvester(k)));
    }
    for q in [3u64, 7, 11, 19, 23, 27, 31, 43, 243] {
        out.push((format!("paley-one-{q}"), c::paley_one(q)));
    }
    for q in [5u64, 9, 13, 25, 49, 125] {
        out.push((format!("paley-two-{q}"), c::paley_two(q)));
    }
    let conf = |q| c::paley_conference(q).expect("q ≡ 1 mod 4");
    let h = |r: Result<Verified, ConstructError>| r.expect("builds");
    out.push((
        "conference-6x4".into(),
        c::conference_product(&conf(5), &h(c::sylvester(2))),
    ));
    out.push((
        "conference-14x12".into(),
        c::conference_product(&conf(13), &h(c::paley_one(11))),
    ));
    out.push((
        "conference-6x20".into(),
        c::conference_product(&conf(5), &h(c::paley_one(19))),
    ));
    for q in [3u64, 5, 7, 11] {
        out.push((format!("twin-prime-{q}"), c::twin_prime_power(q)));
    }
    for q in [5u64, 9, 13, 29] {
        let w = c::turyn_williamson(q).expect("q ≡ 1 mod 4");
        out.push((format!("turyn-williamson-{q}"), c::williamson_array(&w)));
    }
    let g2 = GolayPair {
        a: vec![1, 1],
        b: vec![1, -1],
    };
    let g8 = c::golay_doubling(&c::golay_doubling(&g2));
    for (i, t) in c::golay_to_t(&g8).iter().enumerate() {
        out.push((format!("t-sequences-golay8-{i}"), c::t_sequences(t)));
    }
    let w3 = c::turyn_williamson(5).expect("q = 5");
    let t3 = &c::golay_to_t(&g2)[1];
    out.push(("cooper-wallis-3x3".into(), c::cooper_wallis(t3, &w3)));
    out.push((
        "skew-double-paley-one-11".into(),
        c::skew_double(&h(c::paley_one(11))),
    ));
    out.push((
        "kronecker-2x12".into(),
        c::kronecker(&h(c::sylvester(1)), &h(c::paley_one(11))),
    ));
    out
}

fn main() -> std::io::Result<()> {
    let dir = std::env::args().nth(1).unwrap_or_else(|| "dump".into());
    let dir = Path::new(&dir);
    std::fs::create_dir_all(dir.join("matrices"))?;
    let mut rng = Rng(0x9E37_79B9_7F4A_7C15);
    std::fs::write(dir.join("fields.json"), fields(&mut rng).to_string())?;
    std::fs::write(dir.join("arith.json"), arith(&mut rng).to_string())?;
    let mut index = Vec::new();
    for (name, built) in matrices() {
        let v = built.map_err(|e| std::io::Error::other(format!("{name}: {e}")))?;
        let p = properties(v.matrix());
        std::fs::write(
            dir.join("matrices").join(format!("{name}.txt")),
            v.matrix().canonical_text(),
        )?;
        index.push(
            json!({"name": name, "order": v.order(), "skew": p.skew, "symmetric": p.symmetric}),
        );
    }
    std::fs::write(
        dir.join("matrices").join("index.json"),
        json!(index).to_string(),
    )?;
    Ok(())
}
