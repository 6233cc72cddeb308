"""The curves as the user reads them: log-axis tick labels, legends, ranges, which parts are drawn."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from partpick.plots.axes import log_tick_text

REQUIREMENTS = Path(__file__).resolve().parents[2] / "resources" / "requirements"
SERIES_TOML = REQUIREMENTS / "reverse_polarity_24V.toml"
ZENER_TOML = REQUIREMENTS / "zener_5V1_reference.toml"

_PREFIX_VALUE = {"a": 1e-18, "f": 1e-15, "p": 1e-12, "n": 1e-9, "µ": 1e-6, "m": 1e-3, "": 1.0, "k": 1e3,
                 "M": 1e6, "G": 1e9, "T": 1e12}


def _label_value(text: str) -> float:
    """The value a tick label says (the inverse of `log_tick_text`, written separately)."""
    prefix = text[-1] if text and not text[-1].isdigit() else ""
    number = text[: len(text) - len(prefix)]
    return float(number) * _PREFIX_VALUE[prefix]


def tick_labels(plot_item, name: str = "left") -> list[str]:
    """The tick labels the axis paints now (pyqtgraph's own tick choice, the strings it draws)."""
    axis = plot_item.getAxis(name)
    low, high = axis.range
    labels = []
    for spacing, values in axis.tickValues(low, high, 400):
        labels += axis.tickStrings(values, axis.autoSIPrefixScale * axis.scale, spacing)
    return [t for t in labels if t]


def load(window, path) -> None:
    from partpick.gui.commands import load_requirement_file

    load_requirement_file(window.bench, path)
    window.rechecker.run_now()


def test_log_current_ticks_read_the_data_after_switching_from_zener_to_series(window):
    load(window, ZENER_TOML)
    load(window, SERIES_TOML)
    page = window.curves.pages["iv"]
    log_plot = page.widgets[0][1].getPlotItem()
    curves = window.curves.curve_sets[0]["forward"]["curves"]
    currents = np.concatenate([np.asarray(c["y"], dtype=float) for c in curves])
    currents = currents[np.isfinite(currents) & (currents > 0)]
    labels = tick_labels(log_plot)
    assert labels
    values = [_label_value(t) for t in labels]
    # The ticks must span the data's decades (the defect read 1000× too high: "1 … 10k" for 1 mA … 10 A).
    assert min(values) <= currents.max() and max(values) >= currents.min() * 0.999
    assert max(values) <= currents.max() * 100, (labels, currents.max())
    assert log_plot.getAxis("left").autoSIPrefixScale == 1.0


def test_saved_curves_image_uses_the_same_axes(window, tmp_path):
    """'Save curves image' renders the window's plots, so the same fixed tick scale is in the file."""
    load(window, ZENER_TOML)
    load(window, SERIES_TOML)
    out = tmp_path / "curves.png"
    window.bench.prompt.paths.append(str(out))
    window.run_command("curves.export")
    assert out.stat().st_size > 1000
    assert window.curves.pages["iv"].widgets[0][1].getPlotItem().getAxis("left").autoSIPrefixScale == 1.0


def test_log_tick_text_inverse():
    for value in (1e-9, 2e-6, 0.001, 0.5, 1.0, 20.0, 1500.0):
        assert _label_value(log_tick_text(value)) == pytest.approx(value, rel=1e-3)


def test_output_vs_supply_is_ranged_to_the_allowed_band(window):
    """The band (target ± the allowed error) fills a good part of the plot, not a sliver of 0 … 20 V."""
    load(window, ZENER_TOML)
    window.curves.tabs.setCurrentWidget(window.curves.pages["zener_output"])
    plot = window.curves.pages["zener_output"].widgets[0][0].getPlotItem()
    band = window.curves.curve_sets[0]["zener_output"]["band"]
    (_x0, _x1), (y0, y1) = plot.viewRange()
    assert y0 <= band["low"] and y1 >= band["high"]
    assert (band["high"] - band["low"]) / (y1 - y0) > 0.2  # the band is at least a fifth of the height
    requirement = window.bench.result.result["requirement"]
    target = requirement["zener"]["target_V"]
    error = requirement["zener"]["max_regulation_error_pct"] / 100  # the band by hand: target·(1 ± error)
    assert band["low"] == pytest.approx(target * (1 - error), rel=1e-6)
    assert band["high"] == pytest.approx(target * (1 + error), rel=1e-6)


def test_the_legend_sits_outside_every_plot(window, qtbot):
    load(window, SERIES_TOML)
    window.shortlist.select_rows([0, 1, 2, 3])
    curves = window.curves
    page = curves.current_page()
    assert page.shown == 4
    # No in-plot legend is shown (they covered the log plot at the first-run size) ...
    for column in page.cells:
        for plot_item in column:
            assert plot_item.legend is None or not plot_item.legend.isVisible()
    # ... the legend is a line under the plots, naming every curve of the tab once.
    assert curves.legend.isVisible()
    text = curves.legend.text()
    for curve in curves.curve_sets[0]["forward"]["curves"]:
        import html

        assert html.escape(curve["label"]) in text
    legend_top = curves.legend.mapTo(curves, curves.legend.rect().topLeft()).y()
    tabs_bottom = curves.tabs.mapTo(curves, curves.tabs.rect().bottomLeft()).y()
    assert legend_top >= tabs_bottom
    curves.legend_button.click()  # collapsible
    assert not curves.legend.isVisible()


def test_the_legend_follows_the_visible_tab(window):
    import html

    load(window, ZENER_TOML)
    curves = window.curves
    for key, section in (("zener_output", "zener_output"), ("iv", "breakdown"), ("zener_output", "zener_output")):
        curves.tabs.setCurrentWidget(curves.pages[key])
        text = curves.legend.text()
        labels = [c["label"] for c in curves.curve_sets[0][section]["curves"]]
        assert all(html.escape(label) in text for label in labels), key
        other = "breakdown" if section == "zener_output" else "zener_output"
        assert not any(html.escape(c["label"]) in text for c in curves.curve_sets[0][other]["curves"]), key
