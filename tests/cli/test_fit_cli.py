"""`partpick fit`: output formats, engineering notation, refusals as exit 2."""

import json
import subprocess
import sys

import numpy as np
import pytest

from partpick.cli import main
from partpick.physics.constants import celsius_to_kelvin
from partpick.physics.junction import forward_voltage, saturation_current_at


def _points(currents, voltages):
    args = []
    for i, v in zip(currents, voltages):
        args += ["--point", f"{float(i)!r},{float(v)!r}"]
    return args


def test_json_recovers_generating_parameters(capsys):
    currents = np.array([1e-3, 1e-2, 0.1, 1.0, 2.5])
    voltages = forward_voltage(currents, 2e-9, 1.8, 0.04)
    assert main(["fit", *_points(currents, voltages), "--format", "json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert set(doc) >= {"is_A", "n", "rs_ohm", "residual_max_mV", "points"}
    assert doc["is_A"] == pytest.approx(2e-9, rel=1e-4)
    assert doc["n"] == pytest.approx(1.8, rel=1e-5)
    assert doc["rs_ohm"] == pytest.approx(0.04, abs=1e-5)
    assert doc["residual_max_mV"] < 1e-6
    assert len(doc["points"]) == 5


def test_engineering_notation_points_and_table(capsys):
    assert main(["fit", "--point", "10m,0.71", "--point", "2.5,0.98"]) == 0
    out = capsys.readouterr().out
    assert "Rs = 0" in out and "two points" in out
    assert "10 mA" in out


def test_points_at_temperature_with_kind(capsys):
    # Points generated at 100 °C from a Schottky model whose Is is 3 µA at 25 °C.
    hot = celsius_to_kelvin(100.0)
    is_hot = saturation_current_at(3e-6, hot, 1.1, band_gap=0.69, temperature_exponent=2.0)
    currents = np.array([1e-3, 0.1, 1.0, 3.0])
    voltages = forward_voltage(currents, is_hot, 1.1, 0.03, hot)
    assert main(["fit", *_points(currents, voltages), "--temperature-C", "100", "--kind", "schottky",
                 "--format", "json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["temperature_C"] == 100.0 and "100 °C" in doc["note"]
    assert doc["is_A"] == pytest.approx(3e-6, rel=1e-4)


@pytest.mark.parametrize(
    "args, match",
    [
        (["--point", "10m,0.71"], "at least two"),
        (["--point", "10m,0.71", "--point", "1m,0.75"], "not monotonic"),
        (["--point", "10m,0.71", "--point", "1kk,0.9"], "--point 2 IF"),
        (["--point", "10m"], "must be IF,VF"),
        (["--point", "10m,0.6", "--point", "100m,0.61", "--point", "1,0.62"], "ideality bound"),
        (["--point", "10m,0.7", "--point", "1,0.9", "--temperature-C", "900"], "outside"),
        (["--point", "10m,nan", "--point", "1,0.9"], "--point 1 VF"),
    ],
)
def test_refusals_exit_2_with_one_line(capsys, args, match):
    assert main(["fit", *args]) == 2
    err = capsys.readouterr().err
    assert match in err
    assert err.count("\n") == 1
    assert "Traceback" not in err


def test_console_entry_point_runs():
    out = subprocess.run([sys.executable, "-m", "partpick", "fit", "--point", "10m,0.71", "--point", "1,0.9",
                          "--format", "json"], capture_output=True, text=True)
    assert out.returncode == 0, out.stderr
    assert json.loads(out.stdout)["n"] > 1


def test_a_refused_fit_shows_the_best_model_and_residuals_then_exits_2(capsys):
    argv = ["fit", "--point", "10m,0.65", "--point", "100m,0.75", "--point", "1,0.92", "--point", "5,1.15"]
    assert main(argv) == 2
    captured = capsys.readouterr()
    assert captured.err.count("\n") == 1 and "fit refused: the model misses the points" in captured.err
    assert "best the model could do" in captured.out and "what to change" in captured.out
    assert captured.out.count(" mV\n") >= 4  # each point's residual
    assert main(argv + ["--format", "json"]) == 2
    doc = json.loads(capsys.readouterr().out)
    assert doc["residual_max_mV"] > 5.0 and len(doc["points"]) == 4
    assert doc["refused"].startswith("the model misses") and "highest-current point" in doc["advice"]
    assert max(abs(p["residual_mV"]) for p in doc["points"]) == pytest.approx(doc["residual_max_mV"])
