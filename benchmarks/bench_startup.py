"""Start-up cost of the command line, as ratios to ``python -c "import numpy"`` measured in the same run.

Run: ``python benchmarks/bench_startup.py``. Targets (issue: library face): ``rcpick --help`` ≤ 1.6×,
``rcpick find --tau 10ms`` ≤ 3.0×, ``rcpick find --tau 10ms --rank error`` ≤ 2.5× the CPU time (user + system)
of importing numpy. Each command runs ``REPEAT`` times; the best of each is compared. Prints figures; asserts
nothing.
"""

from __future__ import annotations

import os
import resource
import subprocess
import sys

REPEAT = 7
COMMANDS = {
    "python -c 'import numpy' (the floor)": [sys.executable, "-c", "import numpy"],
    "rcpick --help": [sys.executable, "-m", "rcpick", "--help"],
    "rcpick values E24": [sys.executable, "-m", "rcpick", "values", "E24"],
    "rcpick find --tau 10ms --rank error": [sys.executable, "-m", "rcpick", "find", "--tau", "10ms", "--rank", "error"],
    "rcpick find --tau 10ms": [sys.executable, "-m", "rcpick", "find", "--tau", "10ms"],
}
TARGETS = {"rcpick --help": 1.6, "rcpick find --tau 10ms": 3.0, "rcpick find --tau 10ms --rank error": 2.5}


def cpu_seconds(argv: list[str]) -> float:
    """User + system CPU seconds of one run of ``argv`` (its children only)."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run(argv, check=True, capture_output=True, env={**os.environ, "COLUMNS": "120"})
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def main() -> None:
    best = {}
    for _ in range(REPEAT):  # interleaved, so load on the machine affects every command alike
        for name, argv in COMMANDS.items():
            best[name] = min(best.get(name, float("inf")), cpu_seconds(argv))
    floor = best["python -c 'import numpy' (the floor)"]
    for name, seconds in best.items():
        ratio = seconds / floor
        target = TARGETS.get(name)
        verdict = "" if target is None else f"  target ≤ {target}× — {'met' if ratio <= target else 'MISSED'}"
        print(f"{name:<40} {seconds * 1e3:7.0f} ms CPU  {ratio:4.2f}×{verdict}")


if __name__ == "__main__":
    main()
