"""Reading and writing values (SI prefixes, IEC 60062 RKM code, percent, ppm)."""

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from rcpick import series
from rcpick.errors import BadValue
from rcpick.notation import format_rkm, format_si, parse_count, parse_percent, parse_ppm, parse_quantity
from rcpick.settings import SETTINGS, option_name


@pytest.mark.parametrize(
    ("text", "kind", "expected"),
    [
        ("4.7k", "resistance", 4700.0),
        ("4.7kΩ", "resistance", 4700.0),
        ("4.7 kohm", "resistance", 4700.0),
        ("4.7 kΩ", "resistance", 4700.0),  # U+2126 ohm sign
        ("1Meg", "resistance", 1e6),
        ("1MEG", "resistance", 1e6),
        ("2.2M", "resistance", 2.2e6),
        ("100n", "capacitance", 100e-9),
        ("100nF", "capacitance", 100e-9),
        ("0.1u", "capacitance", 0.1e-6),
        ("0.1µF", "capacitance", 0.1e-6),
        ("1e-7", "capacitance", 1e-7),
        ("10ms", "time", 10e-3),
        ("2.5 s", "time", 2.5),
        ("1.5kHz", "frequency", 1500.0),
        ("3.3V", "voltage", 3.3),
        ("10kV", "voltage", 10e3),
    ],
)
def test_si_prefixes(text, kind, expected):
    assert parse_quantity(text, kind) == expected


@pytest.mark.parametrize(
    ("text", "kind", "expected"),
    # IEC 60062:2016 RKM code examples
    [
        ("4K7", "resistance", 4.7e3),
        ("R47", "resistance", 0.47),
        ("4R7", "resistance", 4.7),
        ("470R", "resistance", 470.0),
        ("47K3", "resistance", 47.3e3),
        ("2M2", "resistance", 2.2e6),
        ("4M7", "resistance", 4.7e6),
        ("4n7", "capacitance", 4.7e-9),
        ("2u2", "capacitance", 2.2e-6),
        ("1µ0", "capacitance", 1e-6),
        ("100n", "capacitance", 100e-9),
        ("4p7", "capacitance", 4.7e-12),
    ],
)
def test_rkm_code(text, kind, expected):
    assert parse_quantity(text, kind) == expected


@pytest.mark.parametrize(
    ("text", "kind", "fragment"),
    [
        ("1kHz", "time", "is a frequency, not a time"),
        ("10ms", "frequency", "is a time, not a frequency"),
        ("100nF", "resistance", "is a capacitance"),
        ("4K7", "capacitance", "cannot read"),
        ("4m7", "resistance", "ambiguous"),
        ("abc", "time", "cannot read"),
        ("", "time", "empty"),
        ("0", "time", "greater than 0"),
        ("-1k", "resistance", "greater than 0"),
        ("nan", "time", "cannot read"),
        ("inf", "time", "cannot read"),
        ("1e999", "time", "not a finite"),
    ],
)
def test_bad_values_name_no_option_until_a_layer_does(text, kind, fragment):
    # the core speaks of no option or parameter; the setting layer names the setting, the caller spells it
    with pytest.raises(BadValue, match=fragment) as caught:
        parse_quantity(text, kind)
    assert caught.value.setting is None and ":" not in str(caught.value).split(" ")[0]
    setting = {"time": "tau", "frequency": "cutoff", "resistance": "r_min", "capacitance": "c_min"}[kind]
    with pytest.raises(BadValue, match=fragment) as named:
        SETTINGS[setting].read(text)
    assert str(named.value).startswith(f"{setting}: ")
    assert named.value.render(option_name).startswith(SETTINGS[setting].flag_name + ": ")


def test_ohm_and_micro_signs_both_read():
    # U+03A9 GREEK CAPITAL LETTER OMEGA and U+2126 OHM SIGN; U+00B5 MICRO SIGN and U+03BC GREEK SMALL LETTER MU
    assert parse_quantity("4.7k\u03a9", "resistance") == parse_quantity("4.7k\u2126", "resistance") == 4700.0
    assert parse_quantity("2.2\u00b5F", "capacitance") == parse_quantity("2.2\u03bcF", "capacitance") == 2.2e-6
    assert parse_quantity("2\u00b52", "capacitance") == parse_quantity("2\u03bc2", "capacitance") == 2.2e-6


@pytest.mark.parametrize("text", ["\u0663ms", "\uff11\uff10ms", "1\u0660k"])
def test_digits_of_other_scripts_are_refused(text):
    with pytest.raises(BadValue, match="type the digits 0-9"):
        parse_quantity(text, "time" if text.endswith("ms") else "resistance")


@pytest.mark.parametrize(
    ("text", "value"), [("20000", 20000), ("2e4", 20000), ("20k", 20000), ("1M", 1000000), ("1_000", 1000)]
)
def test_counts_in_rcpick_notation(text, value):
    assert parse_count(text) == value


@pytest.mark.parametrize("text", ["abc", "2.5", "1e400", "", "1e19"])
def test_bad_counts(text):
    with pytest.raises(BadValue):
        parse_count(text)


@pytest.mark.parametrize(
    ("text", "kind"), [("5e-324", "time"), ("1e-300", "resistance"), ("1e400", "time"), ("1e20", "capacitance")]
)
def test_values_outside_what_rcpick_handles_are_refused(text, kind):
    with pytest.raises(BadValue, match="outside|not a finite"):
        parse_quantity(text, kind)


def test_percent_and_ppm():
    assert parse_percent("5%") == 0.05
    assert parse_percent("0.5 %") == 0.005
    assert parse_percent("-5%") == -0.05
    assert parse_ppm("100ppm") == pytest.approx(1e-4)
    assert parse_ppm("100 ppm/°C") == pytest.approx(1e-4)
    assert parse_ppm("-870ppm") == pytest.approx(-870e-6)
    with pytest.raises(BadValue):
        parse_percent("five")
    with pytest.raises(BadValue):
        parse_ppm("lots")


@pytest.mark.parametrize(
    ("value", "unit", "digits", "trim", "expected"),
    [
        (4.7e3, "Ω", 3, True, "4.7 kΩ"),
        (100e-9, "F", 3, True, "100 nF"),
        (4.7e-3, "s", 3, False, "4.70 ms"),
        (159.155, "Hz", 3, False, "159 Hz"),
        (999.96, "Hz", 3, False, "1.00 kHz"),
        (-2.2e-6, "F", 3, True, "-2.2 µF"),
    ],
)
def test_format_si(value, unit, digits, trim, expected):
    assert format_si(value, unit, digits, trim=trim) == expected


@pytest.mark.parametrize(
    ("value", "kind", "expected"),
    [
        (0.47, "resistance", "R47"),
        (4.7, "resistance", "4R7"),
        (470.0, "resistance", "470R"),
        (4.7e3, "resistance", "4K7"),
        (47.3e3, "resistance", "47K3"),
        (2.2e6, "resistance", "2M2"),
        (4.7e-9, "capacitance", "4n7"),
        (2.2e-6, "capacitance", "2u2"),
        (100e-9, "capacitance", "100n"),
    ],
)
def test_format_rkm(value, kind, expected):
    assert format_rkm(value, kind) == expected


def _every_series_value(low, high):
    for name in series.names():
        yield from series.get(name).values(low, high)


@pytest.mark.parametrize(
    ("kind", "unit", "low", "high"), [("resistance", "Ω", 1e-3, 1e12), ("capacitance", "F", 0.1e-12, 1.0)]
)
def test_round_trip_every_series_value(kind, unit, low, high):
    """format → parse gives back every series value exactly, 1 mΩ…1 TΩ and 0.1 pF…1 F."""
    count = 0
    for value in _every_series_value(low, high):
        assert parse_quantity(format_rkm(value, kind), kind) == value
        assert parse_quantity(format_si(value, unit, 3, trim=True), kind) == value
        assert parse_quantity(format_si(value, unit, 3), kind) == value
        count += 1
    assert count > 2000


@given(st.floats(min_value=1e-15, max_value=1e3, allow_nan=False, allow_infinity=False))
def test_round_trip_any_value_to_its_digits(value):
    """Written with 15 figures, any value reads back within float rounding."""
    text = format_si(value, "F", 15)
    assert math.isclose(parse_quantity(text, "capacitance"), value, rel_tol=1e-14)
    rkm = format_rkm(value, "capacitance", 15)
    assert math.isclose(parse_quantity(rkm, "capacitance"), value, rel_tol=1e-14)
