"""Bounded readers for the files a user gives partpick (SPEC §5, "Outputs and files").

- An input must be a regular file: a FIFO, a device (``/dev/zero``) or a
  folder is bad input, refused before a byte is read.
- A CSV or TOML file over `MAX_INPUT_BYTES` (256 MiB) is bad input.
- A TOML document nested deeper than `MAX_TOML_DEPTH` (32) tables and arrays
  is bad input.
- Bad-input messages are bounded: `bounded_list` keeps the first
  `MAX_PROBLEMS_LISTED` (50) problems and says "and N more".

Each refusal is one `InputError` line naming the file.
"""

from __future__ import annotations

import os
import stat
from collections.abc import Sequence

from partpick.errors import InputError

__all__ = ["MAX_INPUT_BYTES", "MAX_TOML_DEPTH", "MAX_PROBLEMS_LISTED", "read_input_bytes", "read_stream_bytes",
           "parse_toml", "bounded_list"]

MAX_INPUT_BYTES = 256 * 1024 * 1024
MAX_TOML_DEPTH = 32
MAX_PROBLEMS_LISTED = 50


def _size_text(limit: int) -> str:
    return f"{limit // (1024 * 1024)} MiB"


def read_input_bytes(path, what: str = "file", *, limit: int = MAX_INPUT_BYTES) -> bytes:
    """The bytes of an input file, refused (InputError) unless it is a regular file within ``limit``."""
    name = os.fspath(path)
    try:
        descriptor = os.open(name, os.O_RDONLY | os.O_NONBLOCK | getattr(os, "O_NOCTTY", 0))
    except OSError as error:
        raise InputError(f"{name}: cannot read the {what} ({error.strerror or error})") from error
    try:
        info = os.fstat(descriptor)
        if stat.S_ISDIR(info.st_mode):
            raise InputError(f"{what} {name} is a folder, not a file")
        if not stat.S_ISREG(info.st_mode):
            raise InputError(f"{what} {name} is not a regular file (a device, pipe or socket); give a file")
        if info.st_size > limit:
            raise InputError(f"{what} {name} is larger than {_size_text(limit)} ({info.st_size} bytes); "
                             "split it or check that it is the right file")
        chunks = []
        total = 0
        while True:
            chunk = os.read(descriptor, 1 << 20)
            if not chunk:
                break
            total += len(chunk)
            if total > limit:  # it grew while being read
                raise InputError(f"{what} {name} is larger than {_size_text(limit)}")
            chunks.append(chunk)
        return b"".join(chunks)
    except OSError as error:
        raise InputError(f"{name}: cannot read the {what} ({error.strerror or error})") from error
    finally:
        os.close(descriptor)


def read_stream_bytes(stream, name: str, what: str = "file", *, limit: int = MAX_INPUT_BYTES):
    """At most ``limit`` bytes (or characters) of an open stream; InputError when it holds more."""
    data = stream.read(limit + 1)
    if len(data) > limit:
        raise InputError(f"{what} {name} is larger than {_size_text(limit)}")
    return data


def _depth(document: dict) -> int:
    """How deep tables and arrays nest below the document (a top-level table or array is 1)."""
    deepest = 0
    stack = [(child, 1) for child in document.values()]
    while stack:
        item, depth = stack.pop()
        if isinstance(item, dict):
            children = item.values()
        elif isinstance(item, list):
            children = item
        else:
            continue
        if depth > deepest:
            deepest = depth
            if deepest > MAX_TOML_DEPTH:
                return deepest
        stack.extend((child, depth + 1) for child in children)
    return deepest


def parse_toml(text: str, source: str) -> dict:
    """Parse TOML text with the depth bound; tomllib's own errors pass through unchanged.

    Raises
    ------
    InputError
        Nested deeper than `MAX_TOML_DEPTH`.
    tomllib.TOMLDecodeError
        Not TOML (the caller words it with line and column).
    """
    import tomllib

    try:
        data = tomllib.loads(text)
    except RecursionError:
        raise InputError(f"{source}: nested deeper than {MAX_TOML_DEPTH} levels of tables and arrays") from None
    if _depth(data) > MAX_TOML_DEPTH:
        raise InputError(f"{source}: nested deeper than {MAX_TOML_DEPTH} levels of tables and arrays")
    return data


def bounded_list(items: Sequence[str], separator: str = "; ", limit: int = MAX_PROBLEMS_LISTED) -> str:
    """The first ``limit`` items joined, then "and N more" when there are more."""
    shown = separator.join(items[:limit])
    extra = len(items) - limit
    return f"{shown}{separator}and {extra} more" if extra > 0 else shown
