"""`hadamard verify` against numpy, scipy and hashlib, on matrices made here in Python.

Every matrix below is made by numpy/scipy, written by numpy (np.save, np.savetxt) or plain
Python, and judged independently: numpy computes H @ H.T == n I in float64 (exact for ±1
entries), hashlib computes the id from the canonical text, and numpy the properties. The CLI
must agree on every one. The binary is $HADAMARD_BIN (tests/run.sh sets it), or
target/release/hadamard.
"""

import functools
import hashlib
import json
import os
import subprocess
from pathlib import Path

import numpy as np
import pytest
import scipy.linalg

ROOT = Path(__file__).resolve().parents[2]
BIN = os.environ.get("HADAMARD_BIN", str(ROOT / "target" / "release" / "hadamard"))


def run(*args, stdin=None):
    return subprocess.run([BIN, *args], input=stdin, capture_output=True, timeout=120)


def canonical(h):
    return "".join("".join("+" if v > 0 else "-" for v in row) + "\n" for row in h)


def numpy_verdict(h):
    n = h.shape[0]
    hf = h.astype(np.float64)
    return h.shape[0] == h.shape[1] and np.array_equal(hf @ hf.T, n * np.eye(n))


def write(h, path, fmt):
    if fmt == "npy":
        np.save(path, h.astype(np.int8))
    elif fmt == "npy-f8":
        np.save(path, h.astype(np.float64))
    elif fmt == "csv":
        np.savetxt(path, h, fmt="%d", delimiter=",")
    elif fmt == "pm":
        Path(path).write_text(canonical(h))
    elif fmt == "pm-crlf":
        # Not the canonical text, so the id is hashed from the matrix, not from the file.
        Path(path).write_bytes(canonical(h).replace("\n", "\r\n").encode())
    elif fmt == "pm-nonl":
        Path(path).write_text(canonical(h)[:-1])
    elif fmt == "json":
        Path(path).write_text(json.dumps(h.astype(int).tolist()))
    elif fmt == "bits":
        Path(path).write_text("".join("".join("1" if v < 0 else "0" for v in row) + "\n" for row in h))


def paley_one(q):
    """Paley I for a prime q ≡ 3 (mod 4), written here from the definition (Paley 1933)."""
    squares = {(x * x) % q for x in range(1, q)}
    chi = lambda x: 0 if x % q == 0 else (1 if x % q in squares else -1)
    Q = np.array([[chi(i - j) for j in range(q)] for i in range(q)])
    S = np.zeros((q + 1, q + 1), dtype=int)
    S[0, 1:] = 1
    S[1:, 0] = -1
    S[1:, 1:] = Q
    return np.eye(q + 1, dtype=int) + S


CASES = [
    ("sylvester-8", scipy.linalg.hadamard(8)),
    ("sylvester-64", scipy.linalg.hadamard(64)),
    ("sylvester-256", scipy.linalg.hadamard(256)),
    ("paley-12", paley_one(11)),
    ("paley-20", paley_one(19)),
    ("paley-44", paley_one(43)),
    ("random-12", np.where(np.random.default_rng(1).random((12, 12)) < 0.5, -1, 1)),
    ("ones-6", np.ones((6, 6), dtype=int)),
    ("rect-4x8", scipy.linalg.hadamard(8)[:4]),
]


@pytest.mark.parametrize("fmt", ["pm", "pm-crlf", "pm-nonl", "csv", "npy", "npy-f8", "json", "bits"])
@pytest.mark.parametrize("name,h", CASES, ids=[c[0] for c in CASES])
def test_verdict_id_and_properties_agree_with_numpy(tmp_path, name, h, fmt):
    path = tmp_path / f"{name}.{fmt.split('-')[0]}"
    write(h, path, fmt)
    r = run("verify", "--json", str(path))
    out = json.loads(r.stdout)
    hadamard = numpy_verdict(h)
    # numpy: an independent H @ H.T == nI decides the exit status and the verdict.
    assert out["hadamard"] == hadamard, out
    assert r.returncode == (0 if hadamard else 1)
    assert out["order"] == h.shape[0]
    # hashlib: the id is the SHA-256 of the canonical +/- text (interface contract).
    assert out["sha256"] == hashlib.sha256(canonical(h).encode()).hexdigest()
    if h.shape[0] == h.shape[1]:
        p = out["properties"]
        # numpy: the properties from their definitions.
        assert p["symmetric"] == bool(np.array_equal(h, h.T))
        assert p["skew"] == bool(np.array_equal(h + h.T, 2 * np.eye(h.shape[0])))
        assert p["normalized"] == bool((h[0] == 1).all() and (h[:, 0] == 1).all())
        assert p["excess"] == int(h.sum())
    if not hadamard and h.shape[0] == h.shape[1]:
        hf = h.astype(np.float64)
        g = hf @ hf.T
        bad = [(i, j) for i in range(h.shape[0]) for j in range(i + 1, h.shape[0]) if g[i, j] != 0]
        # numpy: the failing pairs and their inner products.
        assert out["failing_pairs_total"] == len(bad)
        for pair in out["failing_pairs"]:
            assert g[pair["i"], pair["j"]] == pair["dot"]


@pytest.mark.parametrize("k", [2, 3, 4, 5])
def test_every_single_flip_of_scipy_hadamard_fails_and_is_located(tmp_path, k):
    h = scipy.linalg.hadamard(2**k)
    n = h.shape[0]
    rng = np.random.default_rng(k)
    spots = [(r, c) for r in range(n) for c in range(n)] if n <= 8 else [tuple(rng.integers(0, n, 2)) for _ in range(12)]
    for r, c in spots:
        bad = h.copy()
        bad[r, c] *= -1
        path = tmp_path / "flip.npy"
        np.save(path, bad.astype(np.int8))
        res = run("verify", "--json", str(path))
        out = json.loads(res.stdout)
        # scipy.linalg.hadamard(2^k) passes; with one entry flipped numpy says it fails.
        assert not numpy_verdict(bad)
        assert res.returncode == 1 and out["hadamard"] is False
        assert out["repair"] is not None, out
        fixed = bad.copy()
        fixed[out["repair"]["row"], out["repair"]["col"]] *= -1
        assert numpy_verdict(fixed)
        if n >= 4:
            # For n ≥ 4 the wrong entry is the only one whose flip repairs the matrix [derived].
            assert (out["repair"]["row"], out["repair"]["col"]) == (r, c)


def test_scipy_hadamard_passes_from_stdin():
    h = scipy.linalg.hadamard(128)
    r = run("verify", "-", stdin=canonical(h).encode())
    assert r.returncode == 0, r.stderr


@pytest.mark.parametrize(
    "data,where",
    [
        (b"++++\n+-+-\n++x-\n+--+\n", "line 3, column 3"),
        (b"1,1\n1,-1,1\n", "line 2"),
        ("+\u2212\n\u2212\u2212x\n".encode(), "line 2, column 3"),
    ],
)
def test_malformed_input_names_its_place(data, where):
    r = run("verify", "--json", "-", stdin=data)
    assert r.returncode == 2
    assert where in json.loads(r.stdout)["error"]


def test_hostile_npy_is_refused_quickly_with_bounded_memory(tmp_path):
    # A header declaring 10^5 × 10^5 int8 with 16 bytes of data (numpy writes the header).
    path = tmp_path / "hostile.npy"
    np.save(path, np.ones((4, 4), dtype=np.int8))
    raw = path.read_bytes()
    header_len = int.from_bytes(raw[8:10], "little")
    header = raw[10 : 10 + header_len].decode("latin1").replace("(4, 4)", "(100000, 100000)")
    header = header.rstrip("\n").rstrip() + " " * (header_len - len(header.rstrip("\n").rstrip()) - 1) + "\n"
    path.write_bytes(raw[:10] + header.encode("latin1") + raw[10 + header_len :])
    r = run("verify", str(path))
    assert r.returncode == 2
    assert b"byte" in r.stderr or b"element" in r.stderr


def test_garbage_is_refused():
    r = run("verify", "-", stdin=bytes(range(256)) * 8)
    assert r.returncode == 2


def test_order_6_is_not_hadamard_exit_1():
    # The standard theorem: a Hadamard order is 1, 2 or a multiple of 4.
    h = np.where(np.random.default_rng(6).random((6, 6)) < 0.5, -1, 1)
    r = run("verify", "-", stdin=canonical(h).encode())
    assert r.returncode == 1


KERNELS = ["best", "scalar-tiled", "popcnt-tiled", "avx512-vpopcntdq-tiled", "avx2-sliced", "avx512-sliced"]


@functools.lru_cache(maxsize=1)
def damaged_cases():
    """scipy's Sylvester matrix of order 1024 with three entries flipped, whole and cut to 600
    rows, each with its non-orthogonal pairs (i < j, row-major) from numpy's float64 Gram
    matrix (exact for ±1 entries)."""
    h = scipy.linalg.hadamard(1024).astype(int)
    rng = np.random.default_rng(14)
    for _ in range(3):
        i, j = rng.integers(0, 1024, size=2)
        h[i, j] = -h[i, j]
    cases = []
    for m in (h, h[:600]):
        hf = m.astype(np.float64)
        g = hf @ hf.T
        a, b = np.nonzero(np.triu(g != 0, k=1))
        cases.append((canonical(m), [(int(x), int(y), int(g[x, y])) for x, y in zip(a, b)]))
    return cases


@pytest.mark.parametrize("kernel", KERNELS)
def test_every_kernel_finds_the_pairs_numpy_finds(tmp_path, kernel):
    # Every kernel the CPU has must report numpy's count and the same first pairs; a kernel
    # the CPU lacks must be refused as a usage error (exit 2), never run.
    ran = []
    for text, bad in damaged_cases():
        path = tmp_path / "m.pm"
        path.write_text(text)
        r = run("verify", "--json", "--kernel", kernel, "--max-pairs", "100", str(path))
        if r.returncode == 2:
            assert b"not available on this CPU" in r.stderr, r.stderr
            continue
        assert r.returncode == 1, r.stderr
        out = json.loads(r.stdout)
        assert out["failing_pairs_total"] == len(bad)
        assert [(p["i"], p["j"], p["dot"]) for p in out["failing_pairs"]] == bad[:100]
        ran.append(out["kernel"])
    print(f"kernel {kernel}: ran as {sorted(set(ran)) or 'absent on this CPU'}")
    if kernel in ("best", "scalar-tiled"):
        assert len(ran) == 2


def test_an_unknown_kernel_is_a_usage_error(tmp_path):
    path = tmp_path / "h.pm"
    path.write_text(canonical(scipy.linalg.hadamard(4)))
    r = run("verify", "--kernel", "fastest", str(path))
    assert r.returncode == 2 and b"unknown kernel" in r.stderr
