"""Build the example library, byte for byte reproducibly, from its readable source.

The source is ``resources/example_library/parts.csv`` (invented parts). The
build imports it through the same path as any user's CSV (validation and
fitting included) into a fresh SQLite file with a fixed page size, fixed
insertion order and no timestamps, then VACUUMs it, so the same source and
the same SQLite, numpy and scipy give the same bytes.

Run ``python -m partpick.library.example`` from a source checkout to rebuild
both copies: ``library.sqlite.example`` at the top level and the one packaged
in ``partpick/data/``.
"""

from __future__ import annotations

import os
import sqlite3
import sys
import tempfile
from pathlib import Path

__all__ = ["REPO_ROOT", "SOURCE_CSV", "EXAMPLE_COPIES", "build_example", "main"]

REPO_ROOT = Path(__file__).resolve().parents[2]
SOURCE_CSV = REPO_ROOT / "resources" / "example_library" / "parts.csv"
EXAMPLE_COPIES = (
    REPO_ROOT / "library.sqlite.example",
    REPO_ROOT / "partpick" / "data" / "library.sqlite.example",
)


def _set_up_empty_file(path: Path) -> None:
    # Page size and journal mode are fixed before the first table exists. The
    # file is left in WAL mode (the mode partpick opens every library in), so
    # opening the example never rewrites its header.
    connection = sqlite3.connect(path)
    try:
        connection.execute("PRAGMA page_size = 4096")
        connection.execute("PRAGMA journal_mode = WAL")
    finally:
        connection.close()


def _compact(path: Path) -> None:
    connection = sqlite3.connect(path, isolation_level=None)
    try:
        connection.execute("VACUUM")
        connection.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    finally:
        connection.close()


def build_example(source: Path = SOURCE_CSV, output: Path = EXAMPLE_COPIES[0]) -> Path:
    """Build the example library at ``output`` from the parts CSV ``source``.

    The file is built beside ``output`` and renamed into place, so a failed
    build leaves the old file as it was.

    Raises
    ------
    InputError
        The source CSV has bad rows (every one is listed).
    """
    from partpick.library.store import open_library

    output = Path(output)
    output.parent.mkdir(parents=True, exist_ok=True)
    folder = tempfile.mkdtemp(prefix=".example-build-", dir=output.parent)
    building = Path(folder) / "library.sqlite"
    try:
        _set_up_empty_file(building)
        with open_library(building, create=True) as library:
            library.import_csv(source)
        _compact(building)
        os.replace(building, output)
    finally:
        for leftover in Path(folder).glob("*"):
            leftover.unlink()
        os.rmdir(folder)
    return output


def main(argv: list[str] | None = None) -> int:
    """Rebuild both copies of the example library from the source CSV."""
    from partpick.errors import InputError

    if not SOURCE_CSV.is_file():
        print(f"example source {SOURCE_CSV} not found (run from a source checkout)", file=sys.stderr)
        return 1
    try:
        first = build_example(SOURCE_CSV, EXAMPLE_COPIES[0])
    except InputError as error:
        print(f"example library not built: {error}", file=sys.stderr)
        return 2
    for copy in EXAMPLE_COPIES[1:]:
        copy.parent.mkdir(parents=True, exist_ok=True)
        handle, temporary = tempfile.mkstemp(prefix=".example-", suffix=".tmp", dir=copy.parent)
        with os.fdopen(handle, "wb") as stream:
            stream.write(first.read_bytes())
        os.chmod(temporary, 0o644)  # mkstemp makes it private; package data must be readable
        os.replace(temporary, copy)
    for copy in EXAMPLE_COPIES:
        print(f"wrote {copy.relative_to(REPO_ROOT)}")
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
