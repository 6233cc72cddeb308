"""The Library: parts and policies, validated on the way in, one transaction per user action.

Every entry path (CSV import, the desktop app's editor, this API) goes through
`prepare_part`, which validates the record (`partpick.library.fields`) and
fits the forward model when a part gives VF points but no Is, n, Rs. Reads
use Core selects (no ORM objects), because the checker loads every part at
once; writes use one session per action, ``with Session() as s, s.begin()``,
so each commits or rolls back whole.
"""

from __future__ import annotations

import contextlib
import gc
import hashlib
import json
import os
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from pathlib import Path

from sqlalchemy import delete, exc, insert, or_, select

from partpick.errors import InputError, LibraryError
from partpick.inputs import bounded_list
from partpick.library import csvio
from partpick.library.csvio import CsvInputError, CsvProblem, ImportCancelled
from partpick.library.db import (
    DEFAULT_BUSY_TIMEOUT_S,
    library_errors,
    make_engine,
    make_sessionmakers,
    one_line,
    server_read_only,
    sqlite_path,
    sqlite_read_only,
    to_url,
)
from partpick.library.fields import FIELD_NAMES, FIELDS_BY_NAME, MODEL_FIELDS, PART_FIELDS, part_problems
from partpick.library.migrate import prepare_database
from partpick.library.models import Part, Policy, VfPoint
from partpick.text import normalise_text, text_problem

__all__ = ["Library", "ImportSummary", "open_library", "prepare_part"]

_PART = Part.__table__
_POINT = VfPoint.__table__
_POLICY = Policy.__table__
# Stored part columns except the read-only extra, in CSV order.
_ROW_COLUMNS = tuple(name for name in FIELD_NAMES if name != "vf_points")
_READ_COLUMNS = _ROW_COLUMNS + ("fit_residual_mV",)
_CHUNK = 1000
_COLUMN_KINDS = {name: ("float" if name == "fit_residual_mV" else FIELDS_BY_NAME[name].type) for name in _READ_COLUMNS}


def _finite_number(value) -> bool:
    return value is None or (type(value) in (float, int) and value - value == 0)


def _text_or_none(value) -> bool:
    return value is None or type(value) is str


def _first(row):
    return row[0]  # part_number leads the selected columns


@dataclass
class ImportSummary:
    """What an import did (or, for a dry run, would do)."""

    source: str
    added: list[str] = field(default_factory=list)
    updated: list[str] = field(default_factory=list)
    unchanged: list[str] = field(default_factory=list)
    fitted: list[str] = field(default_factory=list)
    dry_run: bool = False
    cancelled: bool = False
    # per updated part: (fields whose value changes, fields that are cleared)
    changes: dict[str, tuple[list[str], list[str]]] = field(default_factory=dict)

    @property
    def written(self) -> bool:
        return not self.dry_run and not self.cancelled and bool(self.added or self.updated)

    def text(self) -> str:
        counts = f"added {len(self.added)}, updated {len(self.updated)}, unchanged {len(self.unchanged)}"
        plural = "s" if len(self.fitted) != 1 else ""
        fitted = f" ({len(self.fitted)} forward model{plural} fitted to VF points)" if self.fitted else ""
        if self.cancelled:
            return f"{self.source}: import cancelled, nothing written"
        if self.dry_run:
            return f"{self.source}: dry run, nothing written; would have {counts}{fitted}"
        return f"{self.source}: {counts}{fitted}"

    def change_lines(self) -> list[str]:
        """Per part, what the import changes (or would): added, or the fields changed and cleared."""
        lines = [f"{number}: added" for number in self.added]
        verb = ("would change", "would clear") if self.dry_run else ("changed", "cleared")
        for number in self.updated:
            changed, cleared = self.changes.get(number, ([], []))
            words = []
            if changed:
                words.append(f"{verb[0]} {', '.join(changed)}")
            if cleared:
                words.append(f"{verb[1]} {', '.join(cleared)}")
            lines.append(f"{number}: {'; '.join(words) if words else verb[0] + ' nothing'}")
        return lines


@contextlib.contextmanager
def _bulk():
    """Pause the cyclic garbage collector while building many small objects at once.

    Loading 10,000 parts creates hundreds of thousands of dicts and tuples, none
    in reference cycles; the collector's repeated full passes over them would
    otherwise cost more than the load itself.
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def _normalise(part: dict) -> dict:
    """A copy with every field present: '' → None, ints → float, points → tuples of floats."""
    record = {}
    for spec in PART_FIELDS:
        name = spec.name
        value = part.get(name)
        if value is None or type(value) is float:
            pass
        elif spec.type == "points":
            if isinstance(value, (list, tuple)):
                value = [_point(pair) for pair in value]
        elif spec.type in ("text", "choice") and isinstance(value, str):
            value = normalise_text(value) if value else None
        elif spec.type == "float" and isinstance(value, int) and not isinstance(value, bool):
            value = float(value)
        record[name] = value
    if record["vf_points"] is None:
        record["vf_points"] = []
    if not part.keys() <= record.keys():
        for key in part:
            if key not in record and key != "fit_residual_mV":
                record[key] = part[key]  # kept so that validation names it as unknown
    return record


def _point(pair):
    if type(pair) is tuple and len(pair) == 2 and type(pair[0]) is float and type(pair[1]) is float:
        return pair
    if isinstance(pair, (list, tuple)):
        return tuple(float(x) if isinstance(x, int) and not isinstance(x, bool) else x for x in pair)
    return pair


def _fit(record: dict) -> tuple[str | None, str] | None:
    """Fit Is, n, Rs to the record's VF points in place; a (field, message) problem on refusal."""
    try:
        from partpick.physics.fit import FitRefused, fit_forward_model
    except ImportError as error:  # pragma: no cover - physics ships with partpick
        return ("vf_points", f"part {record['part_number']}: the model fitter is not available ({error})")
    currents = [point[0] for point in record["vf_points"]]
    voltages = [point[1] for point in record["vf_points"]]
    try:
        fit = fit_forward_model(currents, voltages)
    except (FitRefused, ValueError, RuntimeError) as refusal:  # refused, or the solver gave up
        return (
            "vf_points",
            f"part {record['part_number']}: the forward model cannot be fitted to vf_points ({refusal}); "
            "give is_A, n and rs_ohm instead",
        )
    record["is_A"] = float(fit.saturation_current)
    record["n"] = float(fit.ideality)
    record["rs_ohm"] = float(fit.series_resistance)
    record["model_source"] = "fitted"
    record["fit_residual_mV"] = float(fit.residual_max_V) * 1000.0
    return None


def _residual_mV(record: dict) -> float | None:
    """Largest |model − point| of a stored fitted model against its points, in mV."""
    try:
        from partpick.physics.junction import forward_voltage
    except ImportError:  # pragma: no cover
        return None
    currents = [point[0] for point in record["vf_points"]]
    voltages = [point[1] for point in record["vf_points"]]
    try:
        import numpy as np

        model = forward_voltage(np.asarray(currents), record["is_A"], record["n"], record["rs_ohm"])
        return float(np.max(np.abs(model - np.asarray(voltages)))) * 1000.0
    except ValueError:
        return None


def prepare_part(part: dict, *, skip_fields: Iterable[str] = ()) -> tuple[dict, list[tuple[str | None, str]]]:
    """Validate a part and complete its forward model; returns (record, problems).

    The record has every field of `PART_FIELDS` plus ``fit_residual_mV``. A part
    with VF points and none of Is, n, Rs is fitted (``model_source = "fitted"``);
    a part with Is, n, Rs and no source is ``"entered"``. ``skip_fields`` are
    fields already reported as unreadable (their follow-on problems are dropped).
    """
    record = _normalise(part)
    skip = set(skip_fields)
    problems = [(name, message) for name, message in part_problems(record) if name not in skip]
    if problems or skip:
        return record, problems
    record["fit_residual_mV"] = None
    has_model = all(record[name] is not None for name in MODEL_FIELDS)
    if not has_model and record["vf_points"]:
        problem = _fit(record)
        if problem is not None:
            return record, [problem]
        fitted_problems = part_problems(record)  # the fitted values must be in range too
        if fitted_problems:
            return record, [(name, f"{message} (from the fit to vf_points)") for name, message in fitted_problems]
    elif has_model:
        if record["model_source"] is None:
            record["model_source"] = "entered"
        if record["model_source"] == "fitted" and record["vf_points"]:
            record["fit_residual_mV"] = _residual_mV(record)
    return record, []


def _insert_many(connection, table, rows: list[dict]) -> None:
    """INSERT many rows (all with the same keys) in one DBAPI executemany.

    The statement is SQLAlchemy's own compilation of ``insert(table)`` for the
    connection's dialect, and each column's bind processor (if the dialect has
    one) is applied column by column; what is skipped is SQLAlchemy's per-row
    parameter assembly, a third of the time of a 10,000-part import.
    """
    keys = list(rows[0])
    dialect = connection.dialect
    compiled = insert(table).compile(dialect=dialect, column_keys=keys)
    order = list(compiled.positiontup) if compiled.positional else keys
    columns = []
    for key in order:
        values = [row[key] for row in rows]
        process = table.c[key].type.bind_processor(dialect)
        if process is not None:
            values = [None if value is None else process(value) for value in values]
        columns.append(values)
    if compiled.positional:
        parameters = list(zip(*columns))
    else:
        parameters = [dict(zip(order, values)) for values in zip(*columns)]
    connection.exec_driver_sql(compiled.string, parameters)


def _differences(old: dict, new: dict) -> tuple[list[str], list[str]]:
    """(fields given a different value, fields cleared) from ``old`` to ``new``."""
    changed, cleared = [], []
    for name in FIELD_NAMES:
        before, after = old.get(name), new.get(name)
        if before == after or (before in (None, []) and after in (None, [])):
            continue
        (cleared if after in (None, []) else changed).append(name)
    return changed, cleared


def _csv_view(part: dict) -> dict:
    """The part as the CSV sees it (for added / updated / unchanged)."""
    return {name: part[name] for name in FIELD_NAMES}


class Library:
    """An open parts library. Use `open_library` to get one; close it when done."""

    def __init__(self, location: str, engine, note: str | None, *, path: Path | None = None,
                 read_only: bool = False):
        self.location = location
        self.note = note
        self.path = path  # the SQLite file, None for a server library
        self.read_only = read_only  # opened read-only: every write is refused ("library is read-only")
        self._engine = engine
        self._Reading, self._Writing = make_sessionmakers(engine)

    # -- plumbing ---------------------------------------------------------------------
    def __enter__(self) -> "Library":
        return self

    def __exit__(self, *exc_info) -> None:
        self.close()

    def close(self) -> None:
        self._engine.dispose()

    def _refuse_read_only(self, action: str) -> None:
        if self.read_only:
            raise LibraryError(f"library {self.location} is read-only: cannot {action}")

    @contextlib.contextmanager
    def _unit_of_work(self, action: str):
        """One user action: one transaction holding the write lock, committed or rolled back whole."""
        self._refuse_read_only(action)
        with library_errors(self.location, action):
            with self._Writing() as session, session.begin():
                yield session

    @contextlib.contextmanager
    def _reading(self, action: str):
        with library_errors(self.location, action):
            with self._Reading() as session, session.begin():
                yield session.connection()

    # -- parts ------------------------------------------------------------------------
    @staticmethod
    def _fetch(connection, where=None):
        """(part rows sorted by part number, {part id: [(IF, VF), ...]}) with Core selects."""
        columns = [_PART.c[name] for name in _READ_COLUMNS]
        query = select(*columns, _PART.c.id)
        points_query = select(_POINT.c.part_id, _POINT.c.current_A, _POINT.c.voltage_V)
        if where is not None:
            query = query.where(where)
            points_query = points_query.join(_PART, _PART.c.id == _POINT.c.part_id).where(where)
        rows = connection.execute(query).all()
        point_rows = connection.execute(points_query.order_by(_POINT.c.part_id, _POINT.c.seq)).all()
        points: dict[int, list[tuple[float, float]]] = {}
        for part_id, current, voltage in point_rows:
            if part_id in points:
                points[part_id].append((current, voltage))
            else:
                points[part_id] = [(current, voltage)]
        # Sorted here, not in SQL: server collations differ, code-point order does not.
        rows.sort(key=_first)
        return rows, points

    def _check_stored(self, connection, rows, points, where=None) -> None:
        """LibraryError naming the part and field when stored content is damaged (SPEC §5).

        A number column holding text (SQLite stores whatever it is given), an
        infinite number, a choice outside its list (written past the CHECK
        constraints), a VF point that is not a pair of numbers: one line, no
        traceback. This runs on every load, so the database screens the columns
        in one query (text and blobs sort above every number in SQLite, infinity
        and NaN above every finite number in PostgreSQL); only a suspect library
        is examined value by value.
        """
        if not rows:
            return
        big = 1.0e308
        suspect = []
        for name in _READ_COLUMNS:
            column = _PART.c[name]
            if _COLUMN_KINDS[name] == "float":
                suspect += [column > big, column < -big]
            elif _COLUMN_KINDS[name] == "choice":
                suspect.append(column.not_in(FIELDS_BY_NAME[name].choices))
        query = select(_PART.c.id).where(or_(*suspect)).limit(1)
        points_query = select(_POINT.c.id).where(or_(
            _POINT.c.current_A > big, _POINT.c.current_A < -big, _POINT.c.voltage_V > big, _POINT.c.voltage_V < -big,
        )).limit(1)
        if where is not None:
            query = query.where(where)
            points_query = points_query.join(_PART, _PART.c.id == _POINT.c.part_id).where(where)
        if connection.execute(query).first() is None and connection.execute(points_query).first() is None:
            return
        for index, name in enumerate(_READ_COLUMNS):
            kind = _COLUMN_KINDS[name]
            if kind == "float":
                ok = _finite_number
            elif kind == "choice":
                ok = (set(FIELDS_BY_NAME[name].choices) | {None}).__contains__
            else:
                ok = _text_or_none
            for row in rows:
                if not ok(row[index]):
                    self._damaged(row[0], name, row[index])
        numbers = {row[-1]: row[0] for row in rows}
        for part_id, pairs in points.items():
            for current, voltage in pairs:
                if not (_finite_number(current) and _finite_number(voltage)):
                    self._damaged(numbers.get(part_id, f"id {part_id}"), "vf_points", (current, voltage))

    def _damaged(self, number, name, value):
        shown = repr(value)
        shown = shown if len(shown) <= 40 else shown[:37] + "..."
        raise LibraryError(f"library {self.location} is damaged: part {number!r}, field {name} holds {shown} "
                           "(not a valid value); correct or delete the part")

    @staticmethod
    def _as_parts(rows, points) -> list[dict]:
        names = _READ_COLUMNS
        parts = []
        for row in rows:
            part = dict(zip(names, row))  # the trailing id is left out by zip
            found = points.get(row[-1])
            part["vf_points"] = found if found is not None else []
            parts.append(part)
        return parts

    def _load(self, connection, where=None) -> list[dict]:
        rows, points = self._fetch(connection, where)
        self._check_stored(connection, rows, points, where)
        return self._as_parts(rows, points)

    def list_parts(self) -> list[dict]:
        """Every part as a dict with the CSV's keys (plus ``fit_residual_mV``), sorted by part number."""
        with _bulk(), self._reading("read the parts") as connection:
            return self._load(connection)

    def list_parts_with_arrays(self, names: Iterable[str] | None = None) -> tuple[list[dict], dict]:
        """`list_parts` and the numeric fields as numpy arrays (`columns_as_arrays`), in one read."""
        from partpick.library.fields import columns_as_arrays

        with _bulk(), self._reading("read the parts") as connection:
            parts = self._load(connection)
            return parts, columns_as_arrays(parts, None if names is None else tuple(names))

    def get_part(self, part_number: str) -> dict | None:
        with self._reading(f"read part {part_number}") as connection:
            found = self._load(connection, _PART.c.part_number == part_number)
        return found[0] if found else None

    @staticmethod
    def _new_part(record: dict) -> Part:
        values = {name: record[name] for name in _ROW_COLUMNS}
        values["fit_residual_mV"] = record.get("fit_residual_mV")
        points = [VfPoint(seq=i, current_A=c, voltage_V=v) for i, (c, v) in enumerate(record["vf_points"])]
        return Part(**values, vf_points=points)

    def save_part(self, part: dict, *, replace: str | None = None) -> dict:
        """Validate and store one part; returns the stored record.

        Parameters
        ----------
        part : dict
            The part record.
        replace : str, optional
            The part number of the stored part this one replaces (an edit, maybe
            renaming it). Without it the part must be new.

        Raises
        ------
        InputError
            The part is invalid, its number is taken, or ``replace`` is not in the library.
        """
        record, problems = prepare_part(part)
        if problems:
            raise InputError(bounded_list([message for _, message in problems]))
        number = record["part_number"]
        with self._unit_of_work(f"save part {number}") as session:
            taken = session.scalar(select(Part).where(Part.part_number == number))
            if replace is not None:
                old = taken if replace == number else session.scalar(select(Part).where(Part.part_number == replace))
                if old is None:
                    raise InputError(f"part {replace} is not in the library (nothing to replace)")
                if taken is not None and taken is not old:
                    raise InputError(f"part_number {number} is already in the library (part numbers are unique)")
                session.delete(old)
                session.flush()
            elif taken is not None:
                raise InputError(f"part_number {number} is already in the library (part numbers are unique)")
            session.add(self._new_part(record))
        return record

    def delete_part(self, part_number: str) -> None:
        with self._unit_of_work(f"delete part {part_number}") as session:
            part = session.scalar(select(Part).where(Part.part_number == part_number))
            if part is None:
                raise InputError(f"part {part_number} is not in the library")
            session.delete(part)

    # -- CSV --------------------------------------------------------------------------
    def import_csv(
        self,
        source,
        *,
        dry_run: bool = False,
        replace: bool = False,
        progress: Callable[[int, int], None] | None = None,
        cancel: Callable[[], bool] | None = None,
    ) -> ImportSummary:
        """Import a parts CSV (SPEC §5) in one transaction: every row or none.

        A row for a stored part updates it: the columns the file carries replace
        the stored values (an empty cell clears one), the others are kept; the
        merged part is validated whole, and new vf_points without a new Is, n, Rs
        are fitted again. With ``replace`` a row replaces its stored part whole.

        Parameters
        ----------
        source : path or stream
        dry_run : bool
            Validate and classify only; write nothing (``summary.changes`` says
            per part which fields would change or be cleared).
        replace : bool
            Rows replace stored parts whole.
        progress : callable(done, total), optional
            Called as the import advances: ``done`` counts rows read, then rows
            checked (and fitted), then rows written; ``total`` is three times the rows.
        cancel : callable() -> bool, optional
            Polled with progress; True stops the import with nothing written
            (the summary says ``cancelled``).

        Raises
        ------
        CsvInputError (an InputError)
            Any bad row: its ``problems`` list every bad cell of every row (file
            line, column, reason) and nothing is written.
        """
        rows_seen = [0]

        def report(done: int, total: int, stage: int) -> None:
            # Stages 0 and 1 count rows; stage 2 (writing) counts changed parts, scaled to rows.
            if stage < 2:
                rows_seen[0] = total
            else:
                done = rows_seen[0] * done // max(total, 1)
            if progress is not None:
                rows = rows_seen[0]
                progress(stage * rows + done, 3 * rows)

        if not dry_run:
            self._refuse_read_only("import parts")
        try:
            with _bulk():
                return self._import(source, dry_run, replace, report, cancel)
        except ImportCancelled:
            return ImportSummary(source=str(getattr(source, "name", source)), dry_run=dry_run, cancelled=True)

    def _import(self, source, dry_run: bool, replace: bool, report, cancel) -> ImportSummary:
        rows, problems, name = csvio.read_parts_csv(
            source, progress=lambda done, total: report(done, total, 0), cancel=cancel
        )
        if dry_run:
            with self._reading("read the parts") as connection:
                return self._import_rows(connection, rows, problems, name, True, replace, report, cancel)
        # Stored parts are read, merged and written in one write transaction, so that a
        # concurrent edit cannot slip between the merge and the write.
        with self._unit_of_work(f"import {name}") as session:
            summary = self._import_rows(session.connection(), rows, problems, name, False, replace, report, cancel)
        report(1, 1, 2)
        return summary

    def _import_rows(self, connection, rows, problems, name, dry_run, replace, report, cancel) -> ImportSummary:
        stored = {part["part_number"]: part for part in self._load(connection)}
        fitting: set[str] = set()
        parts = [self._merged(row, stored, replace, fitting) for row in rows]
        records, problems = self._check_rows(rows, parts, problems, report, cancel)
        if problems:
            raise CsvInputError(name, sorted(problems, key=lambda p: (p.line or 0)))
        summary = ImportSummary(source=name, dry_run=dry_run)
        summary.fitted = [record["part_number"] for record in records if record["part_number"] in fitting]
        changed = self._classify(stored, records, summary)
        if not dry_run:
            self._write(connection, changed, summary, report, cancel)
        return summary

    @staticmethod
    def _merged(row, stored: dict, replace: bool, fitting: set) -> dict:
        """The part a CSV row stands for (SPEC §5): a new part, or a stored one updated by the row.

        The row's columns replace the stored values (an empty cell clears), absent
        columns keep theirs; with ``replace`` the row replaces the part whole. New
        vf_points without a new Is, n, Rs clear the old model so that it is fitted again.
        """
        part = row.part
        number = part.get("part_number")
        old = stored.get(number) if isinstance(number, str) else None
        if old is None or replace:
            merged = part
        else:
            merged = {name: old[name] for name in FIELD_NAMES}
            for name in row.columns:
                merged[name] = part[name]
            new_points = "vf_points" in row.columns and list(part["vf_points"]) != list(old["vf_points"])
            new_model = any(name in row.columns and part[name] != old[name] for name in MODEL_FIELDS)
            if new_points and not new_model and merged["vf_points"]:
                for name in MODEL_FIELDS:
                    merged[name] = None
                merged["model_source"] = None
            elif new_model and ("model_source" not in row.columns or part["model_source"] == old["model_source"]):
                # Decided again (an edited model is no longer the fit): entered, or fitted when it was cleared.
                merged["model_source"] = None
        if merged["vf_points"] and all(merged[name] is None for name in MODEL_FIELDS) and isinstance(number, str):
            fitting.add(number)
        return merged

    @staticmethod
    def _check_rows(rows, parts, problems, report, cancel):
        bad_fields: dict[int, set[str]] = {}
        for problem in problems:
            bad_fields.setdefault(problem.line, set()).add(problem.column or "")
        problems = list(problems)
        records = []
        first_line: dict[str, int] = {}
        total = len(rows)
        for index, (row, part) in enumerate(zip(rows, parts), start=1):
            record, found = prepare_part(part, skip_fields=bad_fields.get(row.line, ()))
            for column, message in found:
                problems.append(CsvProblem(row.line, column, message))
            number = record.get("part_number")
            if isinstance(number, str) and number:
                if number in first_line:
                    problems.append(
                        CsvProblem(row.line, "part_number",
                                   f"part_number {number} already appears on line {first_line[number]}")
                    )
                else:
                    first_line[number] = row.line
            records.append(record)
            if index % 500 == 0:
                report(index, total, 1)
                if cancel is not None and cancel():
                    raise ImportCancelled()
        report(total, total, 1)
        return records, problems

    @staticmethod
    def _classify(stored: dict, records: list[dict], summary: ImportSummary) -> list[dict]:
        changed = []
        for record in records:
            number = record["part_number"]
            old = stored.get(number)
            if old is None:
                summary.added.append(number)
                changed.append(record)
            elif _csv_view(old) == _csv_view(record):
                summary.unchanged.append(number)
            else:
                summary.updated.append(number)
                changed.append(record)
                summary.changes[number] = _differences(old, record)
        return changed

    @staticmethod
    def _write(connection, records: list[dict], summary: ImportSummary, report, cancel) -> None:
        total = len(records)
        updated = summary.updated
        for start in range(0, len(updated), 500):
            chunk = updated[start:start + 500]
            ids = select(_PART.c.id).where(_PART.c.part_number.in_(chunk)).scalar_subquery()
            connection.execute(delete(_POINT).where(_POINT.c.part_id.in_(ids)))
            connection.execute(delete(_PART).where(_PART.c.part_number.in_(chunk)))
        for start in range(0, total, _CHUNK):
            chunk = records[start:start + _CHUNK]
            values = []
            for record in chunk:
                row = {name: record[name] for name in _ROW_COLUMNS}
                row["fit_residual_mV"] = record.get("fit_residual_mV")
                values.append(row)
            _insert_many(connection, _PART, values)
            numbers = [record["part_number"] for record in chunk]
            ids = dict(connection.execute(
                select(_PART.c.part_number, _PART.c.id).where(_PART.c.part_number.in_(numbers))
            ).all())
            points = [
                {"part_id": ids[record["part_number"]], "seq": seq, "current_A": current, "voltage_V": voltage}
                for record in chunk
                for seq, (current, voltage) in enumerate(record["vf_points"])
            ]
            if points:
                _insert_many(connection, _POINT, points)
            report(min(start + _CHUNK, total), total, 2)
            if cancel is not None and cancel():
                raise ImportCancelled()  # rolls the transaction back

    def export_csv_text(self) -> str:
        """Every part as the CSV text of SPEC §5."""
        return csvio.parts_csv_text(self.list_parts())

    def export_csv(self, target) -> None:
        """Write every part as CSV (SPEC §5) to a path or a text stream.

        A path goes through `partpick.outputs` (refused when it is this library or
        another database; written atomically; links followed; FIFOs and devices
        written directly).

        Raises
        ------
        InputError
            The output is refused (exit 2).
        OutputError
            The write failed (exit 1); the old file is as it was.
        """
        from partpick.outputs import OutputTarget, prepare_output

        if isinstance(target, (str, os.PathLike)):
            target = prepare_output(target, library=self.path, option="export to")
        text = self.export_csv_text()
        if isinstance(target, OutputTarget):
            target.write(text.encode("utf-8"))
        else:
            target.write(text)

    # -- policies ---------------------------------------------------------------------
    def _policy_body(self, name, body) -> dict:
        """A stored policy's dict; LibraryError naming it when its stored body is damaged."""
        try:
            data = json.loads(body) if isinstance(body, (str, bytes)) else None
        except (ValueError, RecursionError) as error:
            reason = one_line(error)
            data = None
        else:
            reason = "not a JSON object"
        if not isinstance(data, dict):
            raise LibraryError(f"library {self.location} is damaged: stored policy {name!r}, field body: "
                               f"{reason}; import the policy again")
        return data

    def list_policies(self) -> list[dict]:
        with self._reading("read the policies") as connection:
            rows = connection.execute(select(_POLICY.c.name, _POLICY.c.body)).all()
        return [self._policy_body(name, body) for name, body in sorted(rows, key=lambda r: str(r[0]))]

    def get_policy(self, name: str) -> dict | None:
        with self._reading(f"read policy {name}") as connection:
            body = connection.execute(select(_POLICY.c.body).where(_POLICY.c.name == name)).scalar()
        return None if body is None else self._policy_body(name, body)

    def save_policy(self, policy: dict) -> None:
        """Store a derating policy (its dict, with a ``name``), replacing one of the same name."""
        name = policy.get("name") if isinstance(policy, dict) else None
        if not isinstance(name, str) or not name.strip() or len(name) > 64 or name != name.strip():
            raise InputError(f"policy name {name!r} is not valid (1 to 64 characters, no surrounding spaces)")
        for key, value, breaks in (("name", name, False), ("description", policy.get("description"), True)):
            if isinstance(value, str):
                reason = text_problem(value, line_breaks=breaks, printable_only=not breaks)
                if reason is not None:
                    raise InputError(f"policy {name!r}: {key} {reason} (not allowed in text)")
        try:
            body = json.dumps(policy, sort_keys=True, allow_nan=False, ensure_ascii=False)
        except (TypeError, ValueError) as error:
            raise InputError(f"policy {name}: cannot be stored ({error})") from error
        with self._unit_of_work(f"save policy {name}") as session:
            stored = session.scalar(select(Policy).where(Policy.name == name))
            if stored is None:
                session.add(Policy(name=name, body=body))
            else:
                stored.body = body

    def delete_policy(self, name: str) -> None:
        with self._unit_of_work(f"delete policy {name}") as session:
            stored = session.scalar(select(Policy).where(Policy.name == name))
            if stored is None:
                raise InputError(f"policy {name} is not in the library")
            session.delete(stored)

    # -- identity ---------------------------------------------------------------------
    def content_hash(self, parts: list[dict] | None = None) -> str:
        """SHA-256 of the stored parts and policies: equal content, equal hash.

        The parts are hashed as the exact ``repr`` of their values in column
        order (floats round-trip exactly), so no CSV is written. A caller that
        has just read the parts with `list_parts` may pass them to skip a
        second read.
        """
        with self._reading("read the library") as connection:
            if parts is None:
                parts = self._load(connection)
            policies = sorted(connection.execute(select(_POLICY.c.name, _POLICY.c.body)).all())
        digest = hashlib.sha256()
        names = FIELD_NAMES + ("fit_residual_mV",)
        digest.update(repr([[part.get(name) for name in names] for part in parts]).encode("utf-8"))
        for name, body in policies:
            digest.update(b"\x00" + name.encode("utf-8") + b"\x00" + body.encode("utf-8"))
        return digest.hexdigest()


def open_library(
    location: str | Path | None,
    *,
    create: bool = False,
    busy_timeout_s: float = DEFAULT_BUSY_TIMEOUT_S,
) -> Library:
    """Open (or with ``create``, create if missing) the library at a path or SQLAlchemy URL.

    ``None`` opens the user's own library in the platform's user-data folder,
    created on first run as a copy of the bundled example.

    Raises
    ------
    LibraryError
        Missing, unreadable, busy, not a partpick library, or written by a newer partpick.
    """
    if location is None:
        from partpick.library.location import ensure_user_library

        location = ensure_user_library()
    url = to_url(location)
    shown = url.render_as_string(hide_password=True) if "://" in str(location) else str(url.database)
    path = sqlite_path(url)
    read_only = path is not None and sqlite_read_only(path)
    try:
        engine = make_engine(url, busy_timeout_s=busy_timeout_s, read_only=read_only)
    except (exc.ArgumentError, exc.NoSuchModuleError, ImportError) as error:
        raise LibraryError(f"cannot open library {shown}: {one_line(error)}") from error
    try:
        with library_errors(shown, "open it"):
            note = prepare_database(url, shown, engine, create=create, read_only=read_only)
            if path is None:
                read_only = server_read_only(engine)
    except BaseException:
        engine.dispose()
        raise
    return Library(shown, engine, note, path=path, read_only=read_only)
