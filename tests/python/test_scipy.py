"""Sylvester's matrices of hadamard-core against scipy.linalg.hadamard."""

import numpy as np
import scipy.linalg


def test_sylvester_equals_scipy(matrices):
    seen = 0
    for e, h in matrices:
        if not e["name"].startswith("sylvester-"):
            continue
        k = int(e["name"].split("-")[1])
        # scipy: scipy.linalg.hadamard(2**k) is Sylvester's construction.
        assert np.array_equal(np.array(h), scipy.linalg.hadamard(2**k)), k
        seen += 1
    assert seen == 11
