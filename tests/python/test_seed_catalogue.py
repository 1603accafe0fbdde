"""Every entry of `seed-catalogue/sequences/` rebuilt and checked in numpy, independently of Rust.

Each line is parsed here from its text, its matrix (or identity) is rebuilt with numpy from the
published definition, and checked:
- Williamson quadruples: Williamson's array [[A, B, C, D], [−B, A, −D, C], [−C, D, A, −B],
  [−D, −C, B, A]] of symmetric circulants is Hadamard of order 4m (Williamson, Duke Math. J. 11,
  1944; the array is common practice).
- Goethals–Seidel quadruples: the Goethals–Seidel array with the back-identity R (Goethals and
  Seidel, J. Austral. Math. Soc. 11, 1970 [recalled]) is Hadamard of order 4v, and
  skew-Hadamard when the first sequence is skew-type.
- Golay pairs, base sequences, Turyn-type sequences and T-sequences: their aperiodic
  autocorrelations, from numpy.correlate, sum to zero at every nonzero shift (Golay, IRE Trans.
  Inf. Theory 7, 1961; Turyn, J. Combin. Theory A 16, 1974; both [recalled]).
Then every order the Williamson and Goethals–Seidel entries give is built by `hadamard build`,
and numpy checks H @ H.T == nI on the file it writes.
"""

import os
import re
import subprocess
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[2]
BIN = os.environ.get("HADAMARD_BIN", str(ROOT / "target" / "release" / "hadamard"))
SEQ = ROOT / "seed-catalogue" / "sequences"


def entries():
    out = []
    for path in sorted(SEQ.glob("*.txt")):
        for k, line in enumerate(path.read_text().splitlines(), 1):
            line = line.strip()
            if not line or line.startswith("#"):
                continue
            head, _, provenance = line.partition("|")
            words = head.split()
            fields = dict(w.split("=", 1) for w in words[1:])
            out.append((f"{path.name}:{k}", words[0], fields, provenance.strip()))
    return out


ENTRIES = entries()


def seq(text):
    return np.array([{"+": 1, "-": -1, "0": 0}[c] for c in text], dtype=np.int64)


def circulant(first_row):
    # C[i][j] = a[(j − i) mod v]: each row is the previous one shifted right.
    v = len(first_row)
    idx = (np.arange(v)[None, :] - np.arange(v)[:, None]) % v
    return first_row[idx]


def naf(a, s):
    return int(np.dot(a[: len(a) - s], a[s:])) if s < len(a) else 0


def is_hadamard(h):
    # In float64 (BLAS): every entry of H @ H.T is an integer of size at most n < 2^53, so the
    # product is exact, and order 1852 takes a fraction of a second instead of a minute in int64.
    n = h.shape[0]
    f = h.astype(np.float64)
    return h.shape == (n, n) and np.array_equal(f @ f.T, n * np.eye(n))


def test_every_entry_has_a_dated_provenance():
    assert ENTRIES
    for where, kind, _, provenance in ENTRIES:
        assert provenance, where
        assert re.search(r"\d{4}-\d{2}-\d{2}$", provenance), (where, provenance)


@pytest.mark.parametrize("where,kind,f", [(w, k, f) for w, k, f, _ in ENTRIES], ids=[e[0] for e in ENTRIES])
def test_entry_satisfies_its_defining_identity(where, kind, f):
    if kind == "williamson":
        a, b, c, d = (circulant(seq(f[x])) for x in "abcd")
        for x in (a, b, c, d):
            assert np.array_equal(x, x.T), where  # symmetric circulants
        h = np.block([[a, b, c, d], [-b, a, -d, c], [-c, d, a, -b], [-d, -c, b, a]])
        assert is_hadamard(h), where
    elif kind == "gs":
        a0, a1, a2, a3 = (circulant(seq(f[x])) for x in "abcd")
        r = np.fliplr(np.eye(a0.shape[0], dtype=np.int64))
        h = np.block(
            [
                [a0, a1 @ r, a2 @ r, a3 @ r],
                [-a1 @ r, a0, -r @ a3, r @ a2],
                [-a2 @ r, r @ a3, a0, -r @ a1],
                [-a3 @ r, -r @ a2, r @ a1, a0],
            ]
        )
        assert is_hadamard(h), where
        # A skew-type first row (a[0] = +1, a[-x] = -a[x]) makes the matrix skew-Hadamard,
        # H + H^T = 2I: the reason for the array (Goethals and Seidel 1970, title "A skew
        # Hadamard matrix of order 36" [recalled]). The catalogue's v = 127 entry is one.
        a = seq(f["a"])
        if a[0] == 1 and np.array_equal(a[1:], -a[1:][::-1]):
            assert np.array_equal(h + h.T, 2 * np.eye(h.shape[0], dtype=np.int64)), where
    else:
        keys = {"golay": "ab", "base": "abcd", "turyn": "abcd", "tseq": ["t1", "t2", "t3", "t4"]}[kind]
        weights = [1, 1, 2, 2] if kind == "turyn" else [1] * len(keys)
        xs = [seq(f[k]) for k in keys]
        longest = max(len(x) for x in xs)
        for s in range(1, longest):
            # numpy.correlate gives the same aperiodic autocorrelation as the dot product.
            assert all(np.correlate(x, x, "full")[len(x) - 1 + s] == naf(x, s) for x in xs if s < len(x))
            assert sum(w * naf(x, s) for w, x in zip(weights, xs)) == 0, (where, s)
        if kind == "tseq":
            # One nonzero entry per position across the four.
            assert np.array_equal(sum(np.abs(x) for x in xs), np.ones(longest, dtype=np.int64)), where


ORDERS = sorted(
    {4 * len(f["a"]) for _, k, f, _ in ENTRIES if k in ("williamson", "gs") and 4 * len(f["a"]) <= 1208}
)


@pytest.mark.parametrize("n", ORDERS)
def test_orders_from_the_entries_build_and_numpy_agrees(tmp_path, n):
    out = tmp_path / f"h{n}.npy"
    r = subprocess.run([BIN, "build", str(n), "--format", "npy", "-o", str(out)], capture_output=True, timeout=300)
    assert r.returncode == 0, (n, r.stderr)
    assert is_hadamard(np.load(out).astype(np.int64)), n


def test_the_catalogue_has_a_skew_type_goethals_seidel_entry():
    # The v = 127 quadruple from `hadamard search gs --types skew,sym,sym,sym` gives a skew
    # Hadamard matrix of order 508; the identity test above checks H + H^T = 2I for it.
    skew = [w for w, k, f, _ in ENTRIES if k == "gs" and (lambda a: a[0] == 1 and np.array_equal(a[1:], -a[1:][::-1]))(seq(f["a"]))]
    assert skew
