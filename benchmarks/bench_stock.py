"""Stock files: reading a 200,000-row CSV of distinct values, and looking values and lines up in it.

Run: ``python benchmarks/bench_stock.py [ROWS]``. Writes an invented stock of ROWS
(default 200,000) distinct values, half resistors and half capacitors, with every
column filled, into a temporary folder; then prints the load time (best of three),
the peak memory Python allocated while loading (tracemalloc, one separate run) and
the time of Stock.values() and Stock.choose() on the loaded stock. Prints figures;
asserts nothing.
"""

from __future__ import annotations

import gc
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

from rcpick import stock as stocks

HEADER = "kind,value,tolerance,tcr,dielectric,part_number,unit_price,on_hand,package,voltage\n"


def write_stock(path: Path, rows: int) -> None:
    """``rows`` lines of distinct values: R from 1 kΩ up in 0.01 Ω steps, C from 1 nF up in 1 fF steps."""
    half = rows // 2
    with open(path, "w", encoding="utf-8", newline="") as handle:
        handle.write("# invented benchmark stock\n" + HEADER)
        for i in range(half):
            handle.write(f"R,{1000 + i / 100:.2f},1%,100ppm,,BENCH-R-{i},0.004,{1000 + i % 500},0603,\n")
        for i in range(rows - half):
            handle.write(f"C,{1 + i / 1e6:.6f}n,10%,,X7R,BENCH-C-{i},0.006,{2000 + i % 700},0603,50V\n")


def best_of(func, repeat: int = 3) -> tuple[float, object]:
    best, out = float("inf"), None
    for _ in range(repeat):
        gc.collect()
        start = time.perf_counter()
        out = func()
        best = min(best, time.perf_counter() - start)
    return best, out


def main() -> None:
    rows = int(sys.argv[1]) if len(sys.argv) > 1 else 200_000
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "stock.csv"
        write_stock(path, rows)
        size = path.stat().st_size
        load_s, loaded = best_of(lambda: stocks.load(path))
        del loaded
        gc.collect()
        tracemalloc.start()
        stock = stocks.load(path)
        _, peak = tracemalloc.get_traced_memory()
        kept, _ = tracemalloc.get_traced_memory()
        tracemalloc.stop()
    print(f"stock of {rows:,} rows ({size / 2**20:.1f} MiB of CSV)")
    print(f"  load: {load_s:.2f} s best of 3 ({load_s / rows * 1e6:.1f} µs a row)")
    print(
        f"  peak memory while loading: {peak / 2**20:.0f} MiB (tracemalloc); kept by the Stock: {kept / 2**20:.0f} MiB"
    )

    ask = stocks.Ask(tolerance=0.01)
    narrow_s, narrow = best_of(lambda: stock.values("resistance", 1500.0, 1510.0, ask), 20)
    wide_s, wide = best_of(lambda: stock.values("capacitance", 1e-9, 2e-9, stocks.Ask(dielectric="X7R")), 3)
    print(f"  values() over a narrow range ({len(narrow):,} values): {narrow_s * 1e6:.0f} µs")
    print(f"  values() over the whole C range ({len(wide):,} values): {wide_s * 1e3:.1f} ms")
    probes = [1000 + i / 100 for i in range(0, rows // 2, max(1, rows // 2000))]
    choose_s, _ = best_of(lambda: [stock.choose("resistance", v, need=10, ask=ask) for v in probes])
    print(f"  choose(): {choose_s / len(probes) * 1e6:.1f} µs a call ({len(probes):,} calls)")


if __name__ == "__main__":
    main()
