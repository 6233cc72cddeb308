"""Every file a command writes goes through here (SPEC §5, "Outputs and files").

Rules, in the order they apply:

1. **Refused before anything runs** (`prepare_output`, `InputError`, exit 2):
   an output that is the open library (or one of its ``-wal``/``-shm``/``-journal``
   side files), any SQLite database, one of the command's own input files, a
   folder, or a file in a folder that does not exist; binary data (pdf) to a
   terminal.
2. **Symbolic links are followed**: the link stays, its target is written.
3. **Regular files (and new ones) are replaced atomically**: the data goes to a
   temporary file beside the resolved target (unnamed until it is whole, where
   Linux allows, so a SIGKILL leaves no stray file), is flushed and fsync'ed, gets
   the mode (and, as root, the owner) of the file it replaces, and is renamed
   over it. An interrupted or failed write leaves the old file as it was and
   no partial file.
4. **Anything else (FIFO, device, terminal) is written directly**, opened
   without creating or truncating it — never replaced.
5. **A failed write** (disk full, permission, a reader that went away) raises
   `OutputError` (exit 1) with one line naming the file.

`write_stdout` is the same for standard output: a full stdout is
`OutputError`; binary data to a terminal is refused; text to a terminal
never carries a raw control character (`partpick.text.terminal_safe`).

Nothing else in partpick opens an output path by itself.
"""

from __future__ import annotations

import contextlib
import errno
import os
import stat
import sys
import tempfile
from collections.abc import Iterable
from dataclasses import dataclass
from pathlib import Path

from partpick.errors import InputError, OutputError
from partpick.text import terminal_safe

__all__ = ["OutputTarget", "prepare_output", "write_output", "write_stdout", "refuse_binary_terminal",
           "SQLITE_MAGIC"]

SQLITE_MAGIC = b"SQLite format 3\x00"
_SIDE_FILES = ("-wal", "-shm", "-journal")


def _identity(path: Path) -> tuple[int, int] | None:
    try:
        info = os.stat(path)
    except OSError:
        return None
    return (info.st_dev, info.st_ino)


def _is_sqlite(path: Path) -> bool:
    try:
        with open(path, "rb") as handle:
            return handle.read(len(SQLITE_MAGIC)) == SQLITE_MAGIC
    except OSError:
        return False


def _is_terminal(path: Path) -> bool:
    try:
        descriptor = os.open(path, os.O_WRONLY | os.O_NOCTTY | os.O_NONBLOCK)
    except OSError:
        return False
    try:
        return os.isatty(descriptor)
    finally:
        os.close(descriptor)


@dataclass(frozen=True)
class OutputTarget:
    """A checked output: ``named`` as the user gave it, ``resolved`` with links followed."""

    named: str
    resolved: Path
    regular: bool  # a regular file or a new one (replaced atomically); else written directly

    def write(self, data: bytes | str) -> None:
        """Write ``data`` (str is UTF-8 encoded) by the rules of the module docstring.

        Raises
        ------
        OutputError
            The write failed; the previous file (if any) is as it was.
        """
        if isinstance(data, str):
            data = data.encode("utf-8")
        if self.regular:
            self._replace(data)
        else:
            self._direct(data)

    def _fail(self, error: OSError) -> OutputError:
        return OutputError(f"cannot write {self.named}: {error.strerror or error}")

    def _direct(self, data: bytes) -> None:
        try:
            descriptor = os.open(self.resolved, os.O_WRONLY | os.O_NOCTTY)
        except OSError as error:
            raise self._fail(error) from error
        try:
            view = memoryview(data)
            while view:
                written = os.write(descriptor, view)
                view = view[written:]
        except OSError as error:
            raise self._fail(error) from error
        finally:
            os.close(descriptor)

    def _replace(self, data: bytes) -> None:
        target = self.resolved
        try:
            old = os.stat(target)
        except FileNotFoundError:
            old = None
        except OSError as error:
            raise self._fail(error) from error
        temporary = None
        try:
            try:
                temporary = self._whole_temporary(data, old, unnamed=True)
            except OSError as error:
                if error.errno in (errno.ENOSPC, errno.EDQUOT, errno.EIO, errno.EROFS):
                    raise
                temporary = self._whole_temporary(data, old, unnamed=False)  # no unnamed files here
            os.replace(temporary, target)
            temporary = None
            with contextlib.suppress(OSError):  # make the rename itself durable
                directory = os.open(target.parent, os.O_RDONLY)
                try:
                    os.fsync(directory)
                finally:
                    os.close(directory)
        except OSError as error:
            raise self._fail(error) from error
        finally:
            if temporary is not None:
                with contextlib.suppress(OSError):
                    os.unlink(temporary)

    def _whole_temporary(self, data: bytes, old, *, unnamed: bool) -> str:
        """The data in a complete, fsync'ed temporary file beside the target; returns its name."""
        target = self.resolved
        descriptor, temporary = _open_temporary(target, unnamed=unnamed)
        try:
            with os.fdopen(descriptor, "wb") as stream:
                stream.write(data)
                stream.flush()
                os.fsync(stream.fileno())
                if old is not None:
                    os.fchmod(stream.fileno(), stat.S_IMODE(old.st_mode))
                    if hasattr(os, "geteuid") and os.geteuid() == 0:
                        with contextlib.suppress(OSError):
                            os.fchown(stream.fileno(), old.st_uid, old.st_gid)
                else:
                    umask = os.umask(0)
                    os.umask(umask)
                    os.fchmod(stream.fileno(), 0o666 & ~umask)
                if temporary is None:  # an unnamed file: give it a name only now that it is whole
                    temporary = _link_unnamed(stream.fileno(), target)
        except BaseException:
            if temporary is not None:
                with contextlib.suppress(OSError):
                    os.unlink(temporary)
            raise
        return temporary


def _open_temporary(target: Path, *, unnamed: bool = True) -> tuple[int, str | None]:
    """A file to write in the target's folder: unnamed where the system allows (Linux ``O_TMPFILE``,
    so a killed process leaves nothing behind), else a named temporary file (mkstemp)."""
    flag = getattr(os, "O_TMPFILE", 0)
    if unnamed and flag and os.path.isdir("/proc/self/fd"):
        try:
            return os.open(target.parent, flag | os.O_WRONLY, 0o600), None
        except OSError:
            pass  # a filesystem without unnamed files
    descriptor, name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".partpick-tmp", dir=target.parent)
    return descriptor, name


def _link_unnamed(descriptor: int, target: Path) -> str:
    """Link a whole unnamed file into the target's folder under a fresh temporary name.

    ``linkat(AT_FDCWD, "/proc/self/fd/N", ..., AT_SYMLINK_FOLLOW)`` as the
    ``open(2)`` manual describes for ``O_TMPFILE`` (os.link does not pass the flag).
    """
    import ctypes
    import ctypes.util

    libc = ctypes.CDLL(ctypes.util.find_library("c") or None, use_errno=True)
    at_fdcwd, at_symlink_follow = -100, 0x400
    source = f"/proc/self/fd/{descriptor}".encode()
    for attempt in range(100):
        name = str(target.parent / f".{target.name}.{os.getpid()}.{attempt}.partpick-tmp")
        if libc.linkat(at_fdcwd, source, at_fdcwd, os.fsencode(name), at_symlink_follow) == 0:
            return name
        code = ctypes.get_errno()
        if code != errno.EEXIST:
            raise OSError(code, os.strerror(code), name)
    raise FileExistsError(f"no free temporary name beside {target}")


def prepare_output(
    path: str | os.PathLike,
    *,
    inputs: Iterable[str | os.PathLike | None] = (),
    library: str | os.PathLike | None = None,
    binary: bool = False,
    option: str = "--output",
) -> OutputTarget:
    """Check an output path before anything runs; returns the target to `write` later.

    Parameters
    ----------
    path : the output as the user named it.
    inputs : the command's input files (None entries are ignored).
    library : the open library's file (None for a server library).
    binary : the data is binary (pdf): a terminal is refused.
    option : how the output is named in messages.

    Raises
    ------
    InputError
        The output is refused (see the module docstring).
    """
    named = os.fspath(path)
    if named == "":
        raise InputError(f"{option}: the file name is empty")
    resolved = Path(os.path.realpath(Path(named).expanduser()))
    where = f"{option} {named}"
    if resolved.is_dir():
        raise InputError(f"{where} is a folder; give a file name")
    if not resolved.parent.is_dir():
        raise InputError(f"{where}: folder {resolved.parent} does not exist")
    identity = _identity(resolved)
    if library is not None:
        library_path = Path(os.path.realpath(library))
        same = identity is not None and identity == _identity(library_path)
        side = any(str(resolved) == str(library_path) + suffix for suffix in _SIDE_FILES)
        if same or resolved == library_path or side:
            raise InputError(f"{where} is the open library; choose another file (nothing was written)")
    for source in inputs:
        if source is None:
            continue
        source_path = Path(os.path.realpath(os.fspath(source)))
        if resolved == source_path or (identity is not None and identity == _identity(source_path)):
            raise InputError(f"{where} is one of this command's inputs ({os.fspath(source)}); choose another file")
    try:
        info = os.stat(resolved)
    except FileNotFoundError:
        return OutputTarget(named, resolved, True)
    except OSError as error:
        raise InputError(f"{where}: cannot use it ({error.strerror or error})") from error
    if stat.S_ISREG(info.st_mode):
        if _is_sqlite(resolved):
            raise InputError(f"{where} is an SQLite database (a library?); it is never replaced by an output")
        for suffix in _SIDE_FILES:
            if resolved.name.endswith(suffix) and _is_sqlite(resolved.with_name(resolved.name[: -len(suffix)])):
                raise InputError(f"{where} belongs to an SQLite database; it is never replaced by an output")
        return OutputTarget(named, resolved, True)
    if binary and stat.S_ISCHR(info.st_mode) and _is_terminal(resolved):
        raise InputError(f"{where} is a terminal; binary output (pdf) needs a file")
    return OutputTarget(named, resolved, False)


def write_output(path, data: bytes | str, **options) -> None:
    """`prepare_output` then write (for callers with nothing to run in between)."""
    prepare_output(path, **options).write(data)


def refuse_binary_terminal(stream=None, *, what: str = "pdf") -> None:
    """InputError when binary output would go to a terminal (stdout by default)."""
    stream = sys.stdout if stream is None else stream
    try:
        terminal = stream.isatty()
    except (AttributeError, ValueError):
        terminal = False
    if terminal:
        raise InputError(f"{what} output is binary and standard output is a terminal: give --output FILE")


def write_stdout(data: bytes | str, *, binary: bool = False) -> None:
    """Write to standard output: text to a terminal made safe, a full stdout an `OutputError`.

    A reader that went away (``| head``) raises BrokenPipeError, which the CLI
    ends quietly, as other command-line tools do.
    """
    stream = sys.stdout
    if binary:
        refuse_binary_terminal(stream)
    try:
        terminal = stream.isatty()
    except (AttributeError, ValueError):
        terminal = False
    try:
        if isinstance(data, bytes) and not binary and terminal:
            data = data.decode("utf-8", errors="replace")
        if isinstance(data, str):
            if terminal:
                data = terminal_safe(data)
            stream.write(data)
        else:
            stream.flush()
            getattr(stream, "buffer", stream).write(data)
        stream.flush()
    except BrokenPipeError:
        raise
    except OSError as error:
        raise OutputError(f"cannot write standard output: {error.strerror or error}") from error
