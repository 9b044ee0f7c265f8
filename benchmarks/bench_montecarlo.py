"""Monte Carlo speed: unit-evaluations per second (one unit at one temperature).

Run: ``python benchmarks/bench_montecarlo.py``. Target on a 2-core machine:
at least 5 million unit-evaluations per second. Prints figures; asserts nothing.
"""

from __future__ import annotations

import subprocess
import sys
import time

import numpy as np

from rcpick import models, variation
from rcpick import target as targets
from rcpick.combos import PARALLEL, SERIES, SINGLE
from rcpick.models import PartModel

R_MODEL = PartModel((-0.01, 0.01), models.linear(-100e-6, 100e-6))
C_MODEL = PartModel((-0.10, 0.10), models.dielectric("X7R").drift, aging=(-0.04, -0.01))


def study(designs: int, rng: np.random.Generator) -> variation.Study:
    wiring_r = rng.choice([SINGLE, SERIES, PARALLEL], designs)
    wiring_c = rng.choice([SINGLE, SERIES, PARALLEL], designs)
    r = variation.Position.of("resistance", [[10e3, 4.7e3]] * designs, wiring_r, R_MODEL)
    c = variation.Position.of("capacitance", [[100e-9, 47e-9]] * designs, wiring_c, C_MODEL)
    return variation.Study(r, c, (-40, 85), targets.for_tau(1e-3))


def rate(the_study: variation.Study, samples: int, dist: str = "normal") -> tuple[float, float]:
    """Best of three runs: (unit-evaluations per second, seconds)."""
    best = float("inf")
    for _ in range(3):
        start = time.perf_counter()
        result = variation.monte_carlo(the_study, samples, 1, dist, window=(0.8e-3, 1.2e-3))
        best = min(best, time.perf_counter() - start)
    return result.evaluations / best, best


def main() -> None:
    rng = np.random.default_rng(0)
    one = study(1, rng)
    temps = len(variation.temperature_grid(one.temp_c))
    for dist in ("normal", "uniform"):
        per_s, seconds = rate(one, 1_000_000, dist)
        print(f"one design, 1,000,000 units × {temps} temperatures, {dist}: {seconds:.2f} s, "
              f"{per_s / 1e6:.1f} M unit-evaluations/s (target >= 5)")
    pool = study(60, rng)
    per_s, seconds = rate(pool, 20_000)
    print(f"60 designs (a find pool), 20,000 units × {temps} temperatures: {seconds:.2f} s, {per_s / 1e6:.1f} M/s")
    start = time.perf_counter()
    variation.worst_case(pool)
    print(f"worst case of 60 designs: {(time.perf_counter() - start) * 1e3:.1f} ms")
    for args in (["--rank", "error"], []):
        walls = []
        for _ in range(3):
            t0 = time.perf_counter()
            subprocess.run([sys.executable, "-m", "rcpick", "find", "--tau", "10ms", *args], check=True, capture_output=True)
            walls.append(time.perf_counter() - t0)
        print(f"rcpick find --tau 10ms {' '.join(args) or '(rank yield)'}: best wall {min(walls) * 1e3:.0f} ms of 3")


if __name__ == "__main__":
    main()
