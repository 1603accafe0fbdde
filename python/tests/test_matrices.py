"""hadamard(n) against outside references: numpy's H·Hᵀ for every constructible order up to
1208, scipy.linalg.hadamard for the powers of two, and hashlib for the ids."""

import subprocess

import numpy as np
import pytest
import scipy.linalg

import hadamard_registry as hr
from conftest import canonical_id, cli, needs_cli


def constructible_orders(limit):
    return [n for n in [1, 2, *range(4, limit + 1, 4)] if hr.routes(n)["status"] == "constructible"]


def test_every_constructible_order_up_to_1208_satisfies_h_ht_equals_n_i():
    # The definition of a Hadamard matrix, checked by numpy's BLAS product. float32 is exact
    # here: every entry of H·Hᵀ is an integer of size at most 1208 < 2^24.
    orders = constructible_orders(1208)
    assert len(orders) > 250
    for n in orders:
        h = hr.hadamard(n)
        assert h.dtype == np.int8 and h.shape == (n, n) and h.flags.c_contiguous
        assert np.array_equal(np.abs(h), np.ones((n, n), np.int8)), n
        f = h.astype(np.float32)
        assert np.array_equal(f @ f.T, n * np.eye(n, dtype=np.float32)), n


def test_powers_of_two_equal_scipy_where_the_route_is_sylvester():
    # scipy.linalg.hadamard builds Sylvester's matrix in natural order; where the catalogue's
    # route for 2^k is Sylvester's, the matrices are the same entry for entry.
    for k in range(0, 11):
        n = 1 << k
        route = hr.routes(n)["routes"][0]
        assert route["method"] == "sylvester", (n, route["method"])
        assert np.array_equal(hr.hadamard(n), scipy.linalg.hadamard(n)), n


def test_the_id_is_the_sha256_of_the_canonical_text():
    for n in [1, 2, 12, 20, 28, 36, 40, 52, 108, 140, 156, 172, 1000]:
        h, id_ = hr.hadamard(n, with_id=True)
        assert id_ == canonical_id(h), n
        assert hr.verify(h)["sha256"] == id_


@needs_cli
def test_the_id_is_the_one_hadamard_build_writes():
    for n in [12, 20, 36, 92, 172, 432, 1000]:
        if hr.routes(n)["status"] != "constructible":
            continue
        text = subprocess.run([cli(), "build", str(n)], capture_output=True, check=True).stdout
        import hashlib

        assert hr.hadamard(n, with_id=True)[1] == hashlib.sha256(text).hexdigest(), n


@pytest.mark.parametrize(
    "n, status",
    [
        (6, "impossible"),  # not 1, 2 or a multiple of 4 (references.md#r1-impossible-orders)
        (668, "open"),  # the smallest open order (references.md#r3-open-orders)
    ],
)
def test_an_order_that_cannot_be_built_raises_with_its_status(n, status):
    with pytest.raises(hr.NotConstructibleError) as e:
        hr.hadamard(n)
    assert e.value.order == n and e.value.status == status
    assert status in str(e.value) and e.value.reason
    assert isinstance(e.value, hr.HadamardError)


def test_bad_arguments_are_python_errors():
    with pytest.raises(TypeError):
        hr.hadamard(12.0)
    with pytest.raises(ValueError):
        hr.hadamard(-4)
