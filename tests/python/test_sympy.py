"""Primality, prime powers and factoring of hadamard-core::arith against sympy."""

import sympy


def test_primality_and_prime_powers_up_to_the_limit(arith):
    limit = arith["limit"]
    bits = arith["is_prime"]
    assert len(bits) == limit + 1
    powers = {n: (p, k) for n, p, k in arith["prime_powers"]}
    for n in range(limit + 1):
        # sympy: isprime is deterministic in this range.
        assert (bits[n] == "1") == sympy.isprime(n), n
    for n in range(2, limit + 1):
        # sympy: n is a prime power exactly when factorint has one prime.
        f = sympy.factorint(n)
        if len(f) == 1:
            ((p, k),) = f.items()
            assert powers.get(n) == (p, k), n
        else:
            assert n not in powers, n
    assert 0 not in powers and 1 not in powers


def test_large_numbers(arith):
    for e in arith["large"]:
        n = int(e["n"])
        # sympy: isprime and factorint on 64-bit numbers.
        assert e["is_prime"] == sympy.isprime(n), n
        f = sympy.factorint(n)
        assert [(int(p), k) for p, k in e["factors"]] == sorted(f.items()), n
        expect = None
        if len(f) == 1:
            ((p, k),) = f.items()
            expect = (p, k)
        got = None if e["prime_power"] is None else (int(e["prime_power"][0]), e["prime_power"][1])
        assert got == expect, n
