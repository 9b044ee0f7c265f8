"""Peak memory of the largest requests rcpick accepts, each against the bound it must meet.

Run: ``python benchmarks/bench_memory.py``. Prints figures; asserts nothing. Each case runs in a fresh Python
process and reports its own peak resident set (``ru_maxrss``), start-up and libraries included.

Bounds (issue: robustness): any accepted ``--samples``/``--top`` within about 1 GiB; the widest search
space (E192 pairs over twelve decades) within 300 MiB; a network too large to analyse refused in one line,
cheaply; a 200,000-row stock file within 300 MiB (benchmarks/bench_stock.py times it too).

The Monte Carlo keeps three floats per unit per design for at most 256 MiB of designs at once
(``variation.RESULT_BUDGET``) and works through the draws in blocks, so its peak does not grow with the number
of designs: at 10 M units a group holds one design, and 200 designs are 200 groups one after another — the
same peak as two designs, only longer (that case is measured at 1 M units, where a group holds ten).
"""

from __future__ import annotations

import csv
import subprocess
import sys
import tempfile
import time
from pathlib import Path

RUNNER = """
import resource, runpy, sys
sys.argv = ["rcpick", *sys.argv[1:]]
try:
    runpy.run_module("rcpick", run_name="__main__")
except SystemExit as stop:
    code = stop.code
else:
    code = 0
print(f"PEAK {resource.getrusage(resource.RUSAGE_SELF).ru_maxrss} EXIT {code}", file=sys.stderr)
"""

MIB = 1024  # ru_maxrss is in KiB on Linux


def peak(args: list[str]) -> tuple[float, int, float, str]:
    """(peak MiB, exit code, seconds, last error line) of ``rcpick args`` in a fresh process."""
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-c", RUNNER, *args], capture_output=True, text=True)
    seconds = time.perf_counter() - start
    line = next(line for line in done.stderr.splitlines() if line.startswith("PEAK"))
    _, kib, _, code = line.split()
    errors = [x for x in done.stderr.splitlines() if x.startswith("rcpick: error")]
    return int(kib) / MIB, int(code), seconds, errors[-1] if errors else ""


def ladder(sections: int, folder: Path) -> Path:
    lines = ["* an R-C ladder", "V1 n0 0 5"]
    for k in range(1, sections + 1):
        lines += [f"R{k} n{k - 1} n{k} 1k", f"C{k} n{k} 0 10n"]
    path = folder / f"ladder{sections}.cir"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def stock(rows: int, folder: Path) -> Path:
    path = folder / "stock.csv"
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(["kind", "value", "tolerance", "part_number", "unit_price", "on_hand"])
        for k in range(rows):
            value = 1e3 * 1e3 ** (k / rows)  # distinct values, 1 kΩ … 1 MΩ (the default range)
            writer.writerow(["R", f"{value:.3f}", "1%", f"INV-R-{k:06d}", "0.002", "5000"])
        writer.writerow(["C", "100n", "10%", "INV-C-1", "0.01", "5000"])
    return path


def main() -> None:
    folder = Path(tempfile.mkdtemp(prefix="rcpick-memory-"))
    cases = [
        (
            "find, 10 M units (the most accepted), a pool of 60 designs",
            ["find", "--tau", "10ms", "--samples", "10M"],
            1024,
        ),
        (
            "find --rank error, 10 M units, 2 designs (a group holds one)",
            ["find", "--tau", "10ms", "--samples", "10M", "--rank", "error", "--top", "2"],
            1024,
        ),
        (
            "find --rank error --top 200 (the most), 1 M units",
            ["find", "--tau", "10ms", "--samples", "1M", "--rank", "error", "--top", "200"],
            1024,
        ),
        (
            "widest space: E192 pairs 1 Ω…1 TΩ × E192 pairs 1 pF…1 F (12 decades each), --rank error",
            [
                "find",
                "--tau",
                "10ms",
                "--r-series",
                "E192",
                "--c-series",
                "E192",
                "--r-min",
                "1",
                "--r-max",
                "1T",
                "--c-min",
                "1p",
                "--c-max",
                "1",
                "--rank",
                "error",
                "--top",
                "10",
                "--samples",
                "2000",
            ],
            300,
        ),
        ("net on a 1,000-node ladder (refused)", ["net", str(ladder(1000, folder))], 300),
        ("net on a 100-section ladder", ["net", str(ladder(100, folder))], 300),
        (
            "find --stock with 200,000 rows (R values 1 kΩ…1 MΩ), singles",
            ["find", "--tau", "1ms", "--stock", str(stock(200_000, folder)), "--r-parts", "1", "--c-parts", "1"],
            300,
        ),
    ]
    print(f"{'case':<94} {'peak':>9} {'bound':>9} {'time':>8}  exit")
    for name, args, bound in cases:
        mib, code, seconds, error = peak(args)
        verdict = "met" if mib <= bound else "MISSED"
        print(f"{name:<94} {mib:6.0f} MiB {bound:5d} MiB {seconds:6.1f} s  {code}  {verdict}")
        if error:
            print(f"    {error[:150]}")


if __name__ == "__main__":
    main()
