"""Hadamard matrices for notebooks: every order the Hadamard Registry builds, checked exactly.

A Hadamard matrix of order n is an n×n matrix of ±1 entries with H·Hᵀ = nI. This package is the
registry's Rust core compiled for Python: the matrices come from the same published
constructions as ``hadamard build N`` (with the same ids), every verdict from the same exact
check, and ``routes``/``advise``/``smallest_known``/``verify`` return the objects the command
line prints with ``--json``.

>>> import numpy as np
>>> import hadamard_registry as hr
>>> h = hr.hadamard(12)
>>> h.dtype, h.shape
(dtype('int8'), (12, 12))
>>> bool((h.astype(int) @ h.T == 12 * np.eye(12)).all())
True
"""

from __future__ import annotations

import json
import os
from typing import Any, Dict, List, Optional, Sequence, Tuple, Union

import numpy as np

from . import _native
from .errors import (
    DeriveError,
    HadamardError,
    MatrixParseError,
    NotConstructibleError,
    NotHadamardError,
    RotationError,
)

__all__ = [
    "hadamard",
    "verify",
    "routes",
    "advise",
    "smallest_known",
    "rotate",
    "rotation_id",
    "rotation_plan",
    "rotation_matrix",
    "screening",
    "brr",
    "HadamardError",
    "NotConstructibleError",
    "NotHadamardError",
    "MatrixParseError",
    "RotationError",
    "DeriveError",
]

PathLike = Union[str, "os.PathLike[str]"]


def hadamard(n: int, *, with_id: bool = False) -> Any:
    """The catalogue's Hadamard matrix of order ``n`` as a C-ordered ``int8`` array of ±1.

    It is built by the best buildable route of ``routes(n)`` (the matrix ``hadamard build n``
    writes, with the same id) and has passed the exact check. With ``with_id=True`` the
    answer is ``(array, id)``, the id being the SHA-256 of the matrix's ``+``/``-`` text.
    Raises :class:`NotConstructibleError` naming the status and the reason when ``n`` cannot
    be built here.

    >>> import hadamard_registry as hr
    >>> hr.hadamard(4)
    array([[ 1,  1,  1,  1],
           [ 1, -1,  1, -1],
           [ 1,  1, -1, -1],
           [ 1, -1, -1,  1]], dtype=int8)
    >>> h, id_ = hr.hadamard(172, with_id=True)
    >>> h.shape, len(id_)
    ((172, 172), 64)
    >>> hr.hadamard(6)
    Traceback (most recent call last):
    ...
    hadamard_registry.errors.NotConstructibleError: order 6 cannot be built here (status: impossible): ...
    """
    n = _order(n, "n")
    a, id_ = _native.build(n)
    return (a, id_) if with_id else a


def verify(a: Union[Any, PathLike], *, max_pairs: int = 64) -> Dict[str, Any]:
    """The exact check of a matrix, as the dict ``hadamard verify --json`` prints.

    ``a`` is a 2-D numpy array (or anything ``numpy.asarray`` takes) of integers or floats
    equal to ±1, in any layout (strides, order, views), or the path of a file in one of the
    registry's formats (``+``/``-`` text, CSV, 0/1 bits, JSON, ``.npy``). In a float array a
    NaN is an erased entry (as ``?`` is in a text file): the matrix is then not Hadamard
    until its erased entries are known, and ``completion`` says whether orthogonality fixes
    them. Keys: ``verdict`` (``"hadamard"``, ``"incomplete"`` or ``"not_hadamard"``, core's
    rule as in the CLI), ``hadamard`` (true for the first only), ``order``, ``cols``, ``failures``,
    ``failing_pairs`` (0-based rows ``i < j`` and their inner product, at most ``max_pairs``),
    ``failing_pairs_total``, ``properties``, ``sha256`` (the id), ``repair`` (the wrong
    signs that explain the failures, or ``None``), ``completion``, ``format``,
    ``elapsed_ms``, ``check`` and ``kernel``.

    Raises :class:`MatrixParseError` naming the place of the first bad entry.

    >>> import numpy as np
    >>> import hadamard_registry as hr
    >>> h = hr.hadamard(12).astype(float)
    >>> hr.verify(h.T)["hadamard"]            # a transposed view: any layout
    True
    >>> h[3, 5] *= -1                          # one wrong sign
    >>> r = hr.verify(h)
    >>> r["hadamard"], r["failing_pairs_total"], r["repair"]["row"], r["repair"]["col"]
    (False, 11, 3, 5)
    >>> hr.verify(np.array([[1, 1], [1, 0]]))
    Traceback (most recent call last):
    ...
    hadamard_registry.errors.MatrixParseError: array: entry [1, 1] (0-based) is 0, not ±1
    """
    max_pairs = _count(max_pairs, "max_pairs")
    if isinstance(a, (str, os.PathLike)):
        return json.loads(_native.verify_path(os.fspath(a), max_pairs))
    m, erasures = _pm_array(a, allow_erasures=True)
    return json.loads(_native.verify_array(m, erasures, max_pairs))


def routes(n: int) -> Dict[str, Any]:
    """The status of order ``n`` and every route to it, as ``hadamard routes N --json`` prints.

    Keys: ``order``, ``status`` (``constructible``, ``known``, ``open``, ``impossible`` or
    ``uncovered``), ``routes`` (best first, each with ``method``, ``tree``, ``buildable``,
    ``largest_dense_factor``, ``skew``, …), ``note`` and ``literature``.

    >>> import hadamard_registry as hr
    >>> r = hr.routes(12)
    >>> r["status"], r["routes"][0]["method"], r["routes"][0]["buildable"]
    ('constructible', 'paley_one', True)
    >>> hr.routes(10)["status"]
    'impossible'
    """
    return json.loads(_native.routes_json(_order(n, "n")))


def advise(*, dimension: int) -> Dict[str, Any]:
    """Every way to write a size ``dimension`` as 2^a·m₀ through a known order m₀, as
    ``hadamard advise --dimension D --json`` prints it (smallest dense factor first).

    >>> import hadamard_registry as hr
    >>> a = hr.advise(dimension=14336)
    >>> [(o["power_of_two"], o["dense"], o["status"]) for o in a["options"]][:2]
    [(9, 28, 'constructible'), (8, 56, 'constructible')]
    """
    return json.loads(_native.advice_json(_order(dimension, "dimension")))


def smallest_known(*, at_least: int) -> Dict[str, Any]:
    """The smallest known and the smallest constructible order ≥ ``at_least``, as
    ``hadamard advise --at-least K --json`` prints them.

    >>> import hadamard_registry as hr
    >>> r = hr.smallest_known(at_least=665)      # 668 is open
    >>> r["smallest_known"], r["smallest_constructible"]["order"]
    ({'order': 672, 'status': 'constructible'}, 672)
    """
    return json.loads(_native.at_least_json(_order(at_least, "at_least")))


def rotate(x: Any, dim: int = -1, normalized: bool = True) -> np.ndarray:
    """Applies an exact Hadamard rotation of size d along axis ``dim`` of a float array.

    Every vector v of length d along the axis becomes H·v / √d (H·v when
    ``normalized=False``), where H = H_m ⊗ H_{2^a} is the Kronecker product of the catalogue's
    matrix of order m and Sylvester's matrix of order 2^a in natural order (the one
    ``scipy.linalg.hadamard`` gives), with d = 2^a·m and m the smallest constructible order
    that leaves a power of two (``rotation_plan(d)``). So ``rotate(x)`` equals
    ``x @ H.T / sqrt(d)`` with ``H = rotation_matrix(d)``, and normalized it preserves norms.
    It costs O(d·(a + m)) per vector: the fast Walsh–Hadamard transform on the 2^a part,
    a dense ±1 product on the order-m part. The work runs without the GIL and, for large
    batches, on every core. ``x`` must be float32 or float64; the answer has its dtype.
    ``rotation_id(d)`` names H, so a model can record which rotation it used.

    Raises :class:`RotationError` when no constructible order m leaves a power of two.

    >>> import numpy as np
    >>> import hadamard_registry as hr
    >>> x = np.arange(12.0)
    >>> y = hr.rotate(x)
    >>> bool(np.isclose(np.linalg.norm(y), np.linalg.norm(x)))
    True
    >>> h = hr.rotation_matrix(12)
    >>> bool(np.allclose(y, x @ h.T / np.sqrt(12)))
    True
    >>> hr.rotate(np.ones((2, 3, 20), np.float32), dim=2).shape
    (2, 3, 20)
    """
    arr = np.asarray(x)
    if arr.dtype == np.float64:
        kernel = _native.rotate_f64
    elif arr.dtype == np.float32:
        kernel = _native.rotate_f32
    else:
        raise TypeError(
            f"rotate takes a float32 or float64 array, not {arr.dtype}; "
            "convert it first, e.g. x.astype(np.float32)"
        )
    if arr.ndim == 0:
        raise ValueError("rotate needs an array with at least one axis")
    moved = np.moveaxis(arr, dim, -1)
    d = moved.shape[-1]
    flat = np.ascontiguousarray(moved).reshape(-1, d)
    out = kernel(flat, bool(normalized)).reshape(moved.shape)
    return np.ascontiguousarray(np.moveaxis(out, -1, dim))


def rotation_plan(d: int) -> Dict[str, Any]:
    """How ``rotate`` factors size ``d``: H = H_m ⊗ H_{2^a}.

    Keys: ``dimension``, ``power_of_two`` (a), ``dense`` (m), ``dense_id`` (the id of H_m,
    the catalogue's matrix ``hadamard(m)``), and ``structure``.

    >>> import hadamard_registry as hr
    >>> p = hr.rotation_plan(3584)
    >>> p["power_of_two"], p["dense"], p["structure"]
    (7, 28, 'H_28 ⊗ H_2^7 (Sylvester, natural order)')
    """
    d = _order(d, "d")
    a, m, dense_id = _native.rotation_plan(d)
    return {
        "dimension": d,
        "power_of_two": a,
        "dense": m,
        "dense_id": dense_id,
        "structure": f"H_{m} ⊗ H_2^{a} (Sylvester, natural order)",
    }


def rotation_id(d: int) -> str:
    """The id (SHA-256 of the ``+``/``-`` text) of the d×d matrix ``rotate`` applies.

    The matrix is built and passes the exact check before its id is given (once per d per
    process; at d = 14336 that takes seconds). Sizes above 2^15 are rotated but have no id.

    >>> import hashlib, numpy as np, scipy.linalg
    >>> import hadamard_registry as hr
    >>> h = np.kron(hr.hadamard(12), scipy.linalg.hadamard(4))
    >>> text = "".join("".join("+" if v > 0 else "-" for v in row) + "\\n" for row in h)
    >>> hr.rotation_id(48) == hashlib.sha256(text.encode()).hexdigest()
    True
    """
    return _native.rotation_id(_order(d, "d"))


def rotation_matrix(d: int) -> np.ndarray:
    """The d×d ±1 matrix ``rotate`` applies (unscaled), as int8, checked exactly.

    >>> import hadamard_registry as hr
    >>> hr.rotation_matrix(8)[:2]
    array([[ 1,  1,  1,  1,  1,  1,  1,  1],
           [ 1, -1,  1, -1,  1, -1,  1, -1]], dtype=int8)
    """
    return _native.rotation_matrix(_order(d, "d"))


def screening(
    factors: Optional[int] = None,
    *,
    order: Optional[int] = None,
    matrix: Any = None,
    columns: Optional[Sequence[int]] = None,
    names: Optional[Sequence[str]] = None,
    levels: Optional[Sequence[Tuple[str, str]]] = None,
    fold_over: bool = False,
    centre_points: int = 0,
    seed: Optional[int] = None,
) -> Dict[str, Any]:
    """A two-level screening design (Plackett–Burman), as ``hadamard derive screening --json``
    prints it, plus ``coded``: the runs × factors int8 array of coded levels (−1, +1, 0 for a
    centre point) in run order.

    The source is ``matrix`` (any Hadamard ±1 array, checked exactly), or the catalogue's
    matrix of ``order``, or by default the smallest constructible order above ``factors``.
    ``seed`` randomises the run order reproducibly; ``None`` keeps the standard order.

    >>> import numpy as np
    >>> import hadamard_registry as hr
    >>> d = hr.screening(11)
    >>> d["order"], d["coded"].shape, d["properties"]
    (12, (12, 11), {'columns_orthogonal': True, 'columns_balanced': True})
    >>> bool((d["coded"].T.astype(int) @ d["coded"] == 12 * np.eye(11)).all())
    True
    """
    if matrix is None and order is None:
        if factors is None:
            raise DeriveError("factors", "give the number of factors, or a source order or matrix")
        order = _at_least_constructible(_count(factors, "factors") + 1, "factors")
    m = None if matrix is None else _pm_array(matrix, allow_erasures=False)[0]
    text = _native.screening_json(
        None if order is None else _order(order, "order"),
        m,
        None if factors is None else _count(factors, "factors"),
        None if columns is None else [_count(c, "columns") for c in columns],
        None if names is None else [str(s) for s in names],
        None if levels is None else [(str(lo), str(hi)) for lo, hi in levels],
        bool(fold_over),
        _count(centre_points, "centre_points"),
        None if seed is None else _order(seed, "seed"),
    )
    d = json.loads(text)
    d["coded"] = np.array([r["coded"] for r in d["runs"]], dtype=np.int8).reshape(
        len(d["runs"]), len(d["factors"])
    )
    return d


def brr(strata: int, *, order: Optional[int] = None, matrix: Any = None) -> Dict[str, Any]:
    """Balanced repeated replication for ``strata`` strata of two PSUs each, as
    ``hadamard derive brr --json`` prints it, plus two arrays:

    - ``sign_array``: replicates × strata int8; +1 keeps PSU 1 of the stratum, −1 PSU 2;
    - ``weights``: replicates × strata × 2 float64, the replicate weight factors of PSU 1 and
      PSU 2 (2 for the PSU kept, 0 for the other).

    The source is ``matrix`` or the catalogue's matrix of ``order``, by default the smallest
    constructible order greater than ``strata`` (the constant row is left out).

    >>> import hadamard_registry as hr
    >>> r = hr.brr(5)
    >>> r["replicates"], r["weights"].shape, r["balanced"], r["orthogonal"]
    (8, (8, 5, 2), True, True)
    >>> bool((r["weights"].sum(axis=2) == 2).all())   # one PSU of each stratum kept, weight 2
    True
    """
    m = None if matrix is None else _pm_array(matrix, allow_erasures=False)[0]
    d = json.loads(
        _native.brr_json(
            _count(strata, "strata"), None if order is None else _order(order, "order"), m
        )
    )
    s = np.array(d["signs"], dtype=np.int8).reshape(d["replicates"], d["strata"])
    d["sign_array"] = s
    d["weights"] = np.stack([(s > 0) * 2.0, (s < 0) * 2.0], axis=-1)
    return d


# ---------------------------------------------------------------------------------------------


def _order(n: Any, name: str) -> int:
    if isinstance(n, (bool, np.bool_)) or not isinstance(n, (int, np.integer)):
        raise TypeError(f"{name} must be a whole number, not {type(n).__name__}")
    if n < 0:
        raise ValueError(f"{name} must not be negative, got {n}")
    if n >= 1 << 64:
        raise ValueError(f"{name} is too large: {n}")
    return int(n)


def _count(n: Any, name: str) -> int:
    n = _order(n, name)
    if n >= 1 << 63:
        raise ValueError(f"{name} is too large: {n}")
    return n


def _at_least_constructible(k: int, name: str) -> int:
    built = smallest_known(at_least=k)["smallest_constructible"]
    if built is None:
        raise DeriveError(name, f"no order of at least {k} is within this program's reach")
    return int(built["order"])


def _pm_array(a: Any, *, allow_erasures: bool) -> Tuple[np.ndarray, List[Tuple[int, int]]]:
    """A C-contiguous int8 copy of ±1 array ``a`` (erased entries as +1) and the erased places."""
    arr = np.asarray(a)
    if arr.ndim != 2:
        raise MatrixParseError("array", f"expected a 2-D array, got {arr.ndim} dimensions (shape {arr.shape})")
    rows, cols = arr.shape
    if rows == 0 or cols == 0:
        raise MatrixParseError("array", f"the array is empty (shape {arr.shape})")
    limit = _native.max_order()
    if rows > limit or cols > limit:
        raise MatrixParseError("array", f"shape {arr.shape} is above the limit of {limit} rows and columns")
    kind = arr.dtype.kind
    if kind not in "iuf":
        raise MatrixParseError("array", f"entries must be integers or floats equal to ±1, not {arr.dtype}")
    erasures: List[Tuple[int, int]] = []
    if kind == "f":
        nan = np.isnan(arr)
        if nan.any():
            if not allow_erasures:
                i, j = (int(v) for v in np.argwhere(nan)[0])
                raise MatrixParseError("array", f"entry [{i}, {j}] (0-based) is NaN (erased); a source matrix must be complete", {"row": i, "column": j})
            erasures = [(int(i), int(j)) for i, j in np.argwhere(nan)]
            arr = np.where(nan, 1.0, arr)
    bad = (arr != 1) & (arr != -1)
    if bad.any():
        i, j = (int(v) for v in np.argwhere(bad)[0])
        raise MatrixParseError("array", f"entry [{i}, {j}] (0-based) is {arr[i, j].item()!r}, not ±1", {"row": i, "column": j})
    return np.ascontiguousarray(arr, dtype=np.int8), erasures
