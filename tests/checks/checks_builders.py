"""Small invented parts and requirements for the checker tests (values are invented)."""

from __future__ import annotations

from partpick.checks.requirement import requirement_from_dict
from partpick.library.fields import empty_part


def make_part(**fields) -> dict:
    """A full part record (every key, unknown = None) with ``fields`` set; values are invented."""
    part = empty_part()
    part.update(fields)
    return part


def make_requirement(**keys):
    base = dict(name="test", role="series", supply_min_V=12.0, supply_max_V=14.0, load_min_A=0.5, load_max_A=1.0,
                ambient_min_C=25.0, ambient_max_C=50.0)
    base.update(keys)
    return requirement_from_dict({k: v for k, v in base.items() if v is not None}, "test.toml")
