"""The 4q construction under Miyamoto's hypotheses, checked by numpy.

Source: references.md#r13-miyamotos-4q-theorem, M. Miyamoto, "A construction of Hadamard
matrices", J. Combin. Theory Ser. A 57 (1991) 86–108: a prime power q ≡ 1 (mod 4) and ANY
Hadamard matrix K of order q − 1 give a Hadamard matrix of order 4q. The array is the program's own (core/src/construct/miyamoto.rs); numpy is the
outside check: H @ H.T == 4q·I in integers, on matrices built by the CLI (fields GF(25), GF(49),
GF(125) included, where χ is not a Legendre symbol) and on K scrambled here by seeded random
row and column permutations and negations, which keeps K Hadamard, so the theorem must still hold.
"""

import json
import os
import subprocess
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[2]
BIN = os.environ.get("HADAMARD_BIN", str(ROOT / "target" / "release" / "hadamard"))


def run(*args):
    return subprocess.run([BIN, *args], capture_output=True, timeout=300)


def is_hadamard(h):
    """numpy: H is ±1 and H @ H.T == nI, in int64 (exact)."""
    h = np.asarray(h, dtype=np.int64)
    n = h.shape[0]
    return h.shape == (n, n) and np.all(np.abs(h) == 1) and np.array_equal(h @ h.T, n * np.eye(n, dtype=np.int64))


def build_npy(tmp_path, *args):
    out = tmp_path / "h.npy"
    r = run("build", *args, "--format", "npy", "-o", str(out))
    assert r.returncode == 0, (args, r.stderr)
    return np.load(out).astype(np.int64)


def write_pm(path, h):
    path.write_text("".join("".join("+" if x > 0 else "-" for x in row) + "\n" for row in h))


def load_pm(path):
    return np.array([[1 if c == "+" else -1 for c in line] for line in path.read_text().splitlines()], dtype=np.int64)


# q ≡ 1 (mod 4) prime powers [derived: q = p^k by hand]; 89 and 109 are primes whose 4q (356,
# 436) this construction is the only route to.
@pytest.mark.parametrize("q", [5, 9, 13, 25, 49, 89, 109, 125])
def test_cli_builds_4q_by_the_miyamoto_route(tmp_path, q):
    n = 4 * q
    recipe = tmp_path / "r.json"
    h = build_npy(tmp_path, str(n), "--route", "miyamoto", "--emit-recipe", str(recipe))
    tree = json.loads(recipe.read_text())["tree"]
    # The route really is the 4q construction over GF(q), with a K of order q − 1 below it.
    assert tree["method"] == "miyamoto" and tree["params"]["q"] == q
    assert tree["children"][0]["order"] == q - 1
    assert h.shape == (n, n) and is_hadamard(h), q


def test_routes_list_miyamoto_as_buildable():
    # 436 = 4·109 and 596 = 4·149: the theorem's orders that no other route of ours reaches
    # (issue 12); 149 ≡ 5 (mod 8), so K of order 148 is needed, not Yamada's 74.
    for n in (436, 596):
        o = json.loads(run("routes", "--json", str(n)).stdout)
        assert o["status"] == "constructible", o["note"]
        assert o["routes"][0]["method"] == "miyamoto" and o["routes"][0]["buildable"]


def test_every_buildable_k_of_order_24_gives_order_100(tmp_path):
    # Any Hadamard K works: replay the order-100 recipe with each other route of order 24 the
    # program knows (different K) in place of the one the planner chose.
    first = tmp_path / "first.json"
    build_npy(tmp_path, "100", "--route", "miyamoto", "--emit-recipe", str(first))
    recipe = json.loads(first.read_text())
    routes = json.loads(run("routes", "--json", "--all", "24").stdout)["routes"]
    ks = [r["tree"] for r in routes if r["buildable"]]
    assert len(ks) >= 3
    ids = set()
    for k in ks:
        recipe["tree"]["children"] = [k]
        recipe["id"] = None
        path = tmp_path / "r.json"
        path.write_text(json.dumps(recipe))
        out = tmp_path / "h.npy"
        r = run("build", "--recipe", str(path), "--format", "npy", "-o", str(out))
        assert r.returncode == 0, r.stderr
        h = np.load(out).astype(np.int64)
        assert is_hadamard(h)
        ids.add(h.tobytes())
    assert len(ids) >= 2, "different K should give different matrices"


@pytest.fixture(scope="module")
def example():
    subprocess.run(
        ["cargo", "build", "-q", "--release", "-p", "hadamard-core", "--example", "miyamoto"],
        cwd=ROOT,
        check=True,
    )
    return ROOT / "target" / "release" / "examples" / "miyamoto"


def scramble(k, rng):
    """A random equivalent of K: permute and negate rows and columns."""
    n = k.shape[0]
    rows, cols = rng.permutation(n), rng.permutation(n)
    rs, cs = rng.choice([-1, 1], n), rng.choice([-1, 1], n)
    return (rs[:, None] * k[rows][:, cols]) * cs[None, :]


@pytest.mark.parametrize("q,seed", [(13, 1), (25, 2), (29, 3), (49, 4), (81, 5), (125, 6)])
def test_scrambled_k_gives_a_hadamard_matrix(tmp_path, example, q, seed):
    rng = np.random.default_rng(seed)
    k = build_npy(tmp_path, str(q - 1))
    outs = []
    for _ in range(2):
        s = scramble(k, rng)
        assert is_hadamard(s) and not np.array_equal(s, k)
        write_pm(tmp_path / "k.pm", s)
        r = subprocess.run([str(example), str(q), str(tmp_path / "k.pm"), str(tmp_path / "h.pm")], capture_output=True)
        assert r.returncode == 0, r.stderr
        h = load_pm(tmp_path / "h.pm")
        assert h.shape == (4 * q, 4 * q) and is_hadamard(h), q
        outs.append(h)
    assert not np.array_equal(outs[0], outs[1]), "K must reach the matrix"


def test_a_k_that_is_not_hadamard_is_refused(tmp_path, example):
    k = build_npy(tmp_path, "12")
    k[3, 5] *= -1
    write_pm(tmp_path / "k.pm", k)
    r = subprocess.run([str(example), "13", str(tmp_path / "k.pm"), str(tmp_path / "h.pm")], capture_output=True)
    assert r.returncode == 1 and b"not Hadamard" in r.stderr
    # Wrong order for q: named in the message.
    write_pm(tmp_path / "k.pm", build_npy(tmp_path, "8"))
    r = subprocess.run([str(example), "13", str(tmp_path / "k.pm"), str(tmp_path / "h.pm")], capture_output=True)
    assert r.returncode == 1 and b"order 8" in r.stderr
