"""The exact search against a brute-force oracle written here."""

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from rcpick import combos, search, series
from rcpick import target as targets
from rcpick.errors import Unreachable


def oracle(r, c, target, top):
    """Every (R, C) pair scored (the full outer product), sorted by the documented ranking key."""
    i, j = (a.ravel() for a in np.meshgrid(np.arange(len(r)), np.arange(len(c)), indexing="ij"))
    error = np.abs(target.quantity(r.value[i], c.value[j]) / target.value - 1.0)
    error = np.where(np.isnan(error), np.inf, error)
    key = sorted(
        zip(
            np.round(error, search.ERROR_DECIMALS).tolist(),
            (r.parts[i] + c.parts[j]).tolist(),
            r.value[i].tolist(),
            c.value[j].tolist(),
            i.tolist(),
            j.tolist(),
        )
    )
    return [(row[4], row[5]) for row in key[:top]]


@st.composite
def spaces(draw):
    names = ["E3", "E6", "E12", "E24", "E48"]
    r_series = series.get(draw(st.sampled_from(names)))
    c_series = series.get(draw(st.sampled_from(names)))
    r_low = 10 ** draw(st.floats(2, 5))
    c_low = 10 ** draw(st.floats(-11, -7))
    r_high = r_low * 10 ** draw(st.floats(0.3, 1.3))
    c_high = c_low * 10 ** draw(st.floats(0.3, 1.3))
    r = combos.build(r_series.values(r_low, r_high), "resistance", draw(st.sampled_from([1, 2])), r_low, r_high)
    c = combos.build(c_series.values(c_low, c_high), "capacitance", draw(st.sampled_from([1, 2])), c_low, c_high)
    tau = math.sqrt(r_low * r_high * c_low * c_high) * 10 ** draw(st.floats(-0.4, 0.4))
    kind = draw(st.sampled_from(["tau", "cutoff", "delay-rise", "delay-fall", "from", "period", "leak"]))
    if kind == "tau":
        target = targets.for_tau(tau)
    elif kind == "cutoff":
        target = targets.for_cutoff(1 / (2 * math.pi * tau))
    elif kind == "period":
        low = draw(st.floats(0.1, 0.45))
        high = draw(st.floats(0.55, 0.9))
        target = targets.for_period(tau, low, high)
    elif kind == "from":
        start = draw(st.floats(0.0, 0.4))
        target = targets.for_delay(tau, draw(st.floats(0.5, 0.95)), start=start)
    elif kind == "leak":
        # a leakage current of up to a fifth of the charging current at the geometric middle of the R range
        supply = 3.3
        current = draw(st.floats(-0.2, 0.2)) * supply / math.sqrt(r_low * r_high)
        target = targets.for_delay(tau, draw(st.floats(0.2, 0.7)), scale_v=supply, leak_a=current)
    else:
        fraction = draw(st.floats(0.05, 0.95))
        falling = kind == "delay-fall"
        target = targets.for_delay(tau * targets.delay_factor(fraction, falling), fraction, falling)
    return r, c, target, draw(st.integers(1, 15)), draw(st.sampled_from([3, 64, 4096]))


@settings(max_examples=150, deadline=None)
@given(spaces())
def test_search_equals_brute_force(space):
    r, c, target, top, chunk = space
    # bounded: the oracle scores the full product, so keep it small enough to stay fast
    assume(0 < len(r) * len(c) <= 150_000)
    expected = oracle(r, c, target, top)
    try:
        found = search.best(r, c, target, top, chunk=chunk)
    except Unreachable:
        best = r.value[expected[0][0]], c.value[expected[0][1]]
        best_error = abs(float(target.error(target.quantity(*best))))
        assert not best_error <= search.REACH_LIMIT
        return
    assert list(zip(found.r_index.tolist(), found.c_index.tolist())) == expected


@settings(max_examples=60, deadline=None)
@given(spaces(), st.floats(0.02, 0.3))
def test_window_count_equals_brute_force(space, half):
    r, c, target, _, _ = space
    assume(0 < len(r) * len(c) <= 150_000)
    i, j = (a.ravel() for a in np.meshgrid(np.arange(len(r)), np.arange(len(c)), indexing="ij"))
    q = target.quantity(r.value[i], c.value[j])
    low, high = target.value * (1 - half), target.value * (1 + half)
    inside = np.sum((q >= low) & (q <= high))
    assert search.count_in_window(r, c, target, low, high) == inside


def test_candidates_are_distinct():
    r = combos.build(series.get("E12").values(1e3, 1e5), "resistance", 2, 1e3, 1e5)
    c = combos.build(series.get("E6").values(1e-9, 1e-6), "capacitance", 2, 1e-9, 1e-6)
    found = search.best(r, c, targets.for_tau(1e-3), top=50)
    pairs = set(zip(found.r_ohm.tolist(), found.c_farad.tolist()))
    assert len(pairs) == 50


def test_exact_hits_rank_by_parts_then_r():
    r = combos.build(series.get("E24").values(1e3, 1e6), "resistance", 2, 1e3, 1e6)
    c = combos.build(series.get("E12").values(1e-10, 1e-5), "capacitance", 2, 1e-10, 1e-5)
    found = search.best(r, c, targets.for_tau(10e-3), top=4)
    # Four single-part exact answers exist (1K·10u, 10K·1u, 100K·100n, 1M·10n); lower R first.
    assert found.r_ohm.tolist() == [1e3, 1e4, 1e5, 1e6]
    assert found.parts.tolist() == [2, 2, 2, 2]


def test_unreachable_target():
    r = combos.build(series.get("E24").values(1e3, 1e4), "resistance", 1, 1e3, 1e4)
    c = combos.build(series.get("E12").values(1e-9, 1e-8), "capacitance", 1, 1e-9, 1e-8)
    with pytest.raises(Unreachable, match="within 50%"):
        search.best(r, c, targets.for_tau(10.0))
