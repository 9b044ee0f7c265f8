"""Monte Carlo speed, against a plain-numpy reference of the same model measured in the same run.

Run: ``python benchmarks/bench_montecarlo.py``. Prints figures; asserts nothing.

The reference draws the same bands (uniform tolerance, linear TCR, class 2 band with independent cold and
hot extremes), evaluates every unit at the same five temperatures and computes the same percentiles and
yield, in the most direct numpy there is. The figure compared is the *marginal* cost from 1 M to 5 M units
(fixed costs — imports, worst case, contributions — cancel), for a single R and C and for a design of
unlike pairs. Target (issue: ranking): rcpick within 1.3× of the reference, measured in-process and as
whole ``rcpick spread`` commands.
"""

from __future__ import annotations

import subprocess
import sys
import time

import numpy as np

from rcpick import api, variation
from rcpick import target as targets
from rcpick.combos import PARALLEL, SERIES, SINGLE
from rcpick.models import PartModel, dielectric, linear

R_MODEL = PartModel((-0.05, 0.05), linear(-100e-6, 100e-6))
C_MODEL = PartModel((-0.10, 0.10), dielectric("X7R").drift)
TEMP = (0.0, 70.0)
WINDOW = (0.9, 1.1)  # relative to nominal


def reference(parts_r: list[float], parts_c: list[float], wiring_r: int, wiring_c: int, samples: int) -> float:
    """Yield of the same model in plain numpy (percentiles computed too, as rcpick does)."""
    rng = np.random.default_rng(1)
    x = variation.temperature_grid(TEMP) - 25.0
    lows, highs, refs = (np.empty(samples) for _ in range(3))
    for start in range(0, samples, 65536):
        n = min(65536, samples - start)

        def resistor(value, n=n):
            tol = rng.uniform(-0.05, 0.05, n)
            tcr = rng.uniform(-100e-6, 100e-6, n)
            return value * (1 + tol) * (1 + tcr * x[:, None])

        def capacitor(value, n=n):
            tol = rng.uniform(-0.10, 0.10, n)
            cold = rng.uniform(-0.15, 0.15, n) / -80.0
            hot = rng.uniform(-0.15, 0.15, n) / 100.0
            return value * (1 + tol) * (1 + np.minimum(x, 0)[:, None] * cold + np.maximum(x, 0)[:, None] * hot)

        rs = [resistor(v) for v in parts_r]
        cs = [capacitor(v) for v in parts_c]
        r = rs[0] if wiring_r == SINGLE else (rs[0] + rs[1] if wiring_r == SERIES else rs[0] * rs[1] / (rs[0] + rs[1]))
        c = (
            cs[0]
            if wiring_c == SINGLE
            else (cs[0] + cs[1] if wiring_c == PARALLEL else cs[0] * cs[1] / (cs[0] + cs[1]))
        )
        q = r * c
        lows[start : start + n], highs[start : start + n], refs[start : start + n] = q.min(0), q.max(0), q[2]
    nominal = _nominal(parts_r, wiring_r, "r") * _nominal(parts_c, wiring_c, "c")
    np.quantile(lows, 0.00135), np.quantile(highs, 0.99865), np.median(refs)
    return float(np.mean((lows >= WINDOW[0] * nominal) & (highs <= WINDOW[1] * nominal)))


def _nominal(parts, wiring, letter):
    if wiring == SINGLE:
        return parts[0]
    adds = (wiring == SERIES) == (letter == "r")
    return parts[0] + parts[1] if adds else parts[0] * parts[1] / (parts[0] + parts[1])


def rcpick_mc(parts_r, parts_c, wiring_r, wiring_c, samples) -> float:
    r = variation.Position.of("resistance", [parts_r], [wiring_r], R_MODEL)
    c = variation.Position.of("capacitance", [parts_c], [wiring_c], C_MODEL)
    nominal = _nominal(parts_r, wiring_r, "r") * _nominal(parts_c, wiring_c, "c")
    study = variation.Study(r, c, TEMP, targets.for_tau(nominal))
    mc = variation.monte_carlo(study, samples, 1, "uniform", (WINDOW[0] * nominal, WINDOW[1] * nominal))
    return float(mc.yield_[0])


def best_time(func, repeat=3) -> float:
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        func()
        best = min(best, time.perf_counter() - start)
    return best


def command(argv, repeat=3) -> float:
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "rcpick", *argv], check=True, capture_output=True)
        best = min(best, time.perf_counter() - start)
    return best


def main() -> None:
    designs = {
        "single R and C (10K, 100n)": ([10e3], [100e-9], SINGLE, SINGLE, ["--r", "10k", "--c", "100n"]),
        "unlike pairs (4K7 + 330R, 47n ∥ 22n)": (
            [4.7e3, 330.0],
            [47e-9, 22e-9],
            SERIES,
            PARALLEL,
            ["--r", "4k7+330", "--c", "47n//22n"],
        ),
    }
    for name, (pr, pc, wr, wc, argv) in designs.items():
        ours = {n: best_time(lambda n=n, d=(pr, pc, wr, wc): rcpick_mc(*d, n)) for n in (1_000_000, 5_000_000)}
        ref = {n: best_time(lambda n=n, d=(pr, pc, wr, wc): reference(*d, n)) for n in (1_000_000, 5_000_000)}
        marginal_ours = ours[5_000_000] - ours[1_000_000]
        marginal_ref = ref[5_000_000] - ref[1_000_000]
        print(
            f"{name}: marginal cost of 4 M units, in-process: rcpick {marginal_ours:.2f} s, reference "
            f"{marginal_ref:.2f} s, ratio {marginal_ours / marginal_ref:.2f} (target ≤ 1.3)"
        )
        cmd = {n: command(["spread", *argv, "--tau", "1ms", "--samples", str(n)]) for n in (1_000_000, 5_000_000)}
        print(
            f"    as whole commands (rcpick spread --samples 1M → 5M): {cmd[5_000_000] - cmd[1_000_000]:.2f} s "
            f"marginal, ratio {(cmd[5_000_000] - cmd[1_000_000]) / marginal_ref:.2f} to the reference"
        )
    pool = api.find(tau="10ms")
    start = time.perf_counter()
    api.find(tau="10ms")
    print(
        f"rcpick.find(tau='10ms') in-process (a pool of {pool.analysis['pool']['analysed']} designs, 20,000 units): "
        f"{(time.perf_counter() - start) * 1e3:.0f} ms"
    )


if __name__ == "__main__":
    main()
