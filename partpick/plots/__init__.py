"""Curve plots with pyqtgraph: one code path for the window and the reports.

The data come from `partpick.checks.curves.curves_for`; the functions here
draw them into a PlotItem and return the items they added.
"""

from partpick.plots.axes import EngineeringAxis, log_tick_text
from partpick.plots.draw import (
    SECTION_NAMES,
    DrawnItems,
    clear_items,
    draw_breakdown,
    draw_forward,
    draw_iv,
    draw_junction_temperature,
    draw_power,
    draw_section,
    draw_zener_output,
    legend_entries,
    redraw,
    redraw_section,
)
from partpick.plots.export import ensure_qapp, export_png, export_svg, section_png, section_widget
from partpick.plots.readout import CursorReadout, readout_text
from partpick.plots.sensitivity import draw_sensitivity

__all__ = [
    "EngineeringAxis", "log_tick_text", "SECTION_NAMES", "DrawnItems", "clear_items", "redraw", "redraw_section", "draw_breakdown", "draw_forward",
    "draw_iv", "draw_junction_temperature", "draw_power", "draw_section", "draw_zener_output", "legend_entries",
    "ensure_qapp", "export_png", "export_svg", "section_png", "section_widget", "CursorReadout", "readout_text",
    "draw_sensitivity",
]
