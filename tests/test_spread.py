"""Worst case and Monte Carlo, against exact values and published definitions."""

import math

import numpy as np
import pytest

from rcpick import models, variation
from rcpick import target as targets
from rcpick.combos import PARALLEL, SERIES, SINGLE
from rcpick.models import PartModel
from rcpick.sampling import CHUNK_UNITS, Sampler

NONE = PartModel((0.0, 0.0))


def single_study(r_model, c_model, temp_c=(25, 25), r=10e3, c=100e-9, target=None, band=(0.0, 0.0)):
    rp = variation.Position.of("resistance", [[r]], [SINGLE], r_model)
    cp = variation.Position.of("capacitance", [[c]], [SINGLE], c_model)
    return variation.Study(rp, cp, temp_c, target or targets.for_tau(r * c), band)


def test_worst_case_linear_exact():
    # Extreme-value analysis (RIAC Desk Reference, "Worst Case Analysis"): every part at its limits.
    # 10 kΩ ±1 % ±100 ppm/°C with 100 nF ±5 % C0G over −40…85 °C.
    r = PartModel((-0.01, 0.01), models.linear(-100e-6, 100e-6))
    c = PartModel((-0.05, 0.05), models.dielectric("C0G").drift)
    lo, hi = variation.worst_case(single_study(r, c, (-40, 85)))
    assert hi[0] == pytest.approx(1e-3 * 1.01 * 1.05 * (1 + 100e-6 * 65) * (1 + 30e-6 * 65), rel=1e-12)
    assert lo[0] == pytest.approx(1e-3 * 0.99 * 0.95 * (1 - 100e-6 * 65) * (1 - 30e-6 * 65), rel=1e-12)


def test_worst_case_pair_with_different_parts_exact():
    # A series pair whose parts differ (RIAC extreme-value definition, worked by hand here):
    # R1 = 4.7 kΩ ±1 % ±100 ppm/°C, R2 = 330 Ω ±5 % ±200 ppm/°C, C = 47 nF ∥ 47 nF ±2 % ±30 ppm/°C, 0…70 °C.
    r1 = PartModel((-0.01, 0.01), models.linear(-100e-6, 100e-6))
    r2 = PartModel((-0.05, 0.05), models.linear(-200e-6, 200e-6))
    cm = PartModel((-0.02, 0.02), models.linear(-30e-6, 30e-6))
    rp = variation.Position.of("resistance", [[4.7e3, 330.0]], [SERIES], [[r1, r2]])
    cp = variation.Position.of("capacitance", [[47e-9, 47e-9]], [PARALLEL], cm)
    study = variation.Study(rp, cp, (0, 70), targets.for_tau(1e-3))
    lo, hi = variation.worst_case(study)
    # 70 °C is 45 °C from 25 °C, 0 °C only 25 °C: the hot end is the extreme for every part.
    r_max = 4.7e3 * 1.01 * (1 + 100e-6 * 45) + 330 * 1.05 * (1 + 200e-6 * 45)
    r_min = 4.7e3 * 0.99 * (1 - 100e-6 * 45) + 330 * 0.95 * (1 - 200e-6 * 45)
    c_max, c_min = 94e-9 * 1.02 * (1 + 30e-6 * 45), 94e-9 * 0.98 * (1 - 30e-6 * 45)
    assert hi[0] == pytest.approx(r_max * c_max, rel=1e-12)
    assert lo[0] == pytest.approx(r_min * c_min, rel=1e-12)


def test_worst_case_finds_an_interior_maximum():
    # (1 + 0.01·x)(1 − 0.004·x) on x = T − 25 ∈ [0, 100] peaks at x = 75 with 1.225
    # (the ends give 1.0 and 1.2, the middle 1.2).
    r = PartModel((0.0, 0.0), models.linear(0.01, 0.01))
    c = PartModel((0.0, 0.0), models.linear(-0.004, -0.004))
    lo, hi = variation.worst_case(single_study(r, c, (25, 125), r=1.0, c=1.0))
    assert hi[0] == pytest.approx(1.225, rel=1e-9)
    assert lo[0] == pytest.approx(1.0, rel=1e-12)


def test_class2_band_reached_at_rated_extreme():
    # X7R: ±15 % over −55…+125 °C (EIA-198); at the rated extremes the worst case is the full band.
    c = PartModel((0.0, 0.0), models.dielectric("X7R").drift)
    lo, hi = variation.worst_case(single_study(NONE, c, (-55, 125), r=1.0, c=1.0))
    assert (lo[0], hi[0]) == pytest.approx((0.85, 1.15))
    lo, hi = variation.worst_case(single_study(NONE, c, (25, 75), r=1.0, c=1.0))
    assert (lo[0], hi[0]) == pytest.approx((1 - 0.15 * 50 / 100, 1 + 0.15 * 50 / 100))


def test_threshold_band_worst_case():
    # A delay scales with ln(1/(1 − f)) (Kuphaldt Vol. I ch. 16); f = 0.5 ± 4 % with exact parts.
    target = targets.for_delay(1e-3, 0.5)
    study = single_study(NONE, NONE, target=target, band=(-0.04, 0.04), r=1e3, c=1e-6)
    lo, hi = variation.worst_case(study)
    assert lo[0] == pytest.approx(1e-3 * math.log(1 / (1 - 0.48)))
    assert hi[0] == pytest.approx(1e-3 * math.log(1 / (1 - 0.52)))


def test_gum_uniform_sigma():
    # GUM (JCGM 100:2008 §4.3): a uniform band of half-width a has σ = a/√3.
    a = 0.05
    study = single_study(PartModel((-a, a)), NONE)
    draws = Sampler(7, "uniform").chunk(0, 200_000).band("R1", "tol")
    assert np.std(draws) * a == pytest.approx(a / math.sqrt(3), rel=0.01)
    mc = variation.monte_carlo(study, 200_000, 7, "uniform", window=(1e-3 * 0.97, 1e-3 * 1.03))
    # the Monte Carlo σ of tau itself: a/√3 of nominal; the σ estimate's own error is about 0.2 % here
    assert mc.sigma[0] == pytest.approx(1e-3 * a / math.sqrt(3), rel=0.01)
    # P(|δ| ≤ 3 %) = 0.6 for δ uniform on ±5 %; binomial σ = √(0.24/200 000) ≈ 0.0011.
    assert mc.yield_[0] == pytest.approx(0.6, abs=0.005)
    assert mc.p_low[0] == pytest.approx(1e-3 * (1 - a + 2 * a * 0.00135), rel=2e-4)


def _product_cdf(q, a, b):
    """P((1 + U1)(1 + U2) ≤ q) for U1 ~ U(−a, a), U2 ~ U(−b, b), by numeric integration over U1."""
    x = np.linspace(1 - a, 1 + a, 20001)
    y = np.clip((q / x - (1 - b)) / (2 * b), 0.0, 1.0)
    return np.trapezoid(y, x) / (2 * a)


def test_product_of_two_uniforms_percentiles():
    # GUM §4.3 uniform bands; the exact law of their product is integrated numerically here.
    a, b, n = 0.05, 0.10, 200_000
    study = single_study(PartModel((-a, a)), PartModel((-b, b)), r=1.0, c=1.0)
    mc = variation.monte_carlo(study, n, 11, "uniform")
    for p, value in ((variation.P_LOW, mc.p_low[0]), (0.5, mc.p_median[0]), (variation.P_HIGH, mc.p_high[0])):
        sigma = math.sqrt(p * (1 - p) / n)
        assert _product_cdf(value, a, b) == pytest.approx(p, abs=4 * sigma + 1e-5)


def test_normal_band_is_three_sigma_truncated():
    # drawn by the inverse CDF of the normal truncated at ±3σ
    draws = Sampler(3, "normal").chunk(0, 200_000).band("C1", "tol")
    assert np.abs(draws).max() <= 1.0
    # σ of a normal truncated at ±3σ is 0.98658·σ (property of the normal distribution).
    assert np.std(draws) == pytest.approx(0.98658 / 3, rel=0.01)


def test_same_seed_same_numbers():
    study = single_study(
        PartModel((-0.05, 0.05), models.linear(-1e-4, 1e-4)),
        PartModel((-0.1, 0.1), models.dielectric("X7R").drift),
        (0, 70),
    )
    one = variation.monte_carlo(study, 5000, 42, "normal", window=(0.9e-3, 1.1e-3))
    two = variation.monte_carlo(study, 5000, 42, "normal", window=(0.9e-3, 1.1e-3))
    other = variation.monte_carlo(study, 5000, 43, "normal", window=(0.9e-3, 1.1e-3))
    assert (one.p_low, one.p_median, one.p_high, one.yield_) == (two.p_low, two.p_median, two.p_high, two.yield_)
    assert one.p_low[0] != other.p_low[0]


def test_monte_carlo_inside_worst_case_and_chunked():
    r = PartModel((-0.02, 0.02), models.linear(-200e-6, 100e-6))
    c = PartModel((-0.1, 0.1), models.dielectric("X5R").drift)
    study = single_study(r, c, (-20, 60))
    lo, hi = variation.worst_case(study)
    mc = variation.monte_carlo(study, CHUNK_UNITS + 1234, 5, "uniform")  # two chunks
    assert lo[0] <= mc.p_low[0] < mc.p_median[0] < mc.p_high[0] <= hi[0]


def test_yield_needs_every_temperature():
    # Only temperature drift: +1000 ppm/°C exactly; at 70 °C tau is +4.5 %, at 25 °C nominal.
    study = single_study(PartModel((0.0, 0.0), models.linear(1e-3, 1e-3)), NONE, (25, 70))
    assert variation.monte_carlo(study, 1000, 1, window=(0.96e-3, 1.04e-3)).yield_[0] == 0.0
    assert variation.monte_carlo(study, 1000, 1, window=(0.96e-3, 1.05e-3)).yield_[0] == 1.0


def test_contributions():
    r = PartModel((-0.01, 0.01), models.linear(-100e-6, 100e-6))
    c = PartModel((-0.05, 0.05), models.linear(-30e-6, 30e-6), loss=0.1)
    shares = variation.contributions(single_study(r, c, (-40, 85)))[0]
    assert sum(shares.values()) == pytest.approx(1.0)
    assert shares["C tolerance"] > shares["R tolerance"] > shares["R temperature"] > shares["C temperature"] > 0
    assert shares["bias loss"] > 0 and shares["ageing"] == 0 and shares["threshold"] == 0
    only = variation.contributions(single_study(PartModel((-0.01, 0.01)), NONE))[0]
    assert only["R tolerance"] == pytest.approx(1.0)


def test_designs_in_one_batch_match_each_alone():
    # Common random numbers: a design's Monte Carlo figures do not depend on the others in its batch,
    # whether the batch's parts share one model or not.
    tight = PartModel((-0.01, 0.01), models.linear(-25e-6, 25e-6))
    loose = PartModel((-0.05, 0.05), models.linear(-200e-6, 200e-6))
    cap = PartModel((-0.1, 0.1), models.dielectric("X7R").drift)
    r_all = variation.Position.of(
        "resistance", [[10e3], [4.7e3], [22e3]], [SINGLE] * 3, [[tight, tight], [loose, loose], [tight, tight]]
    )
    c_all = variation.Position.of("capacitance", [[100e-9], [220e-9], [47e-9]], [SINGLE] * 3, cap)
    both = variation.monte_carlo(variation.Study(r_all, c_all, (0, 70), targets.for_tau(1e-3)), 3000, 5)
    for m in range(3):
        r_one = variation.Position(r_all.kind, r_all.parts[m : m + 1], r_all.wiring[m : m + 1], r_all.models[m : m + 1])
        c_one = variation.Position(c_all.kind, c_all.parts[m : m + 1], c_all.wiring[m : m + 1], c_all.models[m : m + 1])
        alone = variation.monte_carlo(variation.Study(r_one, c_one, (0, 70), targets.for_tau(1e-3)), 3000, 5)
        assert (alone.p_low[0], alone.p_median[0], alone.p_high[0]) == pytest.approx(
            (both.p_low[m], both.p_median[m], both.p_high[m]), rel=1e-12
        )


def test_bin_counts_equal_numpy_histogram_of_clipped_values():
    from rcpick.variation import _bin_counts

    rng = np.random.default_rng(3)
    values = rng.normal(1.0, 0.2, size=(5, 20000))
    ours = _bin_counts(values, 0.7, 1.3, 40)
    reference = np.histogram(np.clip(values, 0.7, 1.3), bins=40, range=(0.7, 1.3))[0]
    assert np.array_equal(ours, reference) and ours.sum() == values.size


@pytest.mark.parametrize("q", [0.00135, 0.5, 0.99865, 0.0, 1.0])
def test_quantile_in_place_is_numpys_linear_quantile(q):
    from rcpick.variation import quantile_in_place

    rng = np.random.default_rng(5)
    values = rng.normal(size=(3, 2001))
    values[1, :7] = np.inf  # never-reached units sort last
    with np.errstate(invalid="ignore"):  # inf − inf between two never-reached units, in both
        expected = np.quantile(values, q, axis=1)
        found = quantile_in_place(values.copy(), q)
    assert np.allclose(found, expected, rtol=0, atol=1e-15, equal_nan=True)
