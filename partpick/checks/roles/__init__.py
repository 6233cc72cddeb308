"""Circuit roles: one module each, found and registered automatically.

A role module defines a subclass of `partpick.checks.roles.base.Role` and
exposes an instance as ``ROLE``. Every module in this package that has a
``ROLE`` is registered under ``ROLE.name`` (the requirement's ``role`` key),
so a new role — a bridge rectifier, an inductive-load clamp — is one new
module here (its curve builder may sit beside it as ``<role>_curves.py``,
which discovery skips); see DEVELOPERS.md ("Adding a circuit role").
"""

from __future__ import annotations

import importlib
import pkgutil

from partpick.checks.roles.base import Role, RoleResult

__all__ = ["ROLES", "Role", "RoleResult", "get_role"]


def _discover() -> dict[str, Role]:
    found: dict[str, Role] = {}
    for info in sorted(pkgutil.iter_modules(__path__), key=lambda m: m.name):
        if info.name.startswith("_") or info.name == "base" or info.name.endswith("_curves"):
            continue
        module = importlib.import_module(f"{__name__}.{info.name}")
        role = getattr(module, "ROLE", None)
        if isinstance(role, Role):
            if role.name in found:
                raise RuntimeError(f"two circuit roles are named {role.name!r}")
            found[role.name] = role
    return found


ROLES: dict[str, Role] = _discover()


def get_role(name: str) -> Role:
    """The role called ``name`` (KeyError if there is none; requirements are validated before)."""
    return ROLES[name]
