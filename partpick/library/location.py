"""Where the user's own library lives, and its first-run copy of the bundled example."""

from __future__ import annotations

import os
import shutil
import tempfile
from importlib import resources
from pathlib import Path

import platformdirs

from partpick.errors import LibraryError

__all__ = ["APP_NAME", "LIBRARY_FILE_NAME", "user_library_path", "bundled_example_path", "ensure_user_library"]

APP_NAME = "partpick"
LIBRARY_FILE_NAME = "library.sqlite"


def user_library_path() -> Path:
    """The user's own library in the platform's user-data folder (platformdirs decides where)."""
    return platformdirs.user_data_path(APP_NAME, appauthor=False) / LIBRARY_FILE_NAME


def bundled_example_path() -> Path:
    """The example library shipped inside the installed package."""
    path = Path(str(resources.files("partpick") / "data" / "library.sqlite.example"))
    if not path.is_file():
        raise LibraryError(f"the bundled example library is missing from the installation ({path})")
    return path


def ensure_user_library() -> Path:
    """The user's library, created on first run as a copy of the bundled example.

    The copy is written beside its final name and then renamed, so a crash
    never leaves a half-copied library behind.
    """
    target = user_library_path()
    if target.exists():
        return target
    example = bundled_example_path()
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        handle, temporary = tempfile.mkstemp(prefix=".library-", suffix=".tmp", dir=target.parent)
        os.close(handle)
        try:
            shutil.copyfile(example, temporary)
            if target.exists():  # another partpick got there first; keep theirs
                return target
            os.replace(temporary, target)
        finally:
            if os.path.exists(temporary):
                os.unlink(temporary)
    except OSError as error:
        raise LibraryError(f"cannot create your library at {target}: {error.strerror or error}") from error
    return target
