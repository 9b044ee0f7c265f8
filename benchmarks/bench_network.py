"""Network evaluation speed, and how the cost grows with the number of candidates.

Run: ``python benchmarks/bench_network.py``. Prints figures; asserts nothing.

Every evaluation is batched (a stack of small nodal matrices), so the cost of
one batch grows linearly with the number of networks in it. The time-constant
search bisects: about (outer candidates) × log2(inner candidates) + 2·top ×
(outer candidates) evaluations instead of outer × inner; a delay or corner
target is enumerated: outer × inner evaluations.
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np

from rcpick import combos, netsearch, nodal, series
from rcpick.netlist import read

EXAMPLES = Path(__file__).resolve().parents[1] / "docs" / "examples"


def timed(func):
    start = time.perf_counter()
    out = func()
    return time.perf_counter() - start, out


def main() -> None:
    ladder = read(EXAMPLES / "two-stage.cir")
    reset = read(EXAMPLES / "reset-divider.cir")
    rng = np.random.default_rng(0)
    print("batched evaluation (linear in the number of networks):")
    for n in (1_000, 10_000, 100_000):
        values = {"R2": rng.uniform(1e3, 1e5, n), "C2": rng.uniform(1e-9, 1e-7, n)}
        seconds, _ = timed(lambda values=values, n=n: nodal.dominant_tau(ladder, values, n))
        print(
            f"  dominant tau, order-2 ladder, {n:>7,} networks: {seconds * 1e3:8.1f} ms "
            f"({seconds / n * 1e6:.2f} µs each)"
        )
    for n in (1_000, 10_000, 100_000):
        values = {"R1": rng.uniform(1e3, 1e5, n), "C1": rng.uniform(1e-8, 1e-6, n)}
        quantity = netsearch.Quantity("delay", "rst", 2.0, True)
        seconds, _ = timed(lambda values=values, n=n, q=quantity: q.evaluate(reset, values, n))
        print(
            f"  delay to 2.0 V, reset divider,  {n:>7,} networks: {seconds * 1e3:8.1f} ms "
            f"({seconds / n * 1e6:.2f} µs each)"
        )
    r = combos.build(series.get("E24").values(1e3, 1e6), "resistance", 2, 1e3, 1e6)
    c = combos.build(series.get("E12").values(100e-12, 10e-6), "capacitance", 2, 100e-12, 10e-6)
    varied = [netsearch.Varied("R1", r), netsearch.Varied("C1", c)]
    seconds, _ = timed(lambda: netsearch.search(reset, varied, netsearch.Quantity("tau"), 5e-3, 10))
    print(
        f"tau search, E24 pairs × E12 pairs ({len(r):,} × {len(c):,} = {len(r) * len(c):,} combinations): "
        f"{seconds * 1e3:.0f} ms (bisection: about {min(len(r), len(c)):,} × "
        f"{int(np.ceil(np.log2(max(len(r), len(c))))) + 20} evaluations)"
    )
    r1 = combos.build(series.get("E24").values(1e3, 1e6), "resistance", 1, 1e3, 1e6)
    c1 = combos.build(series.get("E12").values(100e-12, 10e-6), "capacitance", 1, 100e-12, 10e-6)
    varied = [netsearch.Varied("R1", r1), netsearch.Varied("C1", c1)]
    seconds, _ = timed(lambda: netsearch.search(reset, varied, netsearch.Quantity("delay", "rst", 2.0, True), 8e-3, 10))
    print(
        f"delay search, E24 × E12 singles ({len(r1) * len(c1):,} combinations, all evaluated): {seconds * 1e3:.0f} ms"
    )


if __name__ == "__main__":
    main()
