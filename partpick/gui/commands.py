"""The user's actions: one registry of commands, each with its menu entry and shortcut.

A command is a plain function of the `Workbench` (the window's Qt-free state).
Where it needs the user (a file name, the part editor, a confirmation) it asks
``workbench.prompt``, which the window implements with dialogs and tests with
a scripted stand-in — so every command runs, and is tested, without a window.
The window builds its menus and shortcuts from `COMMANDS`; nothing else
defines an action.

Part edits go through the undo stack (`partpick.gui.undo`); opening another
library or importing a CSV clears it (those are not undoable: the stack would
otherwise undo into a library it no longer matches).
"""

from __future__ import annotations

import time
import weakref
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable, Protocol

from partpick.errors import InputError, LibraryError, OutputError
from partpick.gui.models import LibraryModel, RequirementModel, ResultModel
from partpick.gui.observer import Signal

__all__ = ["Command", "COMMANDS", "command", "Prompt", "Workbench", "CheckJob", "MENUS", "run_command",
           "recover_from_failed_start", "OPEN_ANOTHER", "OPEN_EXAMPLE", "QUIT"]

MENUS = ("File", "Library", "Part", "Edit", "Shortlist", "Help")


class Prompt(Protocol):
    """What commands may ask of the user (the window answers with dialogs)."""

    def open_path(self, title: str, filter: str) -> str | None: ...
    def save_path(self, title: str, filter: str, suggested: str = "") -> str | None: ...
    def edit_part(self, part: dict | None, title: str) -> dict | None: ...
    def confirm(self, title: str, text: str) -> bool: ...
    def choose(self, title: str, text: str, choices: list[str]) -> str | None: ...
    def show_cautions(self, first_run: bool = False) -> None: ...
    def show_check_sheet(self, result: dict, part_number: str) -> None: ...
    def show_error(self, title: str, text: str) -> None: ...
    def show_info(self, title: str, text: str) -> None: ...
    def show_problems(self, title: str, summary: str, problems: list[str]) -> None: ...
    def run_with_progress(self, title: str, work: Callable) -> object: ...
    def show_compare(self, part_numbers: list[str]) -> None: ...
    def show_substitutes(self, part_number: str) -> None: ...
    def show_help(self) -> None: ...
    def show_about(self) -> None: ...
    def export_curves(self, path: str) -> None: ...
    def quit(self) -> None: ...


@dataclass(frozen=True)
class Command:
    """A user action: ``id``, its menu entry (``menu``, ``title``), shortcuts and the function."""

    id: str
    title: str
    menu: str
    shortcuts: tuple[str, ...]
    run: Callable[["Workbench"], object]
    tip: str = ""
    needs_part: bool = False  # enabled only when a library part is selected
    edits_library: bool = False  # disabled when the library is read-only


COMMANDS: dict[str, Command] = {}


def run_command(bench: "Workbench", command_id: str):
    """Run a command as the menus do: whatever goes wrong becomes a dialog, never a traceback.

    Commands report the errors they expect themselves; anything that escapes one (a bug, an
    unforeseen OS error) is shown with the command's name, and the window stays usable.
    """
    command_ = COMMANDS[command_id]
    try:
        return command_.run(bench)
    except Exception as exc:  # noqa: BLE001 — the one place every command's error is caught (SPEC §6)
        title = command_.title.replace("&", "").rstrip("…")
        text = str(exc) or type(exc).__name__
        if not isinstance(exc, (InputError, LibraryError, OSError)):
            text = f"{title} failed: {text} ({type(exc).__name__})"
        if bench.prompt is not None:
            bench.prompt.show_error(title, text)
        return None


def command(id: str, title: str, menu: str, *shortcuts: str, tip: str = "", needs_part: bool = False,
            edits_library: bool = False):
    """Register the decorated function as a command (once; a second id is a bug)."""

    def register(function):
        if id in COMMANDS:
            raise RuntimeError(f"command {id!r} registered twice")
        run = function
        if edits_library:
            def run(bench, _function=function, _title=title.replace("&", "").rstrip("…")):
                if bench.read_only:
                    bench.prompt.show_error(_title, "The library is read-only: it can be read and checked, "
                                                    "not changed. Open a writable copy to edit it.")
                    return None
                return _function(bench)
        COMMANDS[id] = Command(id, title, menu, tuple(shortcuts), run, tip, needs_part, edits_library)
        return function

    return register


@dataclass
class CheckJob:
    """One run of the checker over the whole library, as ``partpick check`` does it.

    Built on the UI thread from immutable snapshots, run anywhere (`run` touches
    no model), so a job in a worker thread cannot see a half-made edit.
    """

    requirement: object
    parts: list
    policies: dict
    library: dict
    generation: int = 0
    options: dict = field(default_factory=dict)
    arrays: object = None  # `parts` as a PartArrays (LibraryModel.part_arrays), passed to run_check if given

    def run(self) -> tuple[dict, float]:
        from partpick.checks.service import run_check

        from partpick.checks.service import why_no_candidates

        start = time.perf_counter()
        parts = self.parts if self.arrays is None else self.arrays
        result = run_check(self.requirement, parts, policies=self.policies, library=self.library, **self.options)
        elapsed = (time.perf_counter() - start) * 1e3
        if not result["candidates"] and not self.options.get("substitutes_for"):
            # The window says why in the shortlist's place (SPEC §6); not part of the CLI's JSON.
            result["empty_reason"] = why_no_candidates(self.requirement, parts)
        return result, elapsed


def _release_undo_stack(stack) -> None:
    """Empty a finished workbench's undo stack while its commands are still whole (see Workbench)."""
    try:
        stack.clear()
    except RuntimeError:  # its C++ object is already gone (a parent deleted it)
        pass


class Workbench:
    """The window's state without the window: the three models, the undo stack, the prompt.

    Signals
    -------
    recent_changed()
        The list of recent libraries changed (the window persists it).
    """

    MAX_RECENT = 8

    def __init__(self, library=None, *, prompt: Prompt | None = None, undo_stack=None) -> None:
        from PySide6.QtGui import QUndoStack  # a QObject, no window or event loop needed

        self.requirement = RequirementModel()
        self.library = LibraryModel()
        self.result = ResultModel()
        self.undo_stack = undo_stack if undo_stack is not None else QUndoStack()
        # The stack and its commands are destroyed in a known order, never by the cyclic collector:
        # the finalizer holds the stack (so it is never part of a collected cycle) and, once the
        # workbench is gone, empties it first and then lets it go. Left to the collector, the
        # stack's destructor ran after it had already freed the commands' wrappers and crashed.
        weakref.finalize(self, _release_undo_stack, self.undo_stack)
        self.prompt = prompt
        self.recent_libraries: list[str] = []
        self.recent_requirements: list[str] = []
        self.recent_changed = Signal()
        self.selection_changed = Signal()
        self.selected_parts: list[str] = []  # the library table's selection (set with select_parts)
        self.library.library_changed.connect(self._library_opened)
        self.requirement.loaded.connect(self.result.forget_selection)
        self.requirement.edited.connect(self._requirement_edited)
        # (field key, stack index after its step): typing on in that field extends the step. Only the
        # index is kept: the stack owns its commands, and a Python reference to one of them puts it in
        # the same collectable cycle as the stack, whose destructor then deletes it a second time.
        self._last_requirement_edit: tuple[str, int] | None = None
        self.library.parts_changed.connect(lambda: self.select_parts(self.selected_parts))
        self.library.parts_changed.connect(self._update_list_choices)
        if library is not None:
            self.library.set_library(library)

    # -- library ------------------------------------------------------------
    def _library_opened(self) -> None:
        self.undo_stack.clear()
        self.result.forget_selection()
        if self.result.result is not None:
            self.result.clear()  # its parts are the other library's: nothing shown until the recheck
        self.requirement.set_policy_names(self.library.policy_names())
        location = self.library.location
        if location:
            self.add_recent(location)

    def _update_list_choices(self) -> None:
        """The requirement's list filters pick from what this library holds (SPEC §6)."""
        from partpick.library.fields import KINDS

        parts = self.library.parts
        held = {key: {p.get(key) for p in parts} - {None, ""} for key in ("kind", "package", "lifecycle")}
        self.requirement.set_list_choices({
            "kinds": [k for k in KINDS if k in held["kind"]],
            "packages": sorted(held["package"], key=str.casefold),
            "lifecycle": [v for v in ("active", "nrnd", "obsolete") if v in held["lifecycle"]]
                         + sorted(held["lifecycle"] - {"active", "nrnd", "obsolete"}),
        })

    def _requirement_edited(self, key: str, old: str, new: str) -> None:
        from partpick.gui.undo import EditRequirementField

        stack = self.undo_stack
        last = self._last_requirement_edit
        if last is not None and last[0] == key and stack.index() == stack.count() == last[1]:
            stack.command(last[1] - 1).extend(new)  # typing on in the same field: one step
            return
        stack.push(EditRequirementField(self.requirement, key, old, new))
        self._last_requirement_edit = (key, stack.index())

    def replace_requirement(self, text: str, change: Callable[[], None]) -> None:
        """Replace the whole requirement (new, open) as one undoable step."""
        from partpick.gui.undo import ReplaceRequirement

        before = self.requirement.snapshot()
        change()
        self.undo_stack.push(ReplaceRequirement(self.requirement, text, before, self.requirement.snapshot()))

    def select_parts(self, part_numbers) -> None:
        """The library parts the part commands act on (the library table shows the same)."""
        part_numbers = [p for p in part_numbers if self.library.get_part(p) is not None]
        if part_numbers != self.selected_parts:
            self.selected_parts = part_numbers
            self.selection_changed.emit()

    def add_recent(self, location: str, *, kind: str = "libraries") -> None:
        """Put a library (or, with ``kind="requirements"``, a requirement file) first in its recent list."""
        name = f"recent_{kind}"
        current = getattr(self, name)
        recent = ([location] + [r for r in current if r != location])[: self.MAX_RECENT]
        if recent != current:
            setattr(self, name, recent)
            self.recent_changed.emit()

    @property
    def read_only(self) -> bool:
        """True when the open library can only be read (a read-only file, folder or server role)."""
        library = self.library.library
        return bool(library is not None and getattr(library, "read_only", False))

    @property
    def library_path(self):
        """The open library's file (None for none or a server library); outputs must never be it."""
        library = self.library.library
        return getattr(library, "path", None) if library is not None else None

    def output_target(self, path, *, binary: bool = False):
        """`partpick.outputs.prepare_output` for a window command: never the library or the requirement file."""
        from partpick.outputs import prepare_output

        return prepare_output(path, library=self.library_path, inputs=[self.requirement.path], binary=binary,
                              option="output")

    def has_library(self, title: str) -> bool:
        """True when a library is open; otherwise tell the user and return False."""
        if self.library.library is None:
            self.prompt.show_error(title, "No library is open: open or create one first (Library menu).")
            return False
        return True

    def open_library_at(self, location: str | Path | None, *, create: bool = False) -> None:
        """Open (or create) a library and make it the window's (LibraryError if it cannot)."""
        from partpick.library.store import open_library

        library = open_library(location, create=create)
        self.library.set_library(library)
        note = getattr(library, "note", None)
        if note and note.startswith("migrated") and self.prompt is not None:
            self.prompt.show_info("Library migrated", note)  # says where the backup of the old file is

    # -- checking -----------------------------------------------------------
    def check_job(self, generation: int = 0, **options) -> CheckJob:
        """A check of the current requirement over the whole library (InputError if the form has errors)."""
        requirement = self.requirement.build_requirement()
        return CheckJob(requirement, list(self.library.parts), self.library.policies(),
                        self.library.library_info(), generation, options, self.library.part_arrays())

    def selected_candidate(self) -> str | None:
        return self.result.selected[0] if self.result.selected else None

    def close(self) -> None:
        self.undo_stack.clear()
        self.library.close()


OPEN_ANOTHER, OPEN_EXAMPLE, QUIT = "Open another library…", "Open the example library", "Quit"


def example_library_copy() -> Path:
    """A copy of the bundled example library in the user-data folder (made once; never the user's own
    library file, which may be the one that failed)."""
    import shutil

    from partpick.library.location import bundled_example_path, user_library_path

    target = user_library_path().with_name("example-library.sqlite")
    if not target.exists():
        target.parent.mkdir(parents=True, exist_ok=True)
        tmp = target.with_name(target.name + ".tmp")
        shutil.copyfile(bundled_example_path(), tmp)
        tmp.replace(target)
    return target


def recover_from_failed_start(bench: Workbench, error: Exception, location=None) -> bool:
    """The library given at start could not be opened: say why, offer another one or the example.

    Returns True once a library is open, False when the user chose to quit.
    """
    message = str(error)
    while True:
        answer = bench.prompt.choose(
            "partpick: library not opened",
            f"The library {location or ''} could not be opened:\n\n{message}\n\n"
            "Open another library, or the example library (a copy, your file is left as it is)?".replace("  ", " "),
            [OPEN_ANOTHER, OPEN_EXAMPLE, QUIT])
        try:
            if answer == OPEN_ANOTHER:
                path = bench.prompt.open_path("Open library", _LIBRARY)
                if not path:
                    continue
                bench.open_library_at(path)
            elif answer == OPEN_EXAMPLE:
                bench.open_library_at(example_library_copy())
            else:
                return False
        except (LibraryError, InputError, OSError) as exc:
            message = str(exc)
            continue
        return True


# ---------------------------------------------------------------------------
# File: requirements
_TOML = "Requirement (*.toml);;All files (*)"
_CSV = "Parts CSV (*.csv);;All files (*)"
_LIBRARY = "Library (*.sqlite *.db);;All files (*)"


@command("requirement.new", "&New requirement", "File", "Ctrl+N", tip="Start a new requirement (policy: commercial)")
def new_requirement(bench: Workbench) -> None:
    if not _may_replace_requirement(bench, "New requirement"):
        return
    bench.replace_requirement("New requirement", bench.requirement.reset)


def _may_replace_requirement(bench: Workbench, title: str) -> bool:
    """An edited, unsaved requirement is kept unless the user says otherwise (it stays undoable too)."""
    if not bench.requirement.modified:
        return True
    return bench.prompt.confirm(title, "The requirement has unsaved changes. Replace it anyway? "
                                       "(Edit ▸ Undo brings it back.)")


def unsaved_requirement_answer(bench: Workbench) -> bool:
    """Before quitting: True when the window may close (saved, discarded, or nothing unsaved)."""
    if not bench.requirement.modified:
        return True
    name = bench.requirement.value("name") or "the requirement"
    answer = bench.prompt.choose("Quit", f"“{name}” has unsaved changes. Save them before quitting?",
                                 ["Save", "Discard", "Cancel"])
    if answer == "Discard":
        return True
    if answer == "Save":
        save_requirement(bench)
        return not bench.requirement.modified
    return False


def load_requirement_file(bench: Workbench, path: str | Path) -> None:
    """Read a requirement TOML into the form (the checker's reader judges it first)."""
    from partpick.checks.requirement import load_requirement
    from partpick.inputs import parse_toml, read_input_bytes

    load_requirement(path)  # InputError naming file, line and key (a bounded reader)
    data = parse_toml(read_input_bytes(path, "requirement file").decode("utf-8"), str(path))

    def load() -> None:
        bench.requirement.load_dict(data, source=str(path))
        bench.requirement.path = str(path)

    bench.replace_requirement(f"Open {Path(path).name}", load)
    bench.add_recent(str(Path(path).resolve()), kind="requirements")


@command("requirement.open", "&Open requirement…", "File", "Ctrl+O", tip="Open a requirement TOML file")
def open_requirement(bench: Workbench) -> None:
    if not _may_replace_requirement(bench, "Open requirement"):
        return
    path = bench.prompt.open_path("Open requirement", _TOML)
    if not path:
        return
    try:
        load_requirement_file(bench, path)
    except (InputError, OSError) as exc:
        bench.prompt.show_error("Open requirement", str(exc))


def save_requirement_file(bench: Workbench, path: str | Path) -> None:
    from partpick.checks.requirement import requirement_to_toml

    from partpick.outputs import prepare_output

    # Never onto the library (or any database); the requirement's own file is its output here.
    target = prepare_output(path, library=bench.library_path, option="save to")
    text = requirement_to_toml(bench.requirement.build_requirement())
    target.write(text.encode("utf-8"))  # whole file or nothing
    bench.requirement.path = str(path)
    bench.requirement.modified = False
    bench.add_recent(str(Path(path).resolve()), kind="requirements")


@command("requirement.save", "&Save requirement", "File", "Ctrl+S", tip="Save the requirement as TOML")
def save_requirement(bench: Workbench) -> None:
    path = bench.requirement.path or bench.prompt.save_path("Save requirement", _TOML, "requirement.toml")
    if path:
        _save_requirement_reporting(bench, path)


@command("requirement.save_as", "Save requirement &as…", "File", "Ctrl+Shift+S")
def save_requirement_as(bench: Workbench) -> None:
    path = bench.prompt.save_path("Save requirement as", _TOML, bench.requirement.path or "requirement.toml")
    if path:
        _save_requirement_reporting(bench, path)


def _save_requirement_reporting(bench: Workbench, path) -> None:
    try:
        save_requirement_file(bench, path)
    except (InputError, OutputError, OSError) as exc:
        bench.prompt.show_error("Save requirement", f"Not saved: {exc}")


# ---------------------------------------------------------------------------
# File: report
def export_report_file(bench: Workbench, path: str | Path, fmt: str | None = None) -> None:
    """Write the review report (HTML or PDF): the shortlist, and the check sheet and curves of the
    selected shortlist part (the top part when none is selected), as ``partpick check --part`` does."""
    from partpick.report import render

    fmt = fmt or Path(path).suffix.lstrip(".").lower()
    if fmt not in ("html", "pdf"):
        raise InputError(f"report: {Path(path).name!r}: give a .html or .pdf file name")
    target = bench.output_target(path, binary=fmt == "pdf")  # refused before anything runs
    job = bench.check_job()
    result, _ = job.run()
    parts_by_number = {p["part_number"]: p for p in job.parts}
    data = render(result, fmt, parts_by_number=parts_by_number, requirement=job.requirement,
                  part=bench.selected_candidate())
    target.write(data)


@command("report.export", "&Export report…", "File", "Ctrl+E",
         tip="Export the review report of the selected shortlist part (HTML or PDF)")
def export_report(bench: Workbench) -> None:
    if not bench.has_library("Export report"):
        return
    part = bench.selected_candidate() or "shortlist"
    path = bench.prompt.save_path("Export report", "HTML report (*.html);;PDF report (*.pdf)", f"{part}.html")
    if not path:
        return
    try:
        export_report_file(bench, path)
    except (InputError, OutputError, OSError, LibraryError) as exc:
        bench.prompt.show_error("Export report", f"No report written: {exc}")


@command("curves.export", "Save curves &image…", "File", "Ctrl+Shift+I",
         tip="Save the visible curves as PNG or SVG")
def export_curves(bench: Workbench) -> None:
    path = bench.prompt.save_path("Save curves image", "PNG image (*.png);;SVG image (*.svg)", "curves.png")
    if not path:
        return
    try:
        bench.output_target(path)  # refused first when it is the library, a database or the requirement file
        bench.prompt.export_curves(path)  # the image is written through partpick.outputs (plots.export)
    except (InputError, OSError, RuntimeError) as exc:
        bench.prompt.show_error("Save curves image", f"No image written: {exc}")


@command("app.quit", "&Quit", "File", "Ctrl+Q")
def quit_app(bench: Workbench) -> None:
    bench.prompt.quit()


# ---------------------------------------------------------------------------
# Library
@command("library.new", "&New library…", "Library", "Ctrl+Shift+N", tip="Create an empty library file")
def new_library(bench: Workbench) -> None:
    path = bench.prompt.save_path("New library", _LIBRARY, "parts.sqlite")
    if not path:
        return
    try:
        bench.open_library_at(path, create=True)
    except (LibraryError, InputError) as exc:
        bench.prompt.show_error("New library", str(exc))


@command("library.open", "&Open library…", "Library", "Ctrl+L", tip="Open a library file")
def open_library(bench: Workbench) -> None:
    path = bench.prompt.open_path("Open library", _LIBRARY)
    if not path:
        return
    try:
        bench.open_library_at(path)
    except (LibraryError, InputError) as exc:
        bench.prompt.show_error("Open library", str(exc))


def import_csv_file(bench: Workbench, path: str | Path) -> object | None:
    """Import a parts CSV into the library: every row or none.

    The file is read through once as a dry run, so that a bad file changes
    nothing and every bad row is listed; then it is imported under the
    progress dialog, which may cancel (the store then writes nothing).
    Returns the store's summary, or None when refused or cancelled.
    """
    if not bench.has_library("Import CSV"):
        return None
    if bench.read_only:  # e.g. a CSV dropped onto a window showing a read-only library
        bench.prompt.show_error("Import CSV", f"{Path(path).name}: nothing imported: the library is read-only.")
        return None
    library = bench.library.library

    def work(progress, cancel):
        # One progress dialog from the first row (SPEC §6: progress within 0.2 s): the dry run that
        # judges every row is the first half, the import the second.
        checked = library.import_csv(path, dry_run=True, progress=lambda d, t: progress(d, 2 * t), cancel=cancel)
        if getattr(checked, "cancelled", False):
            return checked
        return library.import_csv(path, progress=lambda d, t: progress(t + d, 2 * t), cancel=cancel)

    try:
        summary = bench.prompt.run_with_progress(f"Importing {Path(path).name}", work)
    except InputError as exc:
        bench.prompt.show_problems("Import CSV", f"{Path(path).name}: nothing imported.", _problem_lines(exc))
        summary = None
    except (LibraryError, OSError) as exc:
        bench.prompt.show_error("Import CSV", f"{Path(path).name}: nothing imported: {exc}")
        summary = None
    bench.library.reload()
    if summary is not None and not getattr(summary, "cancelled", False):
        bench.undo_stack.clear()
    return summary


def _problem_lines(exc: InputError) -> list[str]:
    """Every bad row of a refused CSV, one line each (the store's CsvInputError lists them)."""
    from partpick.inputs import MAX_PROBLEMS_LISTED

    problems = getattr(exc, "problems", None)
    if problems:
        source = getattr(exc, "source", "")
        lines = [p.text(source) if hasattr(p, "text") else str(p) for p in problems[:MAX_PROBLEMS_LISTED]]
        if len(problems) > MAX_PROBLEMS_LISTED:
            lines.append(f"and {len(problems) - MAX_PROBLEMS_LISTED} more")
        return lines
    return [str(exc)]


@command("library.import", "&Import CSV…", "Library", "Ctrl+I", tip="Import parts from a CSV file", edits_library=True)
def import_csv(bench: Workbench) -> None:
    if not bench.has_library("Import CSV"):
        return
    path = bench.prompt.open_path("Import CSV", _CSV)
    if path:
        import_csv_file(bench, path)


@command("library.export", "E&xport CSV…", "Library", "Ctrl+Shift+E", tip="Export every part to a CSV file")
def export_csv(bench: Workbench) -> None:
    if not bench.has_library("Export CSV"):
        return
    path = bench.prompt.save_path("Export CSV", _CSV, "parts.csv")
    if not path:
        return
    try:
        target = bench.output_target(path)
        bench.library.library.export_csv(target)
    except (LibraryError, InputError, OutputError, OSError) as exc:
        bench.prompt.show_error("Export CSV", str(exc))


# ---------------------------------------------------------------------------
# Part (library table selection)
@command("part.add", "&Add part…", "Part", "Ins", tip="Enter a new part", edits_library=True)
def add_part(bench: Workbench) -> None:
    from partpick.gui.undo import SavePart

    if not bench.has_library("Add part"):
        return
    part = bench.prompt.edit_part(None, "Add part")
    if part is not None:
        _push(bench, SavePart(bench.library, part, None))


@command("part.edit", "&Edit part…", "Part", "F2", needs_part=True, edits_library=True)
def edit_part(bench: Workbench) -> None:
    from partpick.gui.undo import SavePart

    if not bench.selected_parts:
        return
    old = bench.library.get_part(bench.selected_parts[0])
    part = bench.prompt.edit_part(old, f"Edit {old['part_number']}")
    if part is not None and part != old:
        _push(bench, SavePart(bench.library, part, old["part_number"]))


@command("part.duplicate", "&Duplicate part", "Part", "Ctrl+D", needs_part=True, edits_library=True)
def duplicate_part(bench: Workbench) -> None:
    from partpick.gui.undo import SavePart

    if not bench.selected_parts:
        return
    old = bench.library.get_part(bench.selected_parts[0])
    copy = dict(old, part_number=bench.library.free_part_number(old["part_number"]))
    if _push(bench, SavePart(bench.library, copy, None, text=f"Duplicate {old['part_number']}")):
        bench.select_parts([copy["part_number"]])


@command("part.delete", "De&lete part", "Part", "Del", needs_part=True, edits_library=True)
def delete_part(bench: Workbench) -> None:
    from partpick.gui.undo import DeleteParts

    if bench.selected_parts:
        _push(bench, DeleteParts(bench.library, list(bench.selected_parts)))


def _push(bench: Workbench, step) -> bool:
    """Do an undoable step; say so and return False when the store refused it."""
    from partpick.gui.undo import take_error

    take_error()
    bench.undo_stack.push(step)
    error = take_error()
    if error:
        bench.prompt.show_error(step.text(), error)
    return not error


# ---------------------------------------------------------------------------
# Edit
@command("edit.undo", "&Undo", "Edit", "Ctrl+Z")
def undo(bench: Workbench) -> None:
    _undoing(bench, bench.undo_stack.undo)


@command("edit.redo", "&Redo", "Edit", "Ctrl+Y", "Ctrl+Shift+Z")
def redo(bench: Workbench) -> None:
    _undoing(bench, bench.undo_stack.redo)


def _undoing(bench: Workbench, step) -> None:
    from partpick.gui.undo import take_error

    step()
    error = take_error()
    if error:
        bench.prompt.show_error("Undo", error)


# ---------------------------------------------------------------------------
# Shortlist
@command("shortlist.compare", "&Compare selected", "Shortlist", "Ctrl+Shift+C",
         tip="What changes if B replaces A: two to four shortlist parts side by side")
def compare(bench: Workbench) -> None:
    chosen = bench.result.selected[:4]
    if len(chosen) < 2:
        bench.prompt.show_info("Compare", "Select two to four parts in the shortlist (Ctrl+click).")
        return
    bench.prompt.show_compare(chosen)


@command("shortlist.substitutes", "Find &substitutes", "Shortlist", "Ctrl+Shift+F",
         tip="Parts that pass the same requirement in place of the selected one")
def substitutes(bench: Workbench) -> None:
    part = bench.selected_candidate()
    if part is None:
        bench.prompt.show_info("Substitutes", "Select a part in the shortlist first.")
        return
    bench.prompt.show_substitutes(part)


@command("shortlist.check_sheet", "Show check &sheet", "Shortlist", "Ctrl+K",
         tip="Every check of the selected shortlist part: value, limit, margin, worst corner")
def check_sheet(bench: Workbench) -> None:
    part = bench.selected_candidate()
    if part is None or bench.result.result is None:
        bench.prompt.show_info("Check sheet", "Select a part in the shortlist first.")
        return
    bench.prompt.show_check_sheet(bench.result.result, part)


# ---------------------------------------------------------------------------
# Help
@command("help.formulas", "&Formulas, sources and cautions", "Help", "F1")
def help_formulas(bench: Workbench) -> None:
    bench.prompt.show_help()


@command("help.cautions", "&Cautions", "Help", tip="What the numbers rest on, and what they do not replace")
def help_cautions(bench: Workbench) -> None:
    bench.prompt.show_cautions()


@command("help.about", "&About partpick", "Help")
def help_about(bench: Workbench) -> None:
    bench.prompt.show_about()
