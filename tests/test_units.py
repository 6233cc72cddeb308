"""Engineering notation at the edge: accepted forms, refusals with the field named."""

import pytest

from partpick.errors import InputError
from partpick.units import format_quantity, parse_quantity


@pytest.mark.parametrize(
    "text, unit, expected",
    [
        ("4.7k", "Ω", 4700.0),
        ("4.7 kΩ", "Ω", 4700.0),
        ("2.2 kohm", "Ω", 2200.0),
        ("1M", "Ω", 1e6),
        ("10 mA", "A", 0.01),
        ("10m", "A", 0.01),
        ("1 uA", "A", 1e-6),
        ("1 µA", "A", 1e-6),
        ("2 A", "A", 2.0),
        ("1e-14", "A", 1e-14),
        ("300 mV", "V", 0.3),
        ("-3.3", "V", -3.3),
        (".5", "", 0.5),
        ("25", "°C", 25.0),
        ("1 p", "", 1e-12),
        (3, "V", 3.0),
    ],
)
def test_accepted_forms(text, unit, expected):
    assert parse_quantity(text, unit, name="field") == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    "text, unit, match",
    [
        ("4.7kk", "Ω", "has unit 'k', expected 'Ω'"),
        ("1e400", "", "not a finite number"),
        ("nan", "", "not a number"),
        ("inf", "", "not a number"),
        ("1,5", "", "not a number"),
        ("", "V", "empty entry"),
        ("10 mV", "A", "has unit 'V', expected 'A'"),
        ("abc", "", "not a number"),
        (float("nan"), "", "not a finite number"),
        (True, "", "not a number"),
    ],
)
def test_refusals_name_the_field(text, unit, match):
    with pytest.raises(InputError, match=match) as info:
        parse_quantity(text, unit, name="supply_min_V")
    assert str(info.value).startswith("supply_min_V")


def test_format_round_trips():
    assert format_quantity(0.3, "V") == "300 mV"
    assert format_quantity(4700.0, "Ω") == "4.7 kΩ"
    assert format_quantity(None, "V") == ""
    for value in (0.3, 4700.0, 1e-14, 0.0012345):
        assert parse_quantity(format_quantity(value, "A"), "A") == pytest.approx(value, rel=1e-3)
    with pytest.raises(ValueError, match="not finite"):
        format_quantity(float("inf"), "V")


def test_a_unit_that_starts_with_a_prefix_letter_is_the_unit():
    # "1 K/W" is one kelvin per watt, not a kilo of "/W"; the form writes values back this way.
    from partpick.units import format_quantity, parse_quantity

    assert parse_quantity("1 K/W", "K/W") == 1.0
    assert parse_quantity("2.5K/W", "K/W") == 2.5
    assert parse_quantity(format_quantity(8.0, "K/W"), "K/W") == 8.0
    assert parse_quantity("1.5 kK/W", "K/W") == 1500.0
