"""rotate() against the dense product x @ H.T / sqrt(d), built outside the package's kernel:
H = kron(hadamard(m), scipy.linalg.hadamard(2^a)), and against norms (a Hadamard matrix
divided by sqrt(d) is orthogonal, by H·Hᵀ = dI)."""

import numpy as np
import pytest
import scipy.linalg

import hadamard_registry as hr
from conftest import canonical_id


def reference_rows(d, start, stop):
    """Rows start..stop of H = H_m ⊗ H_{2^a}, built with numpy.kron and scipy.linalg.hadamard."""
    p = hr.rotation_plan(d)
    hm = hr.hadamard(p["dense"]).astype(np.float64)
    hs = scipy.linalg.hadamard(1 << p["power_of_two"]).astype(np.float64)
    s = hs.shape[0]
    rows = []
    for r in range(start, stop, s):
        i = r // s
        rows.append(np.kron(hm[i:i + 1], hs))
    return np.vstack(rows)[: stop - start]


@pytest.mark.parametrize("d, vectors", [(12, 64), (172, 64), (3584, 16), (14336, 4)])
def test_rotate_is_the_dense_product(d, vectors):
    rng = np.random.default_rng(d)
    x = rng.standard_normal((vectors, d))
    y = hr.rotate(x)
    # The dense product in float64 blocks of rows of H, so H is never held whole.
    step = 1 << hr.rotation_plan(d)["power_of_two"]  # one row of H_m at a time
    step *= max(1, 512 // step)
    want = np.empty_like(x)
    for start in range(0, d, step):
        stop = min(d, start + step)
        want[:, start:stop] = x @ reference_rows(d, start, stop).T / np.sqrt(d)
    assert np.allclose(y, want, rtol=1e-10, atol=1e-10)
    # float32 agrees to single precision.
    y32 = hr.rotate(x.astype(np.float32))
    assert y32.dtype == np.float32
    assert np.allclose(y32, want, rtol=1e-4, atol=1e-4)


@pytest.mark.parametrize("d", [12, 172, 3584, 14336])
def test_rotate_keeps_norms(d):
    rng = np.random.default_rng(1 + d)
    for dtype in (np.float64, np.float32):
        x = rng.standard_normal((8, d)).astype(dtype)
        ratio = np.linalg.norm(hr.rotate(x).astype(np.float64), axis=1) / np.linalg.norm(x.astype(np.float64), axis=1)
        assert np.all(np.abs(ratio - 1) < 1e-6), (d, dtype, ratio)


def test_powers_of_two_are_scipys_sylvester_matrix():
    for k in range(0, 13):
        d = 1 << k
        x = np.random.default_rng(k).standard_normal((3, d))
        assert np.allclose(hr.rotate(x, normalized=False), x @ scipy.linalg.hadamard(d).T)


def test_model_dimensions_factor_as_published():
    # 3584 = 128·28 and 1152 = 32·36 (references.md#r11-dimensions-users-ask-for).
    assert (hr.rotation_plan(3584)["power_of_two"], hr.rotation_plan(3584)["dense"]) == (7, 28)
    assert (hr.rotation_plan(1152)["power_of_two"], hr.rotation_plan(1152)["dense"]) == (5, 36)


@pytest.mark.parametrize("d", [12, 172, 3584])
def test_rotation_matrix_and_id_are_the_kronecker_product(d):
    h = hr.rotation_matrix(d)
    want = reference_rows(d, 0, d).astype(np.int8)
    assert np.array_equal(h, want)
    assert hr.rotation_id(d) == canonical_id(want)
    x = np.random.default_rng(0).standard_normal((5, d))
    assert np.allclose(hr.rotate(x), x @ h.T.astype(np.float64) / np.sqrt(d))


def test_rotation_id_at_14336_is_the_kronecker_products():
    d = 14336
    p = hr.rotation_plan(d)
    assert (p["power_of_two"], p["dense"]) == (9, 28)
    assert hr.rotation_id(d) == canonical_id(np.kron(hr.hadamard(28), scipy.linalg.hadamard(512).astype(np.int8)))


def test_axes_batches_and_layouts():
    rng = np.random.default_rng(3)
    x = rng.standard_normal((5, 20, 7))
    h = hr.rotation_matrix(20).astype(np.float64)
    y = hr.rotate(x, dim=1)
    assert y.shape == x.shape
    assert np.allclose(y, np.einsum("ij,ajb->aib", h, x) / np.sqrt(20))
    # A non-contiguous view gives the same answer as its copy.
    v = rng.standard_normal((40, 24))[::2, ::-1]
    assert np.allclose(hr.rotate(v), hr.rotate(v.copy()))
    # A large batch (split across threads) agrees with one vector at a time.
    big = rng.standard_normal((700, 172))
    one = np.vstack([hr.rotate(row) for row in big[:5]])
    assert np.allclose(hr.rotate(big)[:5], one)


def test_rotate_errors():
    with pytest.raises(TypeError):
        hr.rotate(np.ones(12, dtype=np.int64))
    with pytest.raises(hr.RotationError) as e:
        hr.rotate(np.ones(6))  # 6 = 2·3, and 3 is not a Hadamard order (references.md#r1-impossible-orders)
    assert e.value.dimension == 6
    with pytest.raises(hr.RotationError):
        hr.rotate(np.ones((2, 668)))  # 668 is open (references.md#r3-open-orders)
