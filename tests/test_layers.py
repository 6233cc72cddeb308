"""The layering of SPEC §2 is enforced, not hoped for.

physics may import numpy/scipy only; checks never imports Qt or SQLAlchemy;
physics does no file I/O. Imports are checked in a fresh interpreter so that
nothing the test runner loaded earlier hides a violation.
"""

import ast
import json
import pkgutil
import subprocess
import sys
from pathlib import Path

import pytest

import partpick

PACKAGE_DIR = Path(partpick.__file__).parent
FORBIDDEN_BELOW_PLOTS = ("PySide6", "shiboken6", "pyqtgraph", "sqlalchemy")


def _modules(subpackage: str) -> list[str]:
    path = PACKAGE_DIR / subpackage
    return [f"partpick.{subpackage}"] + [
        f"partpick.{subpackage}.{m.name}" for m in pkgutil.iter_modules([str(path)])
    ]


def _loaded_after_import(modules: list[str]) -> list[str]:
    code = (
        "import importlib, json, sys\n"
        f"for m in {modules!r}: importlib.import_module(m)\n"
        "print(json.dumps(sorted(sys.modules)))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return json.loads(out.stdout)


@pytest.mark.parametrize("subpackage", ["physics", "checks"])
def test_lower_layers_import_no_qt_and_no_database(subpackage):
    if not (PACKAGE_DIR / subpackage).is_dir():
        pytest.skip(f"partpick.{subpackage} not present")
    loaded = _loaded_after_import(_modules(subpackage))
    offenders = [m for m in loaded if m.split(".")[0] in FORBIDDEN_BELOW_PLOTS]
    assert offenders == [], f"partpick.{subpackage} pulls in {offenders[:5]}"


def test_physics_imports_only_numpy_scipy_and_itself():
    allowed_roots = {"numpy", "scipy", "partpick", "__future__", "dataclasses", "math", "typing"}
    for path in (PACKAGE_DIR / "physics").glob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                roots = {alias.name.split(".")[0] for alias in node.names}
            elif isinstance(node, ast.ImportFrom):
                roots = {(node.module or "").split(".")[0]}
            else:
                continue
            assert roots <= allowed_roots, f"{path.name} imports {roots - allowed_roots}"


def test_physics_does_no_file_io():
    for path in (PACKAGE_DIR / "physics").glob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Name):
                assert node.func.id != "open", f"{path.name} opens a file"


def test_library_fields_module_is_free_of_sqlalchemy():
    if not (PACKAGE_DIR / "library" / "fields.py").exists():
        pytest.skip("partpick.library.fields not present")
    loaded = _loaded_after_import(["partpick.library.fields"])
    assert not [m for m in loaded if m.startswith("sqlalchemy")]


def test_the_window_never_imports_the_command_line():
    """SPEC §2: gui/ sits beside cli/, over the same services; neither reaches into the other."""
    for path in (PACKAGE_DIR / "gui").glob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom):
                names = [node.module or ""]
            elif isinstance(node, ast.Import):
                names = [alias.name for alias in node.names]
            else:
                continue
            assert not any(n == "partpick.cli" or n.startswith("partpick.cli.") for n in names), \
                f"gui/{path.name} imports {names}"


def test_number_formatting_lives_with_the_units():
    """format_engineering belongs to partpick.units; the checker's curves re-export it for old callers."""
    from partpick.checks import curves
    from partpick import units

    assert curves.format_engineering is units.format_engineering
    assert units.format_engineering(0.0123, "A") == "12.3 mA"  # 12.3 × 10⁻³ A, by hand
