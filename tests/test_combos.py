"""Single parts and series/parallel pairs for one position."""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from rcpick import combos, series
from rcpick.combos import PARALLEL, SERIES, SINGLE, parallel_value, series_value

positive = st.floats(min_value=1e-12, max_value=1e9, allow_nan=False, allow_infinity=False)


def test_openstax_series_capacitors():
    # OpenStax College Physics 2e, Example 19.9: 1.000, 5.000, 8.000 µF in series → 0.755 µF (0.75472 µF).
    two = series_value(np.array(1e-6), np.array(5e-6), "capacitance")
    three = series_value(two, np.array(8e-6), "capacitance")
    assert float(three) == pytest.approx(0.75472e-6, rel=1e-5)


def test_openstax_parallel_resistors():
    # OpenStax College Physics 2e, §21.1: 1.00, 6.00, 13.0 Ω in parallel → 0.8041 Ω; 6.00 ∥ 13.0 → 4.11 Ω.
    pair = parallel_value(np.array(6.0), np.array(13.0), "resistance")
    assert float(pair) == pytest.approx(4.11, abs=0.005)
    assert float(parallel_value(pair, np.array(1.0), "resistance")) == pytest.approx(0.8041, abs=5e-5)


def test_wiring_names_describe_wiring():
    a, b = np.array(1e-6), np.array(1e-6)
    assert float(parallel_value(a, b, "capacitance")) == 2e-6  # capacitors in parallel add
    assert float(series_value(a, b, "capacitance")) == 0.5e-6
    assert float(series_value(np.array(1e3), np.array(1e3), "resistance")) == 2e3  # resistors in series add
    assert float(parallel_value(np.array(1e3), np.array(1e3), "resistance")) == 500.0


@given(positive, positive, st.sampled_from(combos.KINDS))
def test_pair_formulas_symmetric_and_bounded(a, b, kind):
    for rule in (series_value, parallel_value):
        assert float(rule(np.array(a), np.array(b), kind)) == pytest.approx(float(rule(np.array(b), np.array(a), kind)))
    low = min(
        float(series_value(np.array(a), np.array(b), kind)), float(parallel_value(np.array(a), np.array(b), kind))
    )
    high = max(
        float(series_value(np.array(a), np.array(b), kind)), float(parallel_value(np.array(a), np.array(b), kind))
    )
    # the adding wiring exceeds both parts; the other lies below both
    assert high >= max(a, b) * (1 - 1e-12)
    assert low <= min(a, b) * (1 + 1e-12)


@given(positive, positive, positive, st.sampled_from(combos.KINDS))
def test_pair_formulas_monotone(a, b, bigger, kind):
    a2 = a + bigger
    for rule in (series_value, parallel_value):
        assert float(rule(np.array(a2), np.array(b), kind)) >= float(rule(np.array(a), np.array(b), kind)) * (1 - 1e-12)


def test_build_respects_range_and_dedupes():
    low, high = 1e3, 100e3
    parts = series.get("E12").values(low, high)
    built = combos.build(parts, "resistance", 2, low, high)
    assert np.all(np.diff(built.value) > 0), "sorted and each value once"
    assert np.all((built.value >= low) & (built.value <= high))
    assert np.all((built.part_a >= low) & (built.part_a <= high))
    pairs = built.wiring != SINGLE
    assert np.all(built.part_a[pairs] <= built.part_b[pairs]), "pairs are unordered (a <= b)"
    # Every value that a single part gives appears as that single part, not as a pair.
    singles = set(built.value[built.wiring == SINGLE])
    assert singles == set(parts)
    # 1K + 1K = 2K is not an E12 value, so it is kept; 10K ∥ 10K = 5K likewise.
    assert 2e3 in set(built.value[built.wiring == SERIES])
    assert 5e3 in set(built.value[built.wiring == PARALLEL])
    # Count against a direct enumeration.
    expected = set(parts)
    for i, a in enumerate(parts):
        for b in parts[i:]:
            for v in (a + b, a * b / (a + b)):
                if low <= v <= high:
                    expected.add(round(v, 6))
    assert len(built) == len({round(v, 6) for v in expected})


def test_same_value_prefers_fewest_parts():
    parts = np.array([1e3, 2e3])
    built = combos.build(parts, "resistance", 2, 1e3, 4e3)
    # 1K + 1K = 2K equals the single 2K part: kept once, as the single part.
    i = int(np.flatnonzero(built.value == 2e3)[0])
    assert built.wiring[i] == SINGLE
    assert np.count_nonzero(built.value == 2e3) == 1


def test_singles_only_and_fixed():
    parts = series.get("E6").values(1e-9, 1e-6)
    built = combos.build(parts, "capacitance", 1, 1e-9, 1e-6)
    assert np.all(built.wiring == SINGLE) and len(built) == len(parts)
    one = combos.fixed(1234.5, "resistance")
    assert len(one) == 1 and one.parts_of(0) == [1234.5] and math.isnan(one.part_b[0])


@given(st.lists(st.sampled_from([0.0, 1.0, 2.5, -3.0, 1e-9, 47e3]), max_size=30))
def test_distinct_is_numpys_unique(values):
    from rcpick.combos import distinct

    assert np.array_equal(distinct(np.array(values, dtype=float)), np.unique(np.array(values, dtype=float)))
