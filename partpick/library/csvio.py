"""The parts CSV of SPEC §5: reading with line-exact errors, writing that round-trips.

Reading: UTF-8 with or without a byte-order mark, a header row naming
columns in any order (``part_number`` and ``kind`` required, an unknown or
repeated column is bad input), one part a row, an empty cell = not known.
Numbers accept engineering notation (``4.7k``, ``10m``, ``1e-14``, ``10 mA``);
``vf_points`` is ``IF:VF`` pairs separated by ``;`` in A and V. Every bad
cell of every row is collected, with its file line and column, before
anything is reported.

Writing: every column in SPEC order, parts sorted by part number, numbers
as the shortest text that reads back to the same float, so that export →
import → export gives the same bytes.

Formula-injection guard (SPEC §5; OWASP "CSV Injection"): on export a text
cell that starts with ``=``, ``+``, ``-``, ``@``, tab, carriage return or
``'`` gets one leading ``'``; on import exactly one leading ``'`` is removed
from text cells. Number cells are never touched, so ``-40`` stays a number.
"""

from __future__ import annotations

import csv
import io
import math
import re
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from pathlib import Path

from partpick.errors import InputError
from partpick.inputs import bounded_list, read_input_bytes, read_stream_bytes
from partpick.library.fields import FIELD_NAMES, FIELDS_BY_NAME, PART_FIELDS, FieldSpec
from partpick.text import normalise_text
from partpick.units import parse_quantity

__all__ = [
    "CsvRow",
    "CsvProblem",
    "CsvInputError",
    "ImportCancelled",
    "format_number",
    "parse_number",
    "format_points",
    "parse_points",
    "guard_text",
    "unguard_text",
    "read_parts_csv",
    "write_parts_csv",
    "parts_csv_text",
]

_GUARDED_STARTS = ("=", "+", "-", "@", "\t", "\r", "'")
# A plain decimal number: read with float() directly (the common, fast case);
# anything else goes through the strict engineering-notation parser.
_PLAIN_NUMBER = re.compile(r"\s*[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\s*", re.ASCII)
# Units a cell may carry after its number, by column unit; other columns take bare numbers.
_CELL_UNITS = {"V", "A", "Ω", "W"}
REQUIRED_COLUMNS = ("part_number", "kind")


@dataclass(frozen=True)
class CsvRow:
    """One part read from a CSV file, with the file line its row starts on."""

    line: int
    part: dict
    columns: frozenset = frozenset(FIELD_NAMES)  # the columns the file carries (a row updates only these)


@dataclass(frozen=True)
class CsvProblem:
    """One bad cell or row: where it is and what is wrong."""

    line: int | None
    column: str | None
    reason: str

    def text(self, source: str = "") -> str:
        """``SOURCE line N, column C: reason`` (parts left out when unknown)."""
        where = [source] if source else []
        if self.line is not None:
            where.append(f"line {self.line}")
        if self.column is not None:
            where.append(f"column {self.column}")
        place = " ".join(where[:1] + [", ".join(where[1:])]) if source else ", ".join(where)
        return f"{place}: {self.reason}" if place.strip() else self.reason


class ImportCancelled(Exception):
    """The user cancelled an import; nothing was written."""


class CsvInputError(InputError):
    """Bad CSV input; ``problems`` holds every `CsvProblem`, the message lists them all."""

    def __init__(self, source: str, problems: list[CsvProblem], *, what: str = "nothing imported"):
        self.source = source
        self.problems = list(problems)
        rows = {p.line for p in self.problems if p.line is not None}
        count = f"{len(rows)} bad row{'s' if len(rows) != 1 else ''}" if rows else "bad file"
        details = bounded_list([p.text() for p in self.problems])
        super().__init__(f"{source}: {count}, {what}: {details}")


def format_number(value: float) -> str:
    """The shortest text that reads back to exactly ``value`` (``4700``, ``1e-14``, ``0.62``)."""
    text = repr(float(value))
    if text.endswith(".0"):
        text = text[:-2]
    return text


def parse_number(text: str, spec: FieldSpec, *, unit: str | None = None) -> float:
    """A number cell: plain or engineering notation, finite; raises InputError naming the problem."""
    # Fast path: float() reads exactly the plain decimal numbers, plus 'nan', 'inf',
    # digit underscores and non-ASCII digits, which are kept off this path.
    if text.isascii() and "_" not in text:
        try:
            value = float(text)
        except ValueError:
            pass
        else:
            if value - value == 0.0:  # finite
                return value
    if _PLAIN_NUMBER.fullmatch(text):
        value = float(text)
        if not math.isfinite(value):
            raise InputError(f"{text.strip()!r} is out of range (not a finite number)")
        return value
    expected = unit if unit is not None else (spec.unit if spec.unit in _CELL_UNITS else "")
    try:
        return parse_quantity(text, expected, name=spec.name)
    except InputError as error:
        # parse_quantity names the field first; the column is named by the caller.
        message = str(error)
        prefix = f"{spec.name}: "
        raise InputError(message[len(prefix):] if message.startswith(prefix) else message) from None


def format_points(points: Iterable[tuple[float, float]]) -> str:
    return ";".join(f"{format_number(current)}:{format_number(voltage)}" for current, voltage in points)


def parse_points(text: str) -> list[tuple[float, float]]:
    """``IF:VF;IF:VF`` in A and V (engineering notation allowed) to a list of (IF, VF)."""
    spec = FIELDS_BY_NAME["vf_points"]
    points = []
    for index, pair in enumerate(text.split(";"), start=1):
        if not pair.strip():
            raise InputError(f"point {index} is empty (write IF:VF pairs separated by ';', e.g. 0.1:0.72;1:0.93)")
        halves = pair.split(":")
        if len(halves) != 2:
            raise InputError(f"point {index} {pair.strip()!r} is not an IF:VF pair (e.g. 0.1:0.72)")
        try:
            current = parse_number(halves[0], spec, unit="A")
            voltage = parse_number(halves[1], spec, unit="V")
        except InputError as error:
            raise InputError(f"point {index} {pair.strip()!r}: {error}") from None
        points.append((current, voltage))
    return points


def guard_text(text: str) -> str:
    """Neutralise a text cell a spreadsheet would run as a formula (one leading ``'``)."""
    return "'" + text if text.startswith(_GUARDED_STARTS) else text


def unguard_text(text: str) -> str:
    """Undo `guard_text`: remove exactly one leading ``'``."""
    return text[1:] if text.startswith("'") else text


def _decode(data: bytes, source: str) -> str:
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        line = data.count(b"\n", 0, error.start) + 1
        raise CsvInputError(
            source,
            [CsvProblem(line, None, f"not UTF-8 text (byte 0x{data[error.start]:02x}); save the file as CSV UTF-8")],
        ) from None


def _read_source(source) -> tuple[str, str]:
    """(text, name for messages) of a path or a text/binary stream."""
    if isinstance(source, (str, Path)):
        path = Path(source)
        data = read_input_bytes(path, "CSV file")
        return _decode(data, str(path)), str(path)
    name = str(getattr(source, "name", "<input>"))
    data = read_stream_bytes(source, name, "CSV file")
    if isinstance(data, bytes):
        return _decode(data, name), name
    return data.removeprefix("\ufeff"), name


def _parse_cell(spec: FieldSpec, cell: str):
    if cell == "":
        return [] if spec.type == "points" else None
    if spec.type == "float":
        return parse_number(cell, spec)
    if spec.type == "points":
        return parse_points(cell)
    text = normalise_text(unguard_text(cell))
    if spec.type == "choice" and text not in spec.choices:
        raise InputError(f"{text!r} is not allowed (allowed: {spec.range_text()})")
    return text if text != "" else None


def read_parts_csv(
    source,
    *,
    progress: Callable[[int, int], None] | None = None,
    cancel: Callable[[], bool] | None = None,
) -> tuple[list[CsvRow], list[CsvProblem], str]:
    """Read every row of a parts CSV.

    Parameters
    ----------
    source : path or stream
        The CSV file.
    progress : callable(done, total), optional
        Called every few hundred rows with rows read so far and the total.
    cancel : callable() -> bool, optional
        Polled with progress; when it returns True, `ImportCancelled` is raised.

    Returns
    -------
    rows, problems, name
        The parts read (their cells parsed, not yet validated as parts), every
        problem found with its line and column, and the source's name for messages.

    Raises
    ------
    CsvInputError
        The file cannot be decoded or has no usable header (nothing else can be read).
    """
    text, name = _read_source(source)
    reader = csv.reader(io.StringIO(text, newline=""), strict=True)
    problems: list[CsvProblem] = []
    try:
        header = next(reader)
    except StopIteration:
        raise CsvInputError(name, [CsvProblem(1, None, "the file is empty (a header row is needed)")]) from None
    except csv.Error as error:
        raise CsvInputError(name, [CsvProblem(1, None, f"cannot read the header: {error}")]) from None
    seen: set[str] = set()
    for column in header:
        if column not in FIELDS_BY_NAME:
            hint = f" (did you mean {column.strip()!r}?)" if column.strip() in FIELDS_BY_NAME else ""
            problems.append(CsvProblem(1, column, f"unknown column {column!r}{hint}"))
        elif column in seen:
            problems.append(CsvProblem(1, column, f"column {column!r} appears twice"))
        seen.add(column)
    for column in REQUIRED_COLUMNS:
        if column not in seen:
            problems.append(CsvProblem(1, None, f"column {column!r} is missing (required)"))
    if problems:
        raise CsvInputError(name, problems)
    specs = [FIELDS_BY_NAME[column] for column in header]
    absent = [spec for spec in PART_FIELDS if spec.name not in seen]
    carried = frozenset(seen)

    records: list[tuple[int, list[str]]] = []
    next_line = reader.line_num + 1
    while True:
        try:
            cells = next(reader)
        except StopIteration:
            break
        except csv.Error as error:
            problems.append(CsvProblem(next_line, None, f"cannot read the row: {error}"))
            break
        line, next_line = next_line, reader.line_num + 1
        if any(cells):  # skip blank lines and rows of empty cells a spreadsheet left behind
            records.append((line, cells))

    total = len(records)
    rows: list[CsvRow] = []
    for index, (line, cells) in enumerate(records, start=1):
        if len(cells) != len(specs):
            problems.append(
                CsvProblem(line, None, f"the row has {len(cells)} cells, the header has {len(specs)} columns")
            )
            continue
        part = {}
        for spec, cell in zip(specs, cells):
            if not cell:
                part[spec.name] = [] if spec.type == "points" else None
                continue
            try:
                part[spec.name] = _parse_cell(spec, cell)
            except InputError as error:
                problems.append(CsvProblem(line, spec.name, str(error)))
                part[spec.name] = [] if spec.type == "points" else None
        for spec in absent:
            part[spec.name] = [] if spec.type == "points" else None
        rows.append(CsvRow(line, {key: part[key] for key in FIELD_NAMES}, carried))
        if index % 500 == 0:
            if progress is not None:
                progress(index, total)
            if cancel is not None and cancel():
                raise ImportCancelled()
    if progress is not None:
        progress(total, total)
    return rows, problems, name


def _cell(spec: FieldSpec, value) -> str:
    if value is None:
        return ""
    if spec.type == "float":
        return format_number(value)
    if spec.type == "points":
        return format_points(value)
    return guard_text(value)


def write_parts_csv(parts: Iterable[dict], stream) -> None:
    """Write parts to a text stream opened with ``newline=""``, in SPEC §5's column order."""
    writer = csv.writer(stream, lineterminator="\r\n")
    writer.writerow(FIELD_NAMES)
    for part in sorted(parts, key=lambda p: p["part_number"]):
        writer.writerow([_cell(spec, part.get(spec.name)) for spec in PART_FIELDS])


def parts_csv_text(parts: Iterable[dict]) -> str:
    stream = io.StringIO(newline="")
    write_parts_csv(parts, stream)
    return stream.getvalue()
