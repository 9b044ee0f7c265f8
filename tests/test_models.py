"""Part models: EIA dielectric codes decoded by their grammar, resistor technologies, ageing."""

import pytest

from rcpick import models
from rcpick.errors import UnknownName

# EIA-198 / IEC 60384 class 2 code tables : low letter, high digit, change letter.
CLASS2 = {
    "X7R": ((-55, 125), (-0.15, 0.15)),
    "X5R": ((-55, 85), (-0.15, 0.15)),
    "X7S": ((-55, 125), (-0.22, 0.22)),
    "X7T": ((-55, 125), (-0.33, 0.22)),
    "X6S": ((-55, 105), (-0.22, 0.22)),
    "Y5V": ((-30, 85), (-0.82, 0.22)),
    "Z5U": ((10, 85), (-0.56, 0.22)),
}


@pytest.mark.parametrize("code", CLASS2)
def test_class2_codes(code):
    rated, change = CLASS2[code]
    d = models.dielectric(code)
    assert d.drift.rated_c == rated
    assert not d.drift.shared
    t_lo, t_hi = rated
    # the band is reached exactly at the rated extremes: slope × (T_extreme − 25) spans the change letter's band
    cold = sorted(s * (t_lo - 25) for s in d.drift.cold)
    hot = sorted(s * (t_hi - 25) for s in d.drift.hot)
    assert cold == pytest.approx(list(change)) and hot == pytest.approx(list(change))


# EIA-198 class 1 grammar: C0G = 0 ± 30, U2J = −750 ± 120, P3K = −1500 ± 250 ppm/°C.
CLASS1 = {"C0G": (-30e-6, 30e-6), "NP0": (-30e-6, 30e-6), "U2J": (-870e-6, -630e-6), "P3K": (-1750e-6, -1250e-6)}


@pytest.mark.parametrize("code", CLASS1)
def test_class1_codes(code):
    d = models.dielectric(code)
    assert d.drift.shared
    assert d.drift.cold == pytest.approx(CLASS1[code]) and d.drift.hot == pytest.approx(CLASS1[code])
    assert d.drift.rated_c == (-55, 125)


def test_usual_tolerances_and_timing_warnings():
    # Usual tolerances are common practice: class 1 5 %, class 2 10 %, Y5V/Z5U +80/−20 %.
    assert models.dielectric("C0G").tolerance == (-0.05, 0.05)
    assert models.dielectric("X7R").tolerance == (-0.10, 0.10)
    assert models.dielectric("Y5V").tolerance == (-0.20, 0.80)
    assert models.dielectric("Y5V").poor_for_timing and models.dielectric("Z5U").poor_for_timing
    assert models.dielectric("electrolytic").poor_for_timing
    assert models.dielectric("alu").code == "ELECTROLYTIC"
    assert models.dielectric("X7R").poor_for_timing is None


@pytest.mark.parametrize("code", ["PP", "PET", "PPS"])
def test_film(code):
    d = models.dielectric(code)
    assert d.drift.rated_c is not None and d.tolerance[1] > 0


@pytest.mark.parametrize("code", ["X7Q", "Q7R", "C0X", "ABC", "teflon", ""])
def test_unknown_dielectric_lists_accepted_forms(code):
    with pytest.raises(UnknownName, match="class 1 EIA codes such as C0G"):
        models.dielectric(code)


def test_resistor_technologies():
    # Common practice: carbon film has a negative TCR, −250 … −1000 ppm/°C.
    _, drift, _ = models.resistor_technology("carbon-film")
    assert drift.cold == pytest.approx((-1000e-6, -250e-6))
    _, thick, _ = models.resistor_technology("thick")
    assert thick.cold == pytest.approx((-100e-6, 100e-6))
    assert set(models.technology_names()) == {"thick-film", "thin-film", "metal-film", "carbon-film"}
    with pytest.raises(UnknownName, match="thick-film"):
        models.resistor_technology("wire")


def test_aging_change():
    # C(t) = C(1000 h)·(1 − k·log10(t/1000 h)); k = 1…4 %/decade-hour for X7R (practice).
    assert models.aging_change((0.01, 0.04), 100_000) == pytest.approx((-0.08, -0.02))
    assert models.aging_change((0.01, 0.04), 1000) == pytest.approx((0.0, 0.0))
    lo, hi = models.aging_change((0.01, 0.04), 100)  # younger than the reference: above its limits
    assert lo == pytest.approx(0.01) and hi == pytest.approx(0.04)
