"""GF(p^k) arithmetic of hadamard-core::field against the galois package."""

import galois
import numpy as np


def gf_for(f):
    # Pure-Python arithmetic: a few hundred samples per field do not repay numba compilation.
    p, k = f["p"], f["k"]
    if k == 1:
        return galois.GF(p, compile="python-calculate")
    # Our modulus is c_0..c_k (constant first); galois.Poly wants the highest degree first.
    poly = galois.Poly(f["modulus"][::-1], field=galois.GF(p, compile="python-calculate"))
    return galois.GF(p**k, irreducible_poly=poly, compile="python-calculate")


def test_arithmetic_agrees_on_random_elements(fields):
    for f in fields:
        GF = gf_for(f)
        s = np.array([[x if x is not None else 0 for x in row] for row in f["samples"]], dtype=np.int64)
        a, b = GF(s[:, 0]), GF(s[:, 1])
        # galois: field addition, subtraction and multiplication in the same polynomial basis.
        assert np.array_equal(np.array(a + b), s[:, 2]), f["q"]
        assert np.array_equal(np.array(a - b), s[:, 3]), f["q"]
        assert np.array_equal(np.array(a * b), s[:, 4]), f["q"]
        nz = s[:, 0] != 0
        # galois: multiplicative inverse (reciprocal) of every nonzero sample.
        assert np.array_equal(np.array(np.reciprocal(a[nz])), s[nz, 5]), f["q"]
        assert all(row[5] is None for row in f["samples"] if row[0] == 0)
        # galois: is_square() gives the quadratic character (0 for 0).
        chi = np.where(s[:, 0] == 0, 0, np.where(a.is_square(), 1, -1))
        if f["p"] == 2:
            chi = np.where(s[:, 0] == 0, 0, 1)
        assert np.array_equal(chi, s[:, 6]), f["q"]


def test_modulus_and_generator_are_the_first_primitive_ones(fields):
    for f in fields:
        p, k, q = f["p"], f["k"], f["q"]
        GF = gf_for(f)
        # galois: our primitive element really has order q - 1.
        assert GF(f["generator"]).multiplicative_order() == q - 1, q
        if k == 1:
            # galois: primitive_root(p) is the least primitive root.
            assert galois.primitive_root(p) == f["generator"], q
        else:
            poly = galois.Poly(f["modulus"][::-1], field=galois.GF(p, compile="python-calculate"))
            # galois: primitive_polys yields monic primitive polynomials in lexicographic order.
            first = next(galois.primitive_polys(p, k))
            assert poly == first, (q, poly, first)
            assert f["generator"] == p  # x is the primitive element
