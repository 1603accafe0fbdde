"""Screening designs and BRR replicates, checked with numpy against their defining properties
(Plackett and Burman, Biometrika 33, 1946; McCarthy, Vital and Health Statistics Series 2
No. 14, 1966: orthogonal, balanced columns)."""

import numpy as np
import pytest

import hadamard_registry as hr
from conftest import cli_json, needs_cli


def test_screening_columns_are_orthogonal_and_balanced():
    for k in [3, 7, 11, 19, 27]:
        d = hr.screening(k)
        c = d["coded"].astype(np.int64)
        n = c.shape[0]
        assert c.shape == (n, k) and n > k and n % 4 == 0
        assert np.array_equal(c.T @ c, n * np.eye(k, dtype=np.int64))
        assert np.all(c.sum(axis=0) == 0)


def test_fold_over_and_centre_points():
    d = hr.screening(5, order=8, fold_over=True, centre_points=3, seed=11)
    c = d["coded"].astype(np.int64)
    assert c.shape == (19, 5)
    assert (c == 0).all(axis=1).sum() == 3
    assert np.array_equal(c.T @ c, 16 * np.eye(5, dtype=np.int64))
    assert d["randomisation"]["seed"] == 11
    assert hr.screening(5, order=8, fold_over=True, centre_points=3, seed=11)["runs"] == d["runs"]


def test_screening_from_a_matrix_given():
    h = hr.hadamard(12)
    d = hr.screening(4, matrix=h[::-1])
    assert d["order"] == 12 and d["coded"].shape == (12, 4)
    bad = h.copy()
    bad[0, 0] = -1
    with pytest.raises(hr.NotHadamardError):
        hr.screening(4, matrix=bad)
    with pytest.raises(hr.DeriveError) as e:
        hr.screening(12, order=12)
    assert e.value.parameter


def test_brr_weights():
    for k in [1, 4, 11, 30]:
        r = hr.brr(k)
        s = r["sign_array"].astype(np.int64)
        n = r["replicates"]
        assert s.shape == (n, k) and n > k
        assert np.array_equal(s.T @ s, n * np.eye(k, dtype=np.int64))  # orthogonal
        assert np.all(s.sum(axis=0) == 0)  # each PSU kept in half the replicates
        w = r["weights"]
        assert w.shape == (n, k, 2) and np.all(w.sum(axis=2) == 2.0)
        assert np.array_equal(w[..., 0] == 2.0, s > 0)
    with pytest.raises(hr.DeriveError):
        hr.brr(0)


@needs_cli
def test_brr_is_the_clis():
    mine = hr.brr(11)
    for key in ("sign_array", "weights"):
        mine.pop(key)
    assert mine == cli_json("derive", "brr", "--strata", "11")
