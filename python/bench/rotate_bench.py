"""Benchmark (not run in CI): rotate() on a batch of 4096 vectors of d = 14336 against numpy's
dense product with the same matrix, in the same run.

    python python/bench/rotate_bench.py [--batch 4096] [--dim 14336] [--dtype float32] [--repeat 3]

Prints the machine, the load average before and after, the median time of each, the ratio and
the largest difference between the two answers. numpy's side is `x @ H.T * (1/sqrt(d))` with
H = rotation_matrix(d) converted to the same dtype once, outside the timing.
"""

import argparse
import os
import platform
import time

import numpy as np

import hadamard_registry as hr


def load():
    return " ".join(f"{v:.2f}" for v in os.getloadavg())


def median_time(f, repeat):
    times, out = [], None
    for _ in range(repeat):
        t = time.perf_counter()
        out = f()
        times.append(time.perf_counter() - t)
    return sorted(times)[len(times) // 2], times, out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--batch", type=int, default=4096)
    ap.add_argument("--dim", type=int, default=14336)
    ap.add_argument("--dtype", default="float32", choices=["float32", "float64"])
    ap.add_argument("--repeat", type=int, default=3)
    a = ap.parse_args()
    dtype = np.dtype(a.dtype)
    d = a.dim
    print(f"machine: {platform.processor() or platform.machine()}, {os.cpu_count()} logical cores, numpy {np.__version__}")
    print(f"load average before: {load()}")
    plan = hr.rotation_plan(d)
    print(f"d = {d} = 2^{plan['power_of_two']}·{plan['dense']}, rotation id {hr.rotation_id(d)}")
    x = np.random.default_rng(0).standard_normal((a.batch, d)).astype(dtype)
    h = hr.rotation_matrix(d).astype(dtype)
    scale = dtype.type(1 / np.sqrt(d))

    t_rot, all_rot, y = median_time(lambda: hr.rotate(x), a.repeat)
    t_np, all_np, want = median_time(lambda: (x @ h.T) * scale, a.repeat)
    err = float(np.max(np.abs(y.astype(np.float64) - want.astype(np.float64))))
    print(f"rotate: median {t_rot:.3f} s of {[round(t, 3) for t in all_rot]}")
    print(f"numpy dense matmul: median {t_np:.3f} s of {[round(t, 3) for t in all_np]}")
    print(f"ratio numpy / rotate: {t_np / t_rot:.1f}x; largest difference {err:.2e} ({a.dtype})")
    print(f"load average after: {load()}")


if __name__ == "__main__":
    main()
