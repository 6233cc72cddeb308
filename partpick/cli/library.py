"""`partpick library new | import | export | list`: the parts library from the command line.

Every subcommand takes ``--library PATH|URL`` after it; without it the
user's own library is used (created from the bundled example on first run).
"""

from __future__ import annotations

import json
import sys

from partpick.cli import add_library_option
from partpick.errors import InputError
from partpick.outputs import write_stdout
from partpick.text import terminal_safe

# Columns of `library list` (the table form); the JSON form has every CSV key.
_TABLE_COLUMNS = (
    ("part_number", "Part number", ""),
    ("kind", "Kind", ""),
    ("manufacturer", "Manufacturer", ""),
    ("package", "Package", ""),
    ("vrrm_V", "VRRM", "V"),
    ("if_avg_A", "IF(AV)", "A"),
    ("vz_V", "Vz", "V"),
    ("price", "Price", ""),
    ("lifecycle", "Lifecycle", ""),
)


def register(subparsers) -> None:
    parser = subparsers.add_parser("library", help="create, import into, export and list a parts library")
    commands = parser.add_subparsers(dest="library_command", metavar="ACTION")
    parser.set_defaults(func=_no_action)

    new = commands.add_parser("new", help="create an empty library")
    new.add_argument("path", metavar="PATH|URL", help="where to create it (a new file, or an empty database URL)")
    new.set_defaults(func=_new)

    importing = commands.add_parser("import", help="import parts from a CSV file (all rows or none)")
    importing.add_argument("csv", metavar="F.csv", help="the parts CSV (SPEC columns, any order)")
    importing.add_argument("--dry-run", action="store_true",
                           help="check the file and list per part what would change; write nothing")
    importing.add_argument("--replace", action="store_true",
                           help="rows replace stored parts whole (default: a row updates the columns it carries)")
    add_library_option(importing)
    importing.set_defaults(func=_import)

    export = commands.add_parser("export", help="export every part as CSV")
    export.add_argument("--output", metavar="F", help="file to write (default: standard output)")
    add_library_option(export)
    export.set_defaults(func=_export)

    listing = commands.add_parser("list", help="list the parts")
    listing.add_argument("--format", choices=("table", "json"), default="table", help="output format")
    add_library_option(listing)
    listing.set_defaults(func=_list)


def _no_action(args) -> int:
    raise InputError("partpick library: choose an action: new, import, export or list")


def _open(args):
    from partpick.library.store import open_library

    library = open_library(getattr(args, "library", None))
    if library.note:  # e.g. an older library was migrated (and where its backup is)
        print(f"partpick: {terminal_safe(library.note, keep='')}", file=sys.stderr)
    return library


def _new(args) -> int:
    from pathlib import Path

    from partpick.library.store import open_library

    if "://" not in args.path and Path(args.path).exists():
        raise InputError(f"library new: {args.path} already exists (choose a new file name)")
    with open_library(args.path, create=True) as library:
        if library.note != "created a new library":  # a server database that already holds a library
            raise InputError(f"library new: {library.location} already exists: it holds a library (choose an empty database)")
        write_stdout(f"created library {library.location}\n")
    return 0


def _import(args) -> int:
    with _open(args) as library:
        progress = None
        if sys.stderr.isatty():
            def progress(done: int, total: int) -> None:
                print(f"\rimporting… {100 * done // max(total, 1):3d} %", end="", file=sys.stderr, flush=True)
        try:
            summary = library.import_csv(args.csv, dry_run=args.dry_run, replace=args.replace, progress=progress)
        finally:
            if progress is not None:
                print("\r", end="", file=sys.stderr)
    lines = [summary.text()]
    if args.dry_run:
        lines += [f"  {line}" for line in summary.change_lines()]
    write_stdout("\n".join(terminal_safe(line, keep="") for line in lines) + "\n")
    return 0


def _export(args) -> int:
    from partpick.library.db import library_file
    from partpick.outputs import prepare_output

    location = getattr(args, "library", None)
    target = prepare_output(args.output, library=library_file(location)) if args.output else None
    with _open(args) as library:
        text = library.export_csv_text()
    if target is not None:
        target.write(text.encode("utf-8"))
    else:
        write_stdout(text)
    return 0


def _list(args) -> int:
    from partpick.library.fields import FIELD_NAMES

    with _open(args) as library:
        parts = library.list_parts()
    if args.format == "json":
        records = []
        for part in parts:
            record = {name: part[name] for name in FIELD_NAMES}
            record["vf_points"] = [list(point) for point in part["vf_points"]]
            records.append(record)
        write_stdout(json.dumps(records, indent=2, ensure_ascii=False, allow_nan=False) + "\n")
        return 0
    from partpick.units import format_quantity

    table = [[label for _, label, _ in _TABLE_COLUMNS]]
    for part in parts:
        row = []
        for name, _, unit in _TABLE_COLUMNS:
            value = part[name]
            if isinstance(value, float):
                row.append(format_quantity(value, unit) if unit else f"{value:g}")
            else:
                row.append("" if value is None else str(value))
        table.append(row)
    table = [[terminal_safe(cell, keep="") for cell in row] for row in table]
    widths = [max(len(row[i]) for row in table) for i in range(len(_TABLE_COLUMNS))]
    lines = ["  ".join(cell.ljust(width) for cell, width in zip(row, widths)).rstrip() for row in table]
    lines.append(f"{len(parts)} part{'s' if len(parts) != 1 else ''} in {library.location}")
    write_stdout("\n".join(lines) + "\n")
    return 0
