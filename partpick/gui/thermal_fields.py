"""The requirement form's thermal group: the ``[thermal]`` table (SPEC §3a), Qt-free.

``thermal.mount`` empty means no mount: each part's datasheet RthJA (or the
design's one ``rth_ja_K_per_W``). ``board`` shows the copper area, ``heatsink``
the interface and the heatsink; the other keys are hidden and not sent.
"""

from __future__ import annotations

from partpick.checks.requirement import MOUNTS, THERMAL_DEFAULTS

__all__ = ["thermal_fields", "THERMAL_GROUP", "thermal_field_applies", "drop_empty_thermal"]

THERMAL_GROUP = ("Thermal", "Thermal path (mount)")
_BY_MOUNT = {"thermal.copper_area_mm2": "board", "thermal.rth_cs_K_per_W": "heatsink",
             "thermal.rth_sa_K_per_W": "heatsink"}


def thermal_fields(field_type) -> tuple:
    """The group's fields as the form's `ReqField` (passed in, so this module needs no GUI model)."""
    def f(key, label, kind="float", unit="", choices=(), minimum=None, help=""):
        return field_type(f"thermal.{key}", label, kind, unit, False, THERMAL_GROUP[0], None, "thermal", choices,
                          minimum, help)

    return (
        f("mount", "Mount", "choice", choices=MOUNTS,
          help="How the part is mounted: on board copper (RthJA from the part's two datasheet areas) or on a "
               "heatsink (RthJC + RthCS + RthSA). Default: each part's datasheet RthJA."),
        # The area is a plain number of mm² (the notation parser knows no squared units).
        f("copper_area_mm2", "Copper area [mm²]", minimum=0.0,
          help="Copper area under and around the part; RthJA is read off the datasheet's two areas in ln(area)."),
        f("rth_cs_K_per_W", "Interface RthCS", unit="K/W", minimum=0.0,
          help=f"Case to heatsink (pad, grease); default {THERMAL_DEFAULTS['rth_cs_K_per_W']:g} K/W, an "
               "insulating pad (from memory)."),
        f("rth_sa_K_per_W", "Heatsink RthSA", unit="K/W", minimum=0.0,
          help="Heatsink to ambient thermal resistance (its datasheet figure at your air flow)."),
    )


def thermal_field_applies(key: str, mount) -> bool:
    """Whether a thermal key applies under the chosen mount (the mount itself always does)."""
    wanted = _BY_MOUNT.get(key)
    return wanted is None or mount == wanted


def drop_empty_thermal(data: dict) -> dict:
    """No mount chosen: no ``[thermal]`` table (an empty one would be bad input)."""
    table = data.get("thermal")
    if table is not None and not table.get("mount"):
        data.pop("thermal")
    return data



