"""Property-based fuzzing (hypothesis) of the readers and the physics entry points.

The property: whatever comes in, nothing escapes but the project's own
bad-input error — `InputError` from the CSV and TOML readers, the physics
layer's `ValueError` naming the parameter (DEVELOPERS.md: "every physics
function rejects non-finite or non-physical input with a ValueError") — and a
result that does come back is finite. No numpy warning is printed either: the
warnings are turned into errors, so an overflow would fail the test.
"""

from __future__ import annotations

import io
import os
import math
import warnings

import numpy as np
import pytest

hypothesis = pytest.importorskip("hypothesis")
from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from partpick.errors import InputError  # noqa: E402
from partpick.library.fields import FIELD_NAMES  # noqa: E402

# The suite's run is the same on every machine (derandomize; no example database written into the
# checkout); PARTPICK_FUZZ_EXAMPLES=2000 runs a longer, random search.
_LONG_RUN = "PARTPICK_FUZZ_EXAMPLES" in os.environ
SETTINGS = settings(max_examples=int(os.environ.get("PARTPICK_FUZZ_EXAMPLES", "150")), deadline=None,
                    derandomize=not _LONG_RUN, database=None,
                    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])

# Cell texts that stress the reader: numbers in every notation, units, empty, quotes, controls,
# bidirectional and zero-width characters, huge exponents, choice words.
CELLS = st.one_of(
    st.sampled_from(["", "0", "-1", "1e-14", "4.7k", "10 mA", "1e999", "nan", "inf", "-0", "1_000", "١٢", "0x10",
                     "rectifier", "zener", "tvs", "active", "entered", "fitted", "true", "'=1+1", "=cmd",
                     "0.1:0.7;1:0.9", "1:2:3", ";", "\u202eevil", "a\u200bb", "\x1b[2J", "é", "e\u0301"]),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.text(max_size=20),
)


@st.composite
def csv_texts(draw):
    columns = draw(st.lists(st.one_of(st.sampled_from(FIELD_NAMES), st.text(max_size=8)), min_size=0, max_size=8))
    if draw(st.booleans()):
        columns = ["part_number", "kind"] + columns
    rows = draw(st.lists(st.lists(CELLS, min_size=len(columns), max_size=len(columns) + 1), max_size=6))

    def quote(cell: str) -> str:
        return '"' + cell.replace('"', '""') + '"' if any(c in cell for c in ',"\r\n') else cell

    lines = [",".join(quote(c) for c in columns)] + [",".join(quote(c) for c in row) for row in rows]
    separator = draw(st.sampled_from(["\n", "\r\n"]))
    return separator.join(lines) + separator


@pytest.fixture(scope="module")
def fuzz_library(tmp_path_factory):
    from partpick.library.store import open_library

    library = open_library(tmp_path_factory.mktemp("fuzz") / "lib.sqlite", create=True)
    yield library
    library.close()


@SETTINGS
@given(text=csv_texts(), dry_run=st.booleans())
def test_csv_import_raises_only_bad_input(fuzz_library, text, dry_run):
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        try:
            fuzz_library.import_csv(io.StringIO(text), dry_run=dry_run)
        except InputError:
            pass
    for part in fuzz_library.list_parts():  # whatever was stored is a valid part
        from partpick.library.fields import part_problems

        assert part_problems(part) == []


@SETTINGS
@given(data=st.binary(max_size=400))
def test_csv_reader_on_raw_bytes(data):
    from partpick.library.csvio import read_parts_csv

    try:
        read_parts_csv(io.BytesIO(data))
    except InputError:
        pass


REQUIREMENT_KEYS = ["name", "role", "supply_min_V", "supply_max_V", "load_min_A", "load_max_A", "ambient_min_C",
                    "ambient_max_C", "policy", "objective", "reverse_margin_pct", "reverse_V", "max_forward_drop_V",
                    "kinds", "packages", "max_price", "zener", "target_V", "max_regulation_error_pct", "thermal",
                    "surge", "coil", "ac", "resistor_series"]
TOML_VALUES = st.recursive(
    st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(min_value=-10**30, max_value=10**30),
              st.text(max_size=10), st.booleans(), st.sampled_from(["series", "zener_shunt", "tvs_clamp", "E24"])),
    lambda children: st.one_of(st.lists(children, max_size=3),
                               st.dictionaries(st.sampled_from(REQUIREMENT_KEYS), children, max_size=4)),
    max_leaves=12,
)


@SETTINGS
@given(document=st.dictionaries(st.sampled_from(REQUIREMENT_KEYS), TOML_VALUES, max_size=12))
def test_requirement_reader_raises_only_bad_input(document):
    import tomli_w

    from partpick.checks.requirement import requirement_from_toml

    try:
        text = tomli_w.dumps(document)
    except (TypeError, ValueError):
        return  # not representable as TOML (e.g. a list mixing tables and values)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        try:
            requirement_from_toml(text, "fuzz.toml")
        except InputError:
            pass


@SETTINGS
@given(text=st.text(max_size=300))
def test_requirement_and_policy_readers_on_any_text(text):
    from partpick.checks.policy import policy_from_toml
    from partpick.checks.requirement import requirement_from_toml

    for reader in (requirement_from_toml, policy_from_toml):
        try:
            reader(text, "fuzz.toml")
        except InputError:
            pass


# -- physics entry points ---------------------------------------------------------------------------
# Each argument is drawn from its physical range (the part-field and requirement ranges of SPEC §5:
# temperatures −65…250 °C, Is 1e-20…1e-2 A, n 1…4, ...) or is a hostile value the function must refuse
# with a ValueError (NaN, ±inf, zero, negative). Outside its physical range a physics function is not
# called by partpick (the library and the requirement reader refuse first), so that range is the domain.
ANY_FLOAT = st.floats(allow_nan=True, allow_infinity=True, width=64)
HOSTILE = st.sampled_from([math.nan, math.inf, -math.inf, 0.0, -1.0, -1e-300])


def _in(low, high, log=False, hostile=True):
    values = (st.floats(min_value=math.log10(low), max_value=math.log10(high)).map(lambda e: 10.0 ** e) if log
              else st.floats(min_value=low, max_value=high))
    return st.one_of(values, HOSTILE) if hostile else values


CURRENT = _in(1e-9, 1e3, log=True)
SATURATION = _in(1e-20, 1e-2, log=True)
IDEALITY = _in(1.0, 4.0)
RS = _in(0.0, 1e3)
TEMPERATURE = _in(208.15, 523.15)
VOLTAGE = _in(0.0, 1e5)
RTH = _in(0.1, 1e4, log=True)
DOUBLING = _in(1.0, 100.0)
POWER = _in(0.0, 1e3)


def _finite(value) -> None:
    array = np.asarray(value, dtype=float)
    assert np.all(np.isfinite(array)), value


def _physics_call(function, *args, **kwargs):
    """Call a physics entry point: a ValueError (bad input) or a finite result, and no warning."""
    # Underflow to zero is exact enough and numpy never reports it by default; the rest would print.
    with warnings.catch_warnings(), np.errstate(over="raise", divide="raise", invalid="raise", under="ignore"):
        warnings.simplefilter("error")
        try:
            return function(*args, **kwargs)
        except ValueError:
            return None
        except FloatingPointError as error:  # numpy would have printed a warning
            raise AssertionError(f"{function.__name__}{args}: numpy floating-point warning ({error})") from None


@SETTINGS
@given(current=CURRENT, is_A=SATURATION, n=IDEALITY, rs=RS, t=TEMPERATURE)
def test_forward_voltage(current, is_A, n, rs, t):
    from partpick.physics.junction import forward_voltage

    result = _physics_call(forward_voltage, current, is_A, n, rs, t)
    if result is not None:
        _finite(result)


@SETTINGS
@given(source=VOLTAGE, resistance=_in(1e-3, 1e6, log=True), is_A=SATURATION, n=IDEALITY, rs=RS)
def test_loadline_current(source, resistance, is_A, n, rs):
    from partpick.physics.junction import loadline_current

    result = _physics_call(loadline_current, source, resistance, is_A, n, rs)
    if result is not None:
        _finite(result)


@SETTINGS
@given(is_A=SATURATION, t=TEMPERATURE, n=IDEALITY)
def test_saturation_current_at(is_A, t, n):
    from partpick.physics.junction import saturation_current_at

    result = _physics_call(saturation_current_at, is_A, t, n)
    if result is not None:
        _finite(result)


@SETTINGS
@given(points=st.lists(st.tuples(st.one_of(CURRENT, ANY_FLOAT), st.one_of(_in(0.05, 100.0), ANY_FLOAT)),
                       min_size=0, max_size=6))
def test_fit_forward_model(points):
    from partpick.physics.fit import fit_forward_model

    currents = [p[0] for p in points]
    voltages = [p[1] for p in points]
    try:
        result = _physics_call(fit_forward_model, currents, voltages)
    except RuntimeError as error:  # pragma: no cover - the solver giving up is reported, never silent
        pytest.fail(f"fit raised RuntimeError instead of refusing: {error}")
    if result is not None:
        _finite([result.saturation_current, result.ideality, result.series_resistance])


@SETTINGS
@given(ir=_in(1e-12, 1.0, log=True), vr=_in(0.1, 1e5, log=True), tr=TEMPERATURE, v=VOLTAGE, t=TEMPERATURE,
       doubling=DOUBLING)
def test_reverse_current(ir, vr, tr, v, t, doubling):
    from partpick.physics.leakage import reverse_current

    result = _physics_call(reverse_current, ir, vr, tr, v, t, doubling)
    if result is not None:
        _finite(result)


@SETTINGS
@given(power=POWER, doubling=DOUBLING, ambient=TEMPERATURE, rth=RTH)
def test_reverse_thermal_state(power, doubling, ambient, rth):
    from partpick.physics.thermal import reverse_thermal_state

    _physics_call(reverse_thermal_state, power, doubling, ambient, rth)


@SETTINGS
@given(ambient=TEMPERATURE, pd=_in(1e-3, 1e4, log=True), tj=TEMPERATURE, ref=TEMPERATURE)
def test_allowed_power(ambient, pd, tj, ref):
    from partpick.physics.thermal import allowed_power

    result = _physics_call(allowed_power, ambient, pd, tj, ref)
    if result is not None:
        _finite(result)


@SETTINGS
@given(vz=_in(1.0, 1000.0), izt=_in(1e-4, 1.0, log=True), zzt=_in(0.1, 1e4, log=True), supply=_in(0.0, 1e3),
       resistance=_in(1.0, 1e6, log=True), load=_in(0.0, 10.0), ambient=TEMPERATURE, rth=RTH)
def test_zener_shunt(vz, izt, zzt, supply, resistance, load, ambient, rth):
    from partpick.physics.zener import ZenerModel, solve_shunt

    model = _physics_call(ZenerModel, vz, izt, zzt)
    if model is None:
        return
    try:
        _physics_call(solve_shunt, model, supply, resistance, load, ambient, rth)
    except RuntimeError:
        pass  # documented: a solver that cannot converge says so (DEVELOPERS.md)


def test_the_fuzz_strategies_reach_valid_input():
    # A property that never sees a valid input proves little: one plain valid CSV passes the reader.
    from partpick.library.csvio import read_parts_csv

    rows, problems, _ = read_parts_csv(io.StringIO("part_number,kind,vrrm_V\nA,rectifier,100\n"))
    assert problems == [] and rows[0].part["vrrm_V"] == 100.0 and not math.isnan(rows[0].part["vrrm_V"])
