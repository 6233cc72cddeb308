"""`partpick check REQ.toml`: check every candidate of a library against a requirement.

Exit codes (SPEC §5), judged on the command's subject — the whole candidate
list (before ``--top``; it passes when one candidate passes), the part given
with ``--part``, or the substitutes with ``--substitutes-for``:
0 the subject passes, 3 it fails, 2 bad input, 1 anything else.
"""

from __future__ import annotations

import argparse
import json

from partpick.checks.policy import load_policies  # noqa: F401 (kept importable from here)
from partpick.cli import add_library_option
from partpick.errors import InputError
from partpick.outputs import write_stdout

EXIT_PASS, EXIT_FAIL = 0, 3
FORMATS = ("table", "json", "csv", "html", "pdf")


def _positive_int(name: str):
    def parse(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{name}: {text!r} is not a whole number") from None
        if value < 1:
            raise argparse.ArgumentTypeError(f"{name}: {value} must be at least 1")
        return value

    return parse


def _count(name: str):
    def parse(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{name}: {text!r} is not a whole number") from None
        if value < 0:
            raise argparse.ArgumentTypeError(f"{name}: {value} must not be negative")
        return value

    return parse


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "check", help="check a library's parts against a requirement, rank them, write the shortlist or a report")
    parser.add_argument("requirement", metavar="REQ.toml", help="the requirement file (TOML)")
    add_library_option(parser)
    parser.add_argument("--format", choices=FORMATS, default="table", help="output format (default: table)")
    parser.add_argument("--output", metavar="F", help="file to write (default: standard output)")
    parser.add_argument("--top", type=_positive_int("--top"), metavar="N", help="list only the first N candidates")
    parser.add_argument("--part", metavar="P", help="check this part only (its check sheet)")
    parser.add_argument("--substitutes-for", metavar="P", dest="substitutes_for",
                        help="list the parts that pass in place of P, with what changes")
    parser.add_argument("--yield", type=_positive_int("--yield"), metavar="N", dest="yield_runs",
                        help="Monte Carlo yield over N builds per listed candidate (zener_shunt)")
    parser.add_argument("--seed", type=int, default=0, help=argparse.SUPPRESS)
    parser.add_argument("--reviewer", metavar="NAME", help="reviewer named in html/pdf reports")
    parser.add_argument("--limits-for", type=_count("--limits-for"), metavar="N", dest="limits_for",
                        help="operating limits and what sets the worst case for the first N candidates listed "
                             "(default 20; 0: none)")
    parser.set_defaults(func=run)


def run(args) -> int:
    from partpick.checks.requirement import load_requirement
    from partpick.checks.service import run_check

    from partpick.library.db import library_file
    from partpick.outputs import prepare_output, refuse_binary_terminal
    from partpick.text import normalise_text, text_problem

    binary = args.format == "pdf"
    location = getattr(args, "library", None)
    # Every refusal of the output comes before anything runs (SPEC §5).
    if args.output is not None:
        target = prepare_output(args.output, inputs=[args.requirement], library=library_file(location), binary=binary)
    else:
        target = None
        if binary:
            refuse_binary_terminal()
    if args.reviewer is not None:
        args.reviewer = normalise_text(args.reviewer)
        reason = text_problem(args.reviewer, printable_only=True)
        if reason is not None:
            raise InputError(f"--reviewer {reason}")
    requirement = load_requirement(args.requirement)
    if args.part is not None and args.substitutes_for is not None:
        raise InputError("partpick check: --part and --substitutes-for cannot be combined")
    from partpick.library.store import open_library

    with open_library(location) as library:
        if library.note:  # e.g. migrated from an older schema, and where the backup is
            import sys

            from partpick.text import terminal_safe

            print(f"partpick: {terminal_safe(library.note, keep='')}", file=sys.stderr)
        parts = library.list_parts()
        policies = load_policies(library)
        info = {"location": library.location, "content_hash": library.content_hash(parts)}
    result = run_check(requirement, parts, policies=policies, library=info, top=args.top, part=args.part,
                       substitutes_for=args.substitutes_for, yield_runs=args.yield_runs, seed=args.seed,
                       reviewer=args.reviewer,
                       **({} if args.limits_for is None else {"analyse": args.limits_for}))
    parts_by_number = {p["part_number"]: p for p in parts}
    data = _render(result, args.format, parts_by_number, requirement, args)
    if target is not None:
        target.write(data)
    else:
        write_stdout(data, binary=binary)
    return EXIT_PASS if result["subject_passed"] else EXIT_FAIL


def _render(result: dict, fmt: str, parts_by_number: dict, requirement, args) -> bytes:
    try:
        from partpick.report import render
    except ImportError:  # the report layer is not installed: json and a plain table still work
        render = None
    if render is not None:
        return render(result, fmt, parts_by_number=parts_by_number, requirement=requirement,
                      reviewer=args.reviewer, part=args.part)
    if fmt == "json":
        return (json.dumps(result, indent=2, allow_nan=False, ensure_ascii=False) + "\n").encode("utf-8")
    if fmt == "table":
        return _plain_table(result).encode("utf-8")
    raise InputError(f"--format {fmt}: this installation has no report layer (use json or table)")


def _plain_table(result: dict) -> str:
    lines = [f"{'rank':>4}  {'part':<20} {'kind':<14} {'passed':<6}  first failing check"]
    for c in result["candidates"]:
        first = c["failed_checks"][0] if c["failed_checks"] else ""
        lines.append(f"{c['rank']:>4}  {c['part_number']:<20} {c['kind']:<14} {'yes' if c['passed'] else 'no':<6}  "
                     f"{first}")
    return "\n".join(lines) + "\n"
