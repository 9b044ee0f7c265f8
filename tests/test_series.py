"""IEC 60063 series data, checked against the published lists and the `eseries` package."""

import pytest

from rcpick import series
from rcpick.errors import UnknownName

# Source: IEC 60063:2015, "Preferred number series for resistors and capacitors" —
# published E3..E24 values that the formula 10^(i/n) does NOT give.
IRREGULAR = {
    "E3": [47],
    "E6": [33, 47],
    "E12": [27, 33, 39, 47, 82],
    "E24": [27, 30, 33, 36, 39, 43, 47, 82],
}


@pytest.mark.parametrize("name", ["E3", "E6", "E12", "E24", "E48", "E96", "E192"])
def test_against_eseries_package(name):
    """Independent reference: the PyPI package `eseries` (1.2.x) holds the IEC 60063 lists."""
    import eseries  # test extra; a missing install fails here rather than skipping

    assert series.get(name).digits == tuple(eseries.series(getattr(eseries, name)))


@pytest.mark.parametrize(("name", "values"), IRREGULAR.items())
def test_irregular_values_are_stored(name, values):
    digits = series.get(name).digits
    n = len(digits)
    for value in values:
        assert value in digits
        formula = round(10 ** (digits.index(value) / n), 1) * 10
        assert round(formula) != value, "the formula would have given this one"


def test_e192_holds_920_not_919():
    # IEC 60063: E192 holds 9.20 where round(10^(i/192), 2) gives 9.19.
    digits = series.get("E192").digits
    assert 920 in digits and 919 not in digits
    assert round(10 ** (digits.index(920) / 192), 2) == 9.19


def test_nesting_and_sizes():
    sets = {name: set(series.get(name).digits) for name in series.names()}
    assert [len(series.get(n).digits) for n in series.names()] == [3, 6, 12, 24, 48, 96, 192]
    assert sets["E3"] < sets["E6"] < sets["E12"] < sets["E24"]
    assert list(series.get("E48").digits) == list(series.get("E96").digits)[::2]
    assert list(series.get("E96").digits) == list(series.get("E192").digits)[::2]


def test_usual_tolerances():
    # IEC 60063 usage: E6 20 %, E12 10 %, E24 5 %, E48 2 %, E96 1 %, E192 0.5 %.
    expected = {"E6": 0.20, "E12": 0.10, "E24": 0.05, "E48": 0.02, "E96": 0.01, "E192": 0.005}
    for name, tol in expected.items():
        assert series.get(name).tolerance == pytest.approx(tol)


def test_values_in_range_include_both_ends():
    values = series.get("E24").values(1e3, 10e3)
    assert values[0] == 1e3 and values[-1] == 10e3
    assert len(values) == 25
    assert list(series.get("E12").values(4.7e-9, 5.6e-9)) == [4.7e-9, 5.6e-9]


def test_neighbours_and_closest_by_ratio():
    e12 = series.get("E12")
    assert e12.neighbours(3000.0) == (2700.0, 3300.0)
    # By ratio 3000 is nearer 3300 (1.100) than 2700 (1.111); eseries' linear find_nearest picks 2700.
    assert series.closest(2700.0, 3300.0, 3000.0) == 3300.0
    assert e12.neighbours(4700.0) == (4700.0, 4700.0)


def test_lookup_forms_and_unknown():
    assert series.get("e24").name == "E24"
    assert series.get("96").name == "E96"
    with pytest.raises(UnknownName, match="E3, E6, E12"):
        series.get("E25")
