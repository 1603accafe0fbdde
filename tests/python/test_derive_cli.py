"""`hadamard derive` and `hadamard equiv`, each object checked against its defining property
with numpy, independently of the Rust code.

Sources, named again beside each check:
- screening designs: Plackett and Burman, Biometrika 33 (1946) — the columns 1..n-1 of a
  normalised Hadamard matrix are balanced and pairwise orthogonal; fold-over: Box and Hunter,
  Technometrics 3 (1961); the run order: SplitMix64 (Steele, Lea and Flood, OOPSLA 2014) with
  a Fisher–Yates shuffle, re-implemented here from docs/cli.md;
- balanced repeated replication: McCarthy (1966), common practice in survey statistics;
- Hadamard codes: MacWilliams and Sloane (1977), ch. 2 §3;
- the symmetric 2-(n-1, n/2-1, n/4-1) design: Hall, Combinatorial Theory, ch. 14;
- sequency and dyadic order: Walsh (1923), Paley (1932), scipy.linalg.hadamard for the
  natural order; no order-12 matrix has every sequency: Webb and Kennedy, IEEE Trans.
  Computers 20(5), 1971;
- equivalence classes: references.md#r9-equivalence-classes (one class of order 12, five of order 16: Hall).
"""

import csv
import io
import itertools
import json
import os
import subprocess
from pathlib import Path

import numpy as np
import pytest
import scipy.linalg

ROOT = Path(__file__).resolve().parents[2]
BIN = os.environ.get("HADAMARD_BIN", str(ROOT / "target" / "release" / "hadamard"))


def run(*args, check=True):
    r = subprocess.run([BIN, *map(str, args)], capture_output=True, timeout=300)
    if check:
        assert r.returncode == 0, r.stderr.decode()
    return r


def built(tmp_path, n, route=None):
    p = tmp_path / f"h{n}-{route or 'best'}.txt"
    run("build", n, "-o", p, *(["--route", route] if route else []))
    return p


def load_pm(path):
    return np.array([[1 if c == "+" else -1 for c in line] for line in Path(path).read_text().splitlines()])


def normalised(h):
    h = h * h[0, :]
    return h * h[:, [0]]


def splitmix64(seed):
    mask = (1 << 64) - 1
    state = seed
    while True:
        state = (state + 0x9E3779B97F4A7C15) & mask
        z = state
        z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & mask
        z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & mask
        yield z ^ (z >> 31)


def shuffled(items, seed):
    """Fisher–Yates from the top, each index drawn by rejection (docs/cli.md)."""
    items = list(items)
    g = splitmix64(seed)
    for i in range(len(items) - 1, 0, -1):
        bound = i + 1
        rest = (1 << 64) % bound
        while True:
            x = next(g)
            if x < (1 << 64) - rest:
                break
        j = x % bound
        items[i], items[j] = items[j], items[i]
    return items


def test_splitmix64_reference_values():
    # Vigna's reference splitmix64.c from seed 0.
    g = splitmix64(0)
    assert next(g) == 0xE220A8397B1DCDAF


@pytest.mark.parametrize("n,k,seed", [(12, 11, 5), (20, 7, 123456789), (16, 15, 0)])
def test_screening_design_columns_are_orthogonal(tmp_path, n, k, seed):
    path = built(tmp_path, n)
    h = normalised(load_pm(path))
    d = json.loads(run("derive", "screening", "--factors", k, "--fold-over", "--centre-points", 3, "--seed", seed, "--json", path).stdout)
    assert d["order"] == n and d["properties"] == {"columns_orthogonal": True, "columns_balanced": True}
    x = np.array([r["coded"] for r in d["runs"]])
    assert x.shape == (2 * n + 3, k)
    # Plackett and Burman (1946): balanced, pairwise orthogonal columns; still so after the
    # fold-over (Box and Hunter 1961) and with centre points at 0.
    assert (x.T @ x == 2 * n * np.eye(k)).all()
    assert (x.sum(axis=0) == 0).all()
    # The runs are rows of the normalised matrix, in columns 1..k (the default).
    cols = [f["column"] for f in d["factors"]]
    assert cols == list(range(1, k + 1))
    std = sorted(d["runs"], key=lambda r: r["standard_order"])
    assert (np.array([r["coded"] for r in std[:n]]) == h[:, cols]).all()
    assert (np.array([r["coded"] for r in std[n:2 * n]]) == -h[:, cols]).all()
    # The run order replays from the recorded seed with an independent SplitMix64 + Fisher–Yates.
    assert [r["standard_order"] for r in d["runs"]] == shuffled(range(1, 2 * n + 4), seed)
    # CSV carries the same runs, with named levels when asked.
    out = run("derive", "screening", "--factors", k, "--seed", seed, "--format", "csv", "--levels", "lo:hi", path).stdout.decode()
    rows = list(csv.reader(io.StringIO(out)))
    assert rows[0][:3] == ["run", "standard_order", "kind"] and len(rows) == n + 1
    assert {c for r in rows[1:] for c in r[3:]} == {"lo", "hi"}


def test_screening_design_refuses_bad_columns(tmp_path):
    path = built(tmp_path, 12)
    r = run("derive", "screening", "--columns", "1,12", path, check=False)
    assert r.returncode == 1 and b"columns: item 2" in r.stderr


@pytest.mark.parametrize("k,order", [(3, 4), (11, 12), (12, 16), (40, 44), (100, 104)])
def test_brr_replicates_are_balanced_and_orthogonal(k, order):
    r = json.loads(run("derive", "brr", "--strata", k, "--json").stdout)
    # The smallest known order > k (every multiple of 4 here is known: references.md#r3-open-orders).
    assert r["replicates"] == order == r["smallest_known_order"]
    s = np.array(r["signs"])
    assert s.shape == (order, k)
    # McCarthy (1966): each PSU in half the replicates, strata pairwise orthogonal.
    assert (s.sum(axis=0) == 0).all()
    assert (s.T @ s == order * np.eye(k)).all()
    # No stratum gets the constant row.
    assert not any((s[:, j] == s[0, j]).all() for j in range(k))


@pytest.mark.parametrize("n", [8, 12, 20, 32])
def test_hadamard_codes_have_the_stated_distance(tmp_path, n):
    path = built(tmp_path, n)
    expect = {"full": (n, 2 * n, n // 2), "punctured": (n - 1, 2 * n, n // 2 - 1), "shortened": (n - 1, n, n // 2)}
    for variant, (length, size, dist) in expect.items():
        c = json.loads(run("derive", "code", "--variant", variant, "--json", path).stdout)
        w = np.array([[int(b) for b in word] for word in c["words"]])
        assert w.shape == (size, length) == (c["size"], c["length"])
        assert len({tuple(x) for x in w}) == size
        # MacWilliams and Sloane (1977) ch. 2 §3: minimum distance n/2 (full, shortened), n/2-1 (punctured).
        d = (w[:, None, :] != w[None, :, :]).sum(axis=2)
        d[np.arange(size), np.arange(size)] = n + 1
        assert d.min() == dist == c["min_distance"]


@pytest.mark.parametrize("n", [8, 12, 16, 28, 64])
def test_symmetric_design_pairs(tmp_path, n):
    path = built(tmp_path, n)
    out = run("derive", "symmetric-design", "--format", "csv", path).stdout.decode()
    inc = np.array([[int(c) for c in line.split(",")] for line in out.splitlines()])
    v, k, lam = n - 1, n // 2 - 1, n // 4 - 1
    assert inc.shape == (v, v)
    assert (inc.sum(axis=1) == k).all()
    # Hall ch. 14: every pair of points in exactly λ blocks, i.e. NᵀN = (k−λ)I + λJ.
    assert (inc.T @ inc == (k - lam) * np.eye(v) + lam).all()


def sign_changes(h):
    return (h[:, 1:] != h[:, :-1]).sum(axis=1)


def test_sequency_and_dyadic_orders_of_sylvester(tmp_path):
    path = built(tmp_path, 32, "sylvester")
    seq = load_pm_bytes(run("derive", "ordering", "--order", "sequency", path).stdout)
    assert list(sign_changes(seq)) == list(range(32))
    # scipy's Sylvester matrix, sorted by sign changes, is the same matrix (Walsh 1923).
    nat = scipy.linalg.hadamard(32)
    assert (nat[np.argsort(sign_changes(nat))] == seq).all()
    # Paley (1932): dyadic order lists natural row bitreverse(p).
    dy = load_pm_bytes(run("derive", "ordering", "--order", "dyadic", path).stdout)
    rev = [int(format(p, "05b")[::-1], 2) for p in range(32)]
    assert (dy == nat[rev]).all()


def load_pm_bytes(b):
    return np.array([[1 if c == "+" else -1 for c in line] for line in b.decode().splitlines()])


def test_order_12_has_no_sequency_order(tmp_path):
    for route in ["paley_one", "paley_two"]:
        path = built(tmp_path, 12, route)
        r = run("derive", "ordering", "--order", "sequency", path, check=False)
        assert r.returncode == 1
        # Webb and Kennedy (1971): no order-12 matrix has every sequency; numpy agrees here.
        assert b"Webb and Kennedy" in r.stderr
        assert len(set(sign_changes(load_pm(path)))) < 12
        rep = json.loads(run("derive", "ordering", "--format", "report", path).stdout)
        assert rep["sequencies"] == list(sign_changes(load_pm(path))) and not rep["distinct"]


def test_scaled_output_is_labelled_and_orthonormal(tmp_path):
    path = built(tmp_path, 20)
    h = load_pm(path)
    npy = tmp_path / "scaled.npy"
    run("derive", "ordering", "--scaled", "--format", "npy-f64", "-o", npy, path)
    s = np.load(npy)
    assert np.allclose(s @ s.T, np.eye(20)) and np.allclose(s * np.sqrt(20), h)
    text = run("derive", "ordering", "--scaled", "--format", "csv", path).stdout.decode()
    assert text.startswith("# SCALED") and "not normalised" in text.splitlines()[0]
    assert np.allclose(np.loadtxt(io.StringIO(text), delimiter=","), s)
    j = json.loads(run("derive", "ordering", "--scaled", "--format", "json", path).stdout)
    assert j["scaled"] is True and np.allclose(np.array(j["matrix"]), s)


def test_single_row(tmp_path):
    path = built(tmp_path, 28)
    h = load_pm(path)
    for i in [0, 13, 27]:
        r = json.loads(run("derive", "row", "--row", i, "--format", "json", path).stdout)
        assert r["values"] == list(h[i])
    assert run("derive", "row", "--row", 28, path, check=False).returncode == 2


# ---- equivalence ----------------------------------------------------------------------


def quad_counts(h):
    """Every invariant `hadamard equiv` may name, computed naively here."""
    n = h.shape[0]
    prof, rows, pairs = {}, [dict() for _ in range(n)], {}
    for q in itertools.combinations(range(n), 4):
        v = str(abs(int(np.prod(h[list(q)], axis=0).sum())))
        prof[v] = prof.get(v, 0) + 1
        for r in q:
            rows[r][v] = rows[r].get(v, 0) + 1
        for p in itertools.combinations(q, 2):
            pairs.setdefault(p, {})
            pairs[p][v] = pairs[p].get(v, 0) + 1
    key = lambda d: sorted((int(a), b) for a, b in d.items())
    return prof, sorted(map(key, rows)), sorted(key(pairs.get(p, {})) for p in itertools.combinations(range(n), 2))


def invariant_value(h, name):
    prof, rows, pairs = quad_counts(h.T if "column" in name or "transpose" in name else h)
    return {"profile4": prof, "profile4_transpose": prof, "row_profiles": rows, "column_profiles": rows,
            "row_pair_profiles": pairs, "column_pair_profiles": pairs}[name]


def normal_form(v):
    if isinstance(v, dict):
        return sorted((int(a), b) for a, b in v.items())
    return sorted(normal_form(x) for x in v) if v and isinstance(v[0], dict) else v


def check_equiv(a_path, b_path):
    """Runs `hadamard equiv` and checks whatever it claims, independently."""
    r = run("equiv", "--json", a_path, b_path, check=False)
    out = json.loads(r.stdout)
    a, b = load_pm(a_path), load_pm(b_path)
    if out["verdict"] == "equivalent":
        assert r.returncode == 0
        c = out["certificate"]
        # B[σ(i)][τ(j)] = ε_i δ_j A[i][j], checked with numpy.
        assert (b[np.ix_(c["row_map"], c["col_map"])] == np.outer(c["row_signs"], c["col_signs"]) * a).all()
    elif out["verdict"] == "inequivalent":
        assert r.returncode == 1
        if out["invariant"]:
            name = out["invariant"]["name"]
            va, vb = invariant_value(a, name), invariant_value(b, name)
            assert normal_form(va) != normal_form(vb)
    return out["verdict"], out


def scrambled(h, rng):
    n = h.shape[0]
    return (h[rng.permutation(n)][:, rng.permutation(n)] * rng.choice([-1, 1], n)[:, None]) * rng.choice([-1, 1], n)


def write_pm(path, h):
    path.write_text("".join("".join("+" if x > 0 else "-" for x in row) + "\n" for row in h))
    return path


def test_order_12_is_one_class(tmp_path):
    # references.md#r9-equivalence-classes: one class of order 12, so Paley I (q=11) and Paley II (q=5) agree.
    a, b = built(tmp_path, 12, "paley_one"), built(tmp_path, 12, "paley_two")
    assert check_equiv(a, b)[0] == "equivalent"
    rng = np.random.default_rng(12)
    for k in range(3):
        assert check_equiv(a, write_pm(tmp_path / f"s{k}.txt", scrambled(load_pm(b), rng)))[0] == "equivalent"


def random_hadamard_16(rng):
    """A random normalised Hadamard matrix of order 16 by backtracking over shuffled rows."""
    n = 16
    cands = np.array([[1] + [(-1 if (b >> j) & 1 else 1) for j in range(n - 1)] for b in range(1 << (n - 1)) if bin(b).count("1") == n // 2])
    cands = cands[rng.permutation(len(cands))]

    def extend(chosen, idx):
        if len(chosen) == n - 1:
            return chosen
        for pos, c in enumerate(idx):
            rest = idx[pos + 1:]
            rest = rest[cands[rest] @ cands[c] == 0]
            if len(rest) + len(chosen) + 1 < n - 1:
                continue
            got = extend(chosen + [c], rest)
            if got:
                return got
        return None

    rows = extend([], np.arange(len(cands)))
    return np.vstack([np.ones(n, dtype=int), cands[rows]])


def test_order_16_has_five_classes_told_apart_by_an_invariant(tmp_path):
    # references.md#r9-equivalence-classes (Hall): five classes of order 16.
    rng = np.random.default_rng(16)
    reps = [built(tmp_path, 16, "sylvester")]
    for k in range(80):
        p = write_pm(tmp_path / f"r{k}.txt", random_hadamard_16(rng))
        assert abs(abs(np.linalg.det(load_pm(p))) - 16.0 ** 8) < 1e-6 * 16.0 ** 8  # Hadamard's bound, attained
        verdicts = [check_equiv(r, p)[0] for r in reps]
        assert "undecided" not in verdicts
        if "equivalent" not in verdicts:
            reps.append(p)
        if len(reps) == 5:
            break
    assert len(reps) == 5
    # Every pair of classes differs in an invariant (not only by exhaustive search).
    for a, b in itertools.combinations(reps, 2):
        verdict, out = check_equiv(a, b)
        assert verdict == "inequivalent" and out["invariant"] is not None


def test_order_32_sylvester_and_paley(tmp_path):
    s, p = built(tmp_path, 32, "sylvester"), built(tmp_path, 32, "paley_one")
    verdict, out = check_equiv(s, p)
    assert verdict == "inequivalent" and out["invariant"]["name"] == "profile4"
    rng = np.random.default_rng(32)
    for path in [s, p]:
        q = write_pm(tmp_path / "scr.txt", scrambled(load_pm(path), rng))
        assert check_equiv(path, q)[0] == "equivalent"
    # A budget too small to decide says so.
    r = run("equiv", "--json", "--budget", "0", s, write_pm(tmp_path / "scr2.txt", scrambled(load_pm(s), rng)), check=False)
    assert r.returncode == 3 and json.loads(r.stdout)["verdict"] == "undecided"


def test_different_orders_are_inequivalent_in_json_too(tmp_path):
    # Equivalence preserves the order (row and column permutations and negations; common practice).
    a, b = built(tmp_path, 12), built(tmp_path, 16)
    r = run("equiv", "--json", a, b, check=False)
    assert r.returncode == 1
    out = json.loads(r.stdout)
    assert out["verdict"] == "inequivalent" and (out["a_order"], out["b_order"]) == (12, 16)
