"""rcpick's Monte Carlo σ against ngspice's own Monte Carlo (Debian package ngspice 39.x).

ngspice draws each part with ``sgauss`` (a standard normal) in a ``.control``
loop, runs a transient for each unit and measures the 63.2 % crossing time
(= tau). For normal tolerances with no temperature effect, the σ of 200
ngspice runs must agree with rcpick's σ within 15 % (the σ of 200 samples is
itself uncertain by about 5 %, so 15 % is a 3-σ bound).
"""

import math
import re
import subprocess

import pytest

from tests.external.spice import ngspice

RUNS = 200
R_OHM, C_FARAD, R_TOL, C_TOL = 10e3, 100e-9, 0.05, 0.10

CONTROL = f"""* rcpick Monte Carlo check: R {R_OHM:g} ±{R_TOL:.0%}, C {C_FARAD:g} ±{C_TOL:.0%}, band = ±3 sigma
V1 in 0 PWL(0 0 1e-12 1)
R1 in out {R_OHM!r}
C1 out 0 {C_FARAD!r}
.control
setseed 20261201
let runs = {RUNS}
let times = unitvec(runs)
let i = 0
dowhile i < runs
  let rv = {R_OHM!r} * (1 + {R_TOL / 3!r} * sgauss(0))
  let cv = {C_FARAD!r} * (1 + {C_TOL / 3!r} * sgauss(0))
  alter R1 = $&rv
  alter C1 = $&cv
  tran 0.5u 3m
  meas tran tx WHEN v(out)={1 - math.exp(-1)!r} RISE=1
  let times[i] = tx
  destroy all
  let i = i + 1
end
print times
.endc
.end
"""


def test_sigma_matches_ngspice_monte_carlo(run_json, tmp_path):
    cir = tmp_path / "mc.cir"
    cir.write_text(CONTROL)
    done = subprocess.run([ngspice(), "-b", str(cir)], capture_output=True, text=True, timeout=600)
    # ngspice exits 1 in batch mode after a .control-only run ("no simulations run"); the values tell.
    times = [float(v) for v in re.findall(r"^\d+\t([-+0-9.eE]+)", done.stdout, re.M)]
    assert len(times) == RUNS, done.stdout[-2000:]
    mean = sum(times) / RUNS
    spice_sigma = math.sqrt(sum((t - mean) ** 2 for t in times) / (RUNS - 1))
    doc = run_json(
        "spread",
        "--r",
        "10k",
        "--c",
        "100n",
        "--r-tol",
        "5%",
        "--c-tol",
        "10%",
        "--r-tcr",
        "0ppm",
        "--c-tc",
        "0ppm",
        "--temp",
        "25",
        "--dist",
        "normal",
        "--samples",
        "200000",
    )
    assert mean == pytest.approx(R_OHM * C_FARAD, rel=0.02)
    assert doc["spread"]["sigma"] == pytest.approx(spice_sigma, rel=0.15)
