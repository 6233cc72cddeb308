"""The `partpick` command: parse, call library/checks/report, print.

Each subcommand lives in its own module here and exposes
``register(subparsers)``, which adds its parser and sets ``func`` to a
function taking the parsed arguments and returning the exit code.

Exit codes (SPEC §5): 0 done and the subject passes, 3 done and the subject
fails, 2 bad input (one line on stderr), 1 anything else.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys

from partpick import __version__
from partpick.errors import InputError, LibraryError, OutputError

EXIT_PASS, EXIT_ERROR, EXIT_BAD_INPUT, EXIT_FAIL = 0, 1, 2, 3

# Subcommand modules, in the order `partpick --help` lists them.
COMMAND_MODULES = ("check", "fit", "library", "policy")


def add_library_option(parser: argparse.ArgumentParser) -> None:
    """The ``--library PATH|URL`` option every library-touching subcommand takes after its name."""
    # SUPPRESS: an absent option must not overwrite `partpick --library X <command> ...`.
    parser.add_argument("--library", metavar="PATH|URL", default=argparse.SUPPRESS,
                        help="the library (a file or an SQLAlchemy URL); default: your own library")


class _Parser(argparse.ArgumentParser):
    """argparse that reports bad usage as exit 2 with one line, like every other bad input."""

    def error(self, message: str) -> None:  # noqa: D401 - argparse API
        raise InputError(f"{self.prog}: {message}")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="partpick",
        description="Choose and size diodes and Zener diodes across every supply, load and ambient corner.",
    )
    parser.add_argument("--version", action="version", version=f"partpick {__version__}")
    parser.add_argument("--library", metavar="PATH|URL", help="library to open the desktop app on")
    subparsers = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name in COMMAND_MODULES:
        try:
            module = importlib.import_module(f"partpick.cli.{name}")
        except ModuleNotFoundError as exc:
            if exc.name != f"partpick.cli.{name}":
                raise
            continue
        module.register(subparsers)
    return parser


def _say(error: Exception) -> None:
    """One line on stderr; never a raw control character (a part number may carry one)."""
    from partpick.text import terminal_safe

    text = " ".join(str(error).split("\n")) if "\n" in str(error) else str(error)
    print(f"partpick: {terminal_safe(text, keep='')}", file=sys.stderr)


def _flush_stdout() -> None:
    """Flush what print() buffered: a full stdout is one line and exit 1, not a traceback at exit."""
    try:
        sys.stdout.flush()
    except BrokenPipeError:
        raise
    except OSError as error:
        _quiet_stdout()
        raise OutputError(f"cannot write standard output: {error.strerror or error}") from error


def _quiet_stdout() -> None:
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, sys.stdout.fileno())


def main(argv: list[str] | None = None) -> int:
    """Entry point of the `partpick` console script."""
    try:
        parser = build_parser()
        args = parser.parse_args(argv)
        if args.command is None:
            from partpick.cli import app

            return app.run(args)
        code = int(args.func(args))
        _flush_stdout()
        return code
    except InputError as exc:
        _say(exc)
        return EXIT_BAD_INPUT
    except (LibraryError, OutputError) as exc:
        _say(exc)
        return EXIT_ERROR
    except KeyboardInterrupt:
        print("partpick: interrupted", file=sys.stderr)
        return EXIT_ERROR
    except BrokenPipeError:
        # the reader (`| head`) went away: stop quietly, as other command-line tools do
        _quiet_stdout()
        return EXIT_ERROR


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
