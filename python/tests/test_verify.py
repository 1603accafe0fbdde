"""verify() against numpy's H·Hᵀ, on arrays of every layout and on files."""

import json

import numpy as np
import pytest

import hadamard_registry as hr
from conftest import canonical_id, cli, cli_json, needs_cli


def numpy_failing_pairs(h):
    g = h.astype(np.int64) @ h.astype(np.int64).T
    i, j = np.nonzero(np.triu(g, 1))
    return [(int(a), int(b), int(g[a, b])) for a, b in zip(i, j)]


@pytest.mark.parametrize(
    "layout",
    [
        lambda h: h,
        lambda h: h.astype(np.float64),
        lambda h: h.astype(np.float32),
        lambda h: h.astype(np.int64),
        lambda h: np.asfortranarray(h),
        lambda h: h[::-1, ::-1],  # negative strides: rows reversed is still Hadamard
        lambda h: np.repeat(np.repeat(h, 2, axis=0), 3, axis=1)[::2, ::3],  # a strided view
        lambda h: h.T,
        lambda h: h.tolist(),
    ],
)
def test_any_layout_of_a_hadamard_matrix_passes(layout):
    h = hr.hadamard(20)
    r = hr.verify(layout(h))
    assert r["hadamard"] is True and r["failures"] == [] and r["failing_pairs_total"] == 0
    assert r["sha256"] == canonical_id(np.asarray(layout(h)))


def test_failing_pairs_are_numpys():
    rng = np.random.default_rng(7)
    h = hr.hadamard(36).astype(np.float64)
    for _ in range(3):
        i, j = rng.integers(0, 36, size=2)
        h[i, j] = -h[i, j]
    r = hr.verify(h, max_pairs=1000)
    want = numpy_failing_pairs(h)
    got = [(p["i"], p["j"], p["dot"]) for p in r["failing_pairs"]]
    assert r["hadamard"] is False and got == want and r["failing_pairs_total"] == len(want)
    assert r["failing_pairs_index_base"] == 0


def test_one_wrong_sign_is_located_and_repaired():
    h, id_ = hr.hadamard(44, with_id=True)
    bad = h.copy()
    bad[10, 33] *= -1
    r = hr.verify(bad)
    # One flipped entry makes row 10 fail against every other row with inner product ±2.
    assert r["failing_pairs_total"] == 43 == len(numpy_failing_pairs(bad))
    rep = r["repair"]
    assert (rep["kind"], rep["row"], rep["col"], rep["index_base"], rep["corrected_sha256"]) == ("single_wrong_entry", 10, 33, 0, id_)
    assert rep["entries"] == [{"row": 10, "col": 33, "was": int(bad[10, 33]), "now": int(h[10, 33])}]


def test_nan_entries_are_erased_and_completed():
    h, id_ = hr.hadamard(12, with_id=True)
    e = h.astype(np.float64)
    e[2, 7] = np.nan
    e[5, 1] = np.nan
    r = hr.verify(e)
    assert r["hadamard"] is False and r["erased_entries"] == 2
    c = r["completion"]
    assert (c["kind"], c["completed_sha256"]) == ("unique", id_)
    assert sorted(map(tuple, c["values"])) == [(2, 7, int(h[2, 7])), (5, 1, int(h[5, 1]))]


def test_properties_are_numpys():
    for n in [12, 20, 64, 100]:
        h = hr.hadamard(n)
        p = hr.verify(h)["properties"]
        assert p["symmetric"] == bool(np.array_equal(h, h.T))
        assert p["skew"] == bool(np.array_equal(h + h.T, 2 * np.eye(n, dtype=np.int8)))
        assert p["normalized"] == bool((h[0] == 1).all() and (h[:, 0] == 1).all())
        assert p["excess"] == int(h.astype(np.int64).sum())


def test_bad_entries_name_their_place():
    a = np.ones((4, 4))
    a[2, 3] = 0.5
    with pytest.raises(hr.MatrixParseError) as e:
        hr.verify(a)
    assert e.value.location == {"row": 2, "column": 3} and "0.5" in str(e.value)
    with pytest.raises(hr.MatrixParseError):
        hr.verify(np.ones((2, 2, 2)))
    with pytest.raises(hr.MatrixParseError):
        hr.verify(np.array([["+", "-"]]))
    with pytest.raises(hr.MatrixParseError):
        hr.verify(np.ones((0, 0)))


def test_a_rectangular_matrix_is_not_square():
    r = hr.verify(hr.hadamard(8)[:4])
    assert r["hadamard"] is False and "not_square" in r["failures"]


def test_files_in_every_format(tmp_path):
    h, id_ = hr.hadamard(28, with_id=True)
    np.save(tmp_path / "h.npy", h.astype(np.float64))
    (tmp_path / "h.txt").write_text("".join("".join("+" if v > 0 else "-" for v in row) + "\n" for row in h))
    (tmp_path / "h.csv").write_text("".join(",".join(str(int(v)) for v in row) + "\n" for row in h))
    for name, fmt in [("h.npy", "npy"), ("h.txt", "pm"), ("h.csv", "int")]:
        r = hr.verify(tmp_path / name)
        assert r["hadamard"] is True and r["sha256"] == id_ and r["format"] == fmt, name


def test_a_malformed_file_names_line_and_column(tmp_path):
    p = tmp_path / "bad.txt"
    p.write_text("++++\n+-+-\n++x-\n+--+\n")
    with pytest.raises(hr.MatrixParseError) as e:
        hr.verify(str(p))
    assert e.value.location == {"line": 3, "column": 3}
    with pytest.raises(hr.MatrixParseError):
        hr.verify(tmp_path / "missing.txt")


@needs_cli
def test_the_report_is_the_clis(tmp_path):
    h = hr.hadamard(36).astype(np.int64)
    h[4, 9] *= -1
    p = tmp_path / "m.csv"
    p.write_text("".join(",".join(str(int(v)) for v in row) + "\n" for row in h))
    mine, theirs = hr.verify(p), cli_json("verify", str(p))
    for r in (mine, theirs):
        r.pop("elapsed_ms")
    assert mine == theirs
    from_array = hr.verify(h)
    from_array.pop("elapsed_ms")
    assert from_array == dict(theirs, format="numpy")
