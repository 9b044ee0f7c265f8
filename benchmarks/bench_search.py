"""Search speed: exact top-10 on two spaces, and the ratio against a numpy brute force.

Run: ``python benchmarks/bench_search.py``. Targets (2-core machine):
space (b) exact top 10 in < 0.5 s of search time; space (a) >= 50× faster
than a straightforward numpy brute force; ``rcpick find --tau 10ms`` < 1 s wall.
Prints figures; asserts nothing.
"""

from __future__ import annotations

import subprocess
import sys
import time

import numpy as np

from rcpick import combos, search, series
from rcpick import target as targets


def space(r_name, r_low, r_high, c_name, c_low, c_high):
    r = combos.build(series.get(r_name).values(r_low, r_high), "resistance", 2, r_low, r_high)
    c = combos.build(series.get(c_name).values(c_low, c_high), "capacitance", 2, c_low, c_high)
    return r, c


def timed(func, repeat=5):
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        out = func()
        best = min(best, time.perf_counter() - start)
    return best, out


def brute_force(r, c, target, top=10):
    """Every R·C product at once, then the top by the same key."""
    tau = np.multiply.outer(r.value, c.value).ravel()
    abs_err = np.abs(target.error(tau))
    key = np.round(abs_err, search.ERROR_DECIMALS)
    near = np.flatnonzero(key <= np.partition(key, top - 1)[top - 1])  # keep every tie at the cut
    ri, ci = np.divmod(near, len(c))
    order = search.rank_order(abs_err[near], r.parts[ri] + c.parts[ci], r.value[ri], c.value[ci])[:top]
    return ri[order], ci[order]


def main() -> None:
    target = targets.for_tau(10e-3)
    build_a, (r_a, c_a) = timed(lambda: space("E24", 1e3, 1e6, "E12", 100e-12, 10e-6), 3)
    search_a, found_a = timed(lambda: search.best(r_a, c_a, target, 10))
    brute_a, (bri, bci) = timed(lambda: brute_force(r_a, c_a, target), 3)
    assert list(zip(found_a.r_index, found_a.c_index)) == list(zip(bri, bci)), "search and brute force disagree"
    print(f"(a) E24 pairs 1 kΩ–1 MΩ × E12 pairs 100 pF–10 µF: {len(r_a):,} × {len(c_a):,} = {len(r_a) * len(c_a):,}")
    print(f"    candidate sets built in {build_a * 1e3:.1f} ms")
    print(
        f"    exact top 10: {search_a * 1e3:.2f} ms   numpy brute force: {brute_a * 1e3:.1f} ms   "
        f"ratio {brute_a / search_a:.0f}×  (target >= 50×)"
    )

    build_b, (r_b, c_b) = timed(lambda: space("E192", 1.0, 10e6, "E24", 1e-12, 1e-3), 2)
    search_b, found_b = timed(lambda: search.best(r_b, c_b, target, 10))
    print(f"(b) E192 pairs 1 Ω–10 MΩ × E24 pairs 1 pF–1 mF: {len(r_b):,} × {len(c_b):,} = {len(r_b) * len(c_b):,}")
    print(f"    candidate sets built in {build_b * 1e3:.0f} ms")
    print(
        f"    exact top 10: {search_b * 1e3:.1f} ms  (target < 500 ms)   "
        f"build + search {(build_b + search_b) * 1e3:.0f} ms"
    )

    walls = []
    for _ in range(5):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "rcpick", "find", "--tau", "10ms"], check=True, capture_output=True)
        walls.append(time.perf_counter() - start)
    print(f"rcpick find --tau 10ms: best wall {min(walls) * 1e3:.0f} ms of 5 runs  (target < 1000 ms)")


if __name__ == "__main__":
    main()
