"""Type hints for ``hadamard_registry`` (the docstrings are in ``__init__.py``)."""

import os
from typing import Any, Dict, Literal, Optional, Sequence, Tuple, Union, overload

import numpy as np
import numpy.typing as npt

from .errors import (
    DeriveError as DeriveError,
    HadamardError as HadamardError,
    MatrixParseError as MatrixParseError,
    NotConstructibleError as NotConstructibleError,
    NotHadamardError as NotHadamardError,
    RotationError as RotationError,
)

PathLike = Union[str, os.PathLike[str]]
Floats = Union[npt.NDArray[np.float32], npt.NDArray[np.float64]]

@overload
def hadamard(n: int, *, with_id: Literal[False] = ...) -> npt.NDArray[np.int8]: ...
@overload
def hadamard(n: int, *, with_id: Literal[True]) -> Tuple[npt.NDArray[np.int8], str]: ...
def verify(a: Union[npt.ArrayLike, PathLike], *, max_pairs: int = ...) -> Dict[str, Any]: ...
def routes(n: int) -> Dict[str, Any]: ...
def advise(*, dimension: int) -> Dict[str, Any]: ...
def smallest_known(*, at_least: int) -> Dict[str, Any]: ...
@overload
def rotate(x: npt.NDArray[np.float32], dim: int = ..., normalized: bool = ...) -> npt.NDArray[np.float32]: ...
@overload
def rotate(x: npt.NDArray[np.float64], dim: int = ..., normalized: bool = ...) -> npt.NDArray[np.float64]: ...
def rotation_plan(d: int) -> Dict[str, Any]: ...
def rotation_id(d: int) -> str: ...
def rotation_matrix(d: int) -> npt.NDArray[np.int8]: ...
def screening(
    factors: Optional[int] = ...,
    *,
    order: Optional[int] = ...,
    matrix: Optional[npt.ArrayLike] = ...,
    columns: Optional[Sequence[int]] = ...,
    names: Optional[Sequence[str]] = ...,
    levels: Optional[Sequence[Tuple[str, str]]] = ...,
    fold_over: bool = ...,
    centre_points: int = ...,
    seed: Optional[int] = ...,
) -> Dict[str, Any]: ...
def brr(strata: int, *, order: Optional[int] = ..., matrix: Optional[npt.ArrayLike] = ...) -> Dict[str, Any]: ...
