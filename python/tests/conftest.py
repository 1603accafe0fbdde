"""Shared helpers for the package's tests.

The tests run against the installed wheel (tests/python-package.sh installs it in a fresh
virtual environment). When HADAMARD_BIN names the `hadamard` binary (tests/run.sh sets it),
the package's answers are also compared with the command line's `--json`.
"""

import hashlib
import json
import os
import subprocess

import numpy as np
import pytest


def canonical_id(h: np.ndarray) -> str:
    """SHA-256 of the matrix's `+`/`-` text, one row per line (the id's definition, README)."""
    sha = hashlib.sha256()
    table = np.frombuffer(b"+-", dtype=np.uint8)
    for start in range(0, h.shape[0], 256):
        block = h[start:start + 256]
        text = np.empty((block.shape[0], block.shape[1] + 1), dtype=np.uint8)
        text[:, :-1] = table[(block < 0).astype(np.intp)]
        text[:, -1] = ord("\n")
        sha.update(text.tobytes())
    return sha.hexdigest()


def cli():
    """The `hadamard` binary, or None when HADAMARD_BIN is not set."""
    path = os.environ.get("HADAMARD_BIN")
    return path if path and os.path.exists(path) else None


def cli_json(*args):
    out = subprocess.run([cli(), *args, "--json"], capture_output=True, text=True, check=False)
    return json.loads(out.stdout)


needs_cli = pytest.mark.skipif(cli() is None, reason="HADAMARD_BIN is not set (tests/run.sh sets it)")
