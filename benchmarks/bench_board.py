"""Board planning time, and how it grows with the number of timings.

Run: ``python benchmarks/bench_board.py``. Prints figures; asserts nothing.

The boards are invented: up to ten timings (time constants, delays, corners, an oscillator period) over the
default search spaces (E24 resistors, E12 capacitors, singles and pairs), the default yield requirement
(95 %), the default Monte Carlo (20,000 units per design) and windows of ±25 % (a ±10 % window cannot be met
by 5 % resistors and ±10 % X7R capacitors over temperature, so those timings would be left out of the choice).
Target (issue: board): ten timings planned in under 10 s on the 2-core machine. Each pool's Monte Carlo runs
once; the solver's stages run on the pools' results.
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
import time
from pathlib import Path

TIMINGS = [
    ('name = "reset"', 'delay = "20ms"', 'threshold = "2.0V"', 'supply = "3.3V"'),
    ('name = "debounce"', "count = 4", 'tau = "4.7ms"'),
    ('name = "lid"', 'tau = "10ms"'),
    ('name = "anti-alias"', 'cutoff = "160Hz"'),
    ('name = "fade"', 'tau = "220ms"'),
    ('name = "wake"', 'period = "100ms"', 'thresholds = "33%:67%"'),
    ('name = "input filter"', 'cutoff = "1.6kHz"'),
    ('name = "watchdog"', 'delay = "1.5s"', 'threshold = "63%"'),
    ('name = "buzzer"', 'cutoff = "4kHz"'),
    ('name = "sense"', 'tau = "1ms"'),
]


def board_text(n: int) -> str:
    lines = ["[defaults]", 'window = "25%"', ""]
    for timing in TIMINGS[:n]:
        lines += ["[[timing]]", *timing, ""]
    return "\n".join(lines)


def main() -> None:
    import rcpick

    folder = Path(tempfile.mkdtemp(prefix="rcpick-bench-"))
    print("in-process (rcpick.board), best of 2:")
    for n in (2, 4, 6, 8, 10):
        path = folder / f"board{n}.toml"
        path.write_text(board_text(n), encoding="utf-8")
        rcpick.board(path, pool=5, samples=200)  # imports and caches warm
        times = []
        for _ in range(2):
            start = time.perf_counter()
            result = rcpick.board(path)
            times.append(time.perf_counter() - start)
        designs = sum(len(t.pool.designs) for t in result.timings)
        print(
            f"  {n:>2} timings: {min(times):5.2f} s ({designs} designs offered to the solver; "
            f"{result.distinct_line_items} line items, each timing's own choice {result.greedy_items}; "
            f"unmet {len(result.unmet)})"
        )
    path = folder / "board10.toml"
    start = time.perf_counter()
    subprocess.run([sys.executable, "-m", "rcpick", "board", str(path)], check=True, capture_output=True)
    print(f"whole command, 10 timings (start-up included): {time.perf_counter() - start:.2f} s (target < 10 s)")


if __name__ == "__main__":
    main()
