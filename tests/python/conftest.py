"""Shared fixture: the data hadamard-core dumps for the outside tools to check.

The dump is made once per session by the Rust example `dump_fields`
(`cargo run -p hadamard-core --example dump_fields -- OUTDIR`). Set HADAMARD_DUMP_DIR to an
existing dump to skip the cargo run.
"""

import json
import os
import pathlib
import subprocess

import pytest

REPO = pathlib.Path(__file__).resolve().parents[2]


@pytest.fixture(scope="session")
def dump_dir(tmp_path_factory):
    given = os.environ.get("HADAMARD_DUMP_DIR")
    if given:
        return pathlib.Path(given)
    out = tmp_path_factory.mktemp("hadamard-dump")
    subprocess.run(
        ["cargo", "run", "-q", "--release", "-p", "hadamard-core", "--example", "dump_fields", "--", str(out)],
        cwd=REPO,
        check=True,
    )
    return out


@pytest.fixture(scope="session")
def fields(dump_dir):
    return json.loads((dump_dir / "fields.json").read_text())


@pytest.fixture(scope="session")
def arith(dump_dir):
    return json.loads((dump_dir / "arith.json").read_text())


def load_pm(path):
    """A +/- text matrix as a list of rows of +1/-1."""
    return [[1 if c == "+" else -1 for c in line] for line in path.read_text().splitlines()]


@pytest.fixture(scope="session")
def matrices(dump_dir):
    mdir = dump_dir / "matrices"
    index = json.loads((mdir / "index.json").read_text())
    return [(e, load_pm(mdir / f"{e['name']}.txt")) for e in index]
