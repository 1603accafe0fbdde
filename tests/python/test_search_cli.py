"""`hadamard search gs --types` end to end, checked with numpy.

Sources: the Goethals–Seidel array with the back-identity R is Hadamard of order 4v when the
four periodic autocorrelations sum to zero, and skew-Hadamard (H + H^T = 2I) when the first
sequence is skew-type (Goethals and Seidel, J. Austral. Math. Soc. 11 (1970) [recalled]).
"""

import json
import os
import subprocess
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
BIN = os.environ.get("HADAMARD_BIN", str(ROOT / "target" / "release" / "hadamard"))


def run(*args):
    return subprocess.run([BIN, *args], capture_output=True, text=True, timeout=120)


def seq(text):
    return np.array([1 if c == "+" else -1 for c in text], dtype=np.int64)


def circulant(a):
    v = len(a)
    return a[(np.arange(v)[None, :] - np.arange(v)[:, None]) % v]


def gs_matrix(rows):
    a0, a1, a2, a3 = (circulant(seq(r)) for r in rows)
    r = np.fliplr(np.eye(a0.shape[0], dtype=np.int64))
    return np.block(
        [
            [a0, a1 @ r, a2 @ r, a3 @ r],
            [-a1 @ r, a0, -r @ a3, r @ a2],
            [-a2 @ r, r @ a3, a0, -r @ a1],
            [-a3 @ r, -r @ a2, r @ a1, a0],
        ]
    )


def test_a_skew_type_search_gives_skew_hadamard_matrices():
    # v = 19, H = <7> = {1, 7, 11}: -1 is not a multiplier, so a skew-type block exists.
    r = run("search", "gs", "--v", "19", "--multiplier", "7", "--types", "skew,sym,sym,sym", "--all", "--json", "--quiet")
    assert r.returncode == 0, r.stderr
    out = json.loads(r.stdout)
    assert out["search"] == "gs v=19 multiplier=7 types=skew,sym,sym,sym" and out["finished"]
    assert out["results"]
    for line in out["results"]:
        data, _, provenance = line.partition("|")
        assert "--types skew,sym,sym,sym" in provenance
        f = dict(w.split("=", 1) for w in data.split()[1:])
        rows = [f[k] for k in "abcd"]
        a = seq(rows[0])
        assert a[0] == 1 and np.array_equal(a[1:], -a[1:][::-1])  # skew-type
        for x in rows[1:]:
            b = seq(x)
            assert np.array_equal(b[1:], b[1:][::-1])  # symmetric
            assert all(b[(7 * i) % 19] == b[i] for i in range(19))  # fixed by the multiplier 7
        h = gs_matrix(rows)
        n = h.shape[0]
        assert np.array_equal(h @ h.T, n * np.eye(n, dtype=np.int64))
        assert np.array_equal(h + h.T, 2 * np.eye(n, dtype=np.int64))


def test_impossible_or_malformed_types_are_refused_with_the_block_named():
    # 7 has order 6 mod 43 and 7^3 = 343 = 8*43 - 1, so -1 is a multiplier: no skew-type block.
    r = run("search", "gs", "--v", "43", "--multiplier", "7", "--types", "sym,skew,sym,sym")
    assert r.returncode == 2 and "block 2 cannot be skew-type" in r.stderr, r.stderr
    r = run("search", "gs", "--v", "67", "--multiplier", "29", "--types", "sym,sym,odd,any")
    assert r.returncode == 2 and "block 3" in r.stderr and "odd" in r.stderr, r.stderr
    r = run("search", "gs", "--v", "67", "--multiplier", "29", "--types", "sym,sym")
    assert r.returncode == 2 and "four block types" in r.stderr, r.stderr
