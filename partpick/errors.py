"""Error types shared by every layer.

`InputError` is bad input from the user (a field, a CSV cell, a TOML key, a
command-line argument); the CLI turns it into one line on stderr and exit 2.
`LibraryError` is a library that cannot be used (busy, unreadable, newer
schema, not a partpick library, read-only); the CLI exits 1 with its message.
`OutputError` is an output that could not be written (disk full, permission,
a reader that went away, a full stdout); the CLI exits 1 with its one line.
"""


class InputError(ValueError):
    """Bad user input; the message names the file, line or field and the value."""


class LibraryError(RuntimeError):
    """A library that cannot be opened, read or written right now."""


class OutputError(RuntimeError):
    """An output file (or standard output) could not be written; the message names it."""
