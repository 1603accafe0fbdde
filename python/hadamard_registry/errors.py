"""The exceptions of :mod:`hadamard_registry`. Every one is a :class:`HadamardError`."""

from __future__ import annotations

import json
from typing import Any, Optional


class HadamardError(Exception):
    """Base class of every error this package raises."""


class NotConstructibleError(HadamardError, ValueError):
    """No matrix of this order can be built here.

    ``order`` is the order asked for, ``status`` the literature's status of it as
    ``routes(order)["status"]`` gives it (``impossible``, ``open``, ``known``, ``uncovered``,
    or ``constructible`` when the order is above the build limit), and ``reason`` says why in
    words.
    """

    def __init__(self, order: int, status: str, reason: str) -> None:
        self.order = order
        self.status = status
        self.reason = reason
        super().__init__(f"order {order} cannot be built here (status: {status}): {reason}")


class NotHadamardError(HadamardError, ValueError):
    """A matrix given as the source of a derived object failed the exact check."""


class MatrixParseError(HadamardError, ValueError):
    """An input could not be read as a ±1 matrix.

    ``source`` names the input (a path, or ``array``), ``message`` says what is wrong, and
    ``location`` says where: ``{"line": L, "column": C}`` (1-based) in a text file,
    ``{"element": K}`` or ``{"byte": B}`` in a ``.npy`` file, ``{"row": I, "column": J}``
    (0-based, as numpy indexes) in an array, or ``None``.
    """

    def __init__(self, source: str, message: str, location: Any = None) -> None:
        if isinstance(location, str):
            location = json.loads(location)
        self.source = source
        self.message = message
        self.location: Optional[dict] = location
        super().__init__(f"{source}: {message}")


class RotationError(HadamardError, ValueError):
    """No exact Hadamard rotation of this size is available here (``dimension``, ``reason``)."""

    def __init__(self, dimension: int, reason: str) -> None:
        self.dimension = dimension
        self.reason = reason
        super().__init__(f"no Hadamard rotation of size {dimension}: {reason}")


class DeriveError(HadamardError, ValueError):
    """A derived object (screening design, replicates) cannot be made as asked.

    ``parameter`` names the argument at fault.
    """

    def __init__(self, parameter: str, message: str) -> None:
        self.parameter = parameter
        self.message = message
        super().__init__(f"{parameter}: {message}")
