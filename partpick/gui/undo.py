"""Undoable part edits (QUndoStack commands over the library model).

Each command stores the whole part record(s) it replaces, so undo writes them
back exactly, each step in one store transaction. A step the store refuses
(the library changed under it, a duplicate part number) marks itself obsolete,
which drops it from the stack, and leaves its message for `take_error`.
"""

from __future__ import annotations

from PySide6.QtGui import QUndoCommand

from partpick.errors import InputError, LibraryError

__all__ = ["SavePart", "DeleteParts", "take_error", "EditRequirementField", "ReplaceRequirement"]

_last_error: list[str] = []


def take_error() -> str:
    """The message of the last refused step (once), or ""."""
    return _last_error.pop() if _last_error else ""


def _record(exc: Exception) -> None:
    _last_error.clear()
    _last_error.append(str(exc))


def _clean(part: dict) -> dict:
    return {k: v for k, v in part.items() if k != "fit_residual_mV"}


class SavePart(QUndoCommand):
    """Add a part, or replace part ``replace`` (possibly renamed) by ``part``."""

    def __init__(self, library_model, part: dict, replace: str | None, *, text: str | None = None) -> None:
        number = part["part_number"]
        if text is None:
            text = f"Edit {replace}" if replace else f"Add {number}"
        super().__init__(text)
        self._model = library_model
        self._new = _clean(part)
        self._replace = replace
        old = library_model.get_part(replace) if replace else None
        self._old = _clean(old) if old else None

    def redo(self) -> None:
        try:
            self._model.save_part(self._new, replace=self._replace)
        except (InputError, LibraryError) as exc:
            _record(exc)
            self.setObsolete(True)

    def undo(self) -> None:
        try:
            if self._old is None:
                self._model.delete_part(self._new["part_number"])
            else:
                self._model.save_part(self._old, replace=self._new["part_number"])
        except (InputError, LibraryError) as exc:
            _record(exc)
            self.setObsolete(True)


class DeleteParts(QUndoCommand):
    """Delete parts; undo puts each record back whole."""

    def __init__(self, library_model, part_numbers: list[str]) -> None:
        label = part_numbers[0] if len(part_numbers) == 1 else f"{len(part_numbers)} parts"
        super().__init__(f"Delete {label}")
        self._model = library_model
        self._parts = [_clean(library_model.get_part(n)) for n in part_numbers if library_model.get_part(n)]

    def redo(self) -> None:
        try:
            for part in self._parts:
                self._model.library.delete_part(part["part_number"])
        except (InputError, LibraryError) as exc:
            _record(exc)
            self.setObsolete(True)
        self._model.reload()

    def undo(self) -> None:
        try:
            for part in self._parts:
                self._model.library.save_part(part)
        except (InputError, LibraryError) as exc:
            _record(exc)
            self.setObsolete(True)
        self._model.reload()


class EditRequirementField(QUndoCommand):
    """One field of the requirement form changed (typing on in one field extends the same step)."""

    def __init__(self, model, key: str, old: str, new: str) -> None:
        from partpick.gui.models import FIELDS_BY_KEY

        super().__init__(f"Edit {FIELDS_BY_KEY[key].label}")
        self._model = model
        self.key = key
        self._old = old
        self._new = new
        self._done = True  # pushed after the edit happened: the first redo has nothing to do

    def extend(self, new: str) -> None:
        """More typing in the same field: the step now ends at ``new``.

        (Not QUndoCommand.mergeWith: Qt deletes the merged command inside ``push`` while Python still
        owns its wrapper, which PySide6 then frees a second time.)
        """
        self._new = new

    def redo(self) -> None:
        if self._done:
            self._done = False
            return
        self._model.set_text(self.key, self._new)
        self._model.modified = True

    def undo(self) -> None:
        self._model.set_text(self.key, self._old)
        self._model.modified = True


class ReplaceRequirement(QUndoCommand):
    """The whole requirement replaced (new requirement, opened file); undo puts the previous one back."""

    def __init__(self, model, text: str, before: dict, after: dict) -> None:
        super().__init__(text)
        self._model = model
        self._before = before
        self._after = after
        self._done = True

    def redo(self) -> None:
        if self._done:
            self._done = False
            return
        self._model.restore(self._after)

    def undo(self) -> None:
        self._model.restore(self._before)
