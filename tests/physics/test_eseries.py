"""IEC 60063 preferred values against the published lists and the `eseries` package."""

import eseries
import numpy as np
import pytest

from partpick.physics.eseries import (
    default_tolerance_pct,
    largest_at_most,
    series_values,
    smallest_at_least,
    smallest_power_class,
)

# IEC 60063 E24 (REFERENCES.md)
PUBLISHED_E24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7,
                 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1]
# IEC 60063 E96 (REFERENCES.md), ×100
PUBLISHED_E96 = [100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147,
                 150, 154, 158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221,
                 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309, 316, 324, 332,
                 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499,
                 511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750,
                 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976]


def test_e24_matches_the_published_list_including_the_eight_irregular_values():
    assert list(series_values("E24")) == PUBLISHED_E24
    geometric = np.round(10 ** (np.arange(24) / 24), 1)
    irregular = sorted(v for v, g in zip(PUBLISHED_E24, geometric) if abs(v - g) > 1e-9)
    assert irregular == [2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2]


def test_e96_matches_the_published_list_and_e48_is_every_other():
    assert list(np.round(series_values("E96") * 100).astype(int)) == PUBLISHED_E96
    assert list(np.round(series_values("E48") * 100).astype(int)) == PUBLISHED_E96[::2]
    # E96 equals round(100·10^(i/96)) (REFERENCES.md)
    assert PUBLISHED_E96 == [int(round(100 * 10 ** (i / 96))) for i in range(96)]


@pytest.mark.parametrize("name, es", [("E12", eseries.E12), ("E24", eseries.E24), ("E48", eseries.E48),
                                      ("E96", eseries.E96)])
def test_tables_agree_with_the_eseries_package(name, es):
    # Outside reference: the `eseries` package from PyPI.
    theirs = np.array(list(eseries.erange(es, 1.0, 9.99)), dtype=float)
    assert np.allclose(series_values(name), theirs, rtol=1e-9)


@pytest.mark.parametrize("name, es", [("E24", eseries.E24), ("E96", eseries.E96)])
def test_largest_and_smallest_agree_with_the_eseries_package_across_decades(name, es):
    rng = np.random.default_rng(7)
    for x in 10 ** rng.uniform(-2, 7, 300):
        assert largest_at_most(x, name) == pytest.approx(eseries.find_less_than_or_equal(es, x), rel=1e-9)
        assert smallest_at_least(x, name) == pytest.approx(eseries.find_greater_than_or_equal(es, x), rel=1e-9)


def test_decade_edges():
    # Just below a decade the largest value is the previous decade's top; exact values are kept.
    assert largest_at_most(999.999, "E24") == pytest.approx(910.0)
    assert largest_at_most(1000.0, "E24") == pytest.approx(1000.0)
    assert largest_at_most(9.1, "E24") == pytest.approx(9.1)
    assert smallest_at_least(9.11, "E24") == pytest.approx(10.0)
    assert smallest_at_least(1000.0, "E96") == pytest.approx(1000.0)
    assert largest_at_most(0.0999, "E12") == pytest.approx(0.082)
    assert np.allclose(largest_at_most(np.array([4.7e3, 4.69e3]), "E24"), [4.7e3, 4.3e3])


def test_tolerances_and_power_classes():
    # Common practice: E12/E24 parts sold at 5 %, E48/E96 at 1 %.
    assert default_tolerance_pct("E24") == 5.0
    assert default_tolerance_pct("E96") == 1.0
    # standard classes 0.125 0.25 0.5 1 2 3 5 W (SPEC §3); 0.2 W at 60 % derating needs 0.5 W
    assert smallest_power_class(0.2, 0.6) == 0.5
    assert smallest_power_class(0.125) == 0.125
    assert np.isnan(smallest_power_class(3.5, 0.6))


def test_bad_series_and_values_are_refused():
    with pytest.raises(ValueError, match="series must be one of"):
        series_values("E7")
    with pytest.raises(ValueError, match="value must be > 0"):
        largest_at_most(0.0)


@pytest.mark.parametrize("name, digits", [("E24", [f"{v:.1f}".replace(".", "") for v in PUBLISHED_E24]),
                                          ("E96", [str(v) for v in PUBLISHED_E96])])
def test_values_are_exact_decimals_across_decades(name, digits):
    # IEC 60063 tables (REFERENCES.md) as digit strings: each value × 10^k must be the double that Python's
    # correctly rounded decimal parser gives for the written number ("82e1" → 820.0, never 819.9999999).
    sig = len(digits[0])
    for exponent in range(-3, 8):
        for d in digits:
            written = float(f"{d}e{exponent - (sig - 1)}")
            assert largest_at_most(written, name) == written, (d, exponent)
            assert smallest_at_least(written, name) == written, (d, exponent)
            assert repr(largest_at_most(written * 1.0001, name)) == repr(written)
    assert repr(largest_at_most(830.0, "E24")) == "820.0"
    assert repr(largest_at_most(0.0083, "E24")) == "0.0082"
    assert repr(largest_at_most(3.33e5, "E24")) == "330000.0"
    assert repr(smallest_at_least(1.2e-3 * 1.05, "E12")) == "0.0015"


def test_resistor_derating_with_ambient():
    from partpick.physics.eseries import resistor_derating

    K = 273.15
    # Common practice for film resistors: full rating to 70 °C, linear to zero at 155 °C.
    assert resistor_derating(25.0 + K, 70.0 + K, 155.0 + K) == 1.0
    assert resistor_derating(70.0 + K, 70.0 + K, 155.0 + K) == pytest.approx(1.0)
    assert resistor_derating(100.0 + K, 70.0 + K, 155.0 + K) == pytest.approx(55.0 / 85.0)  # by hand: 0.647
    assert resistor_derating(112.5 + K, 70.0 + K, 155.0 + K) == pytest.approx(0.5)
    assert resistor_derating(160.0 + K, 70.0 + K, 155.0 + K) == 0.0
    with pytest.raises(ValueError, match="zero_power must be above rated_ambient"):
        resistor_derating(300.0, 350.0, 340.0)
