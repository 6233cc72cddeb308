"""`partpick policy list | show NAME | import F.toml | export NAME [--output F]`: derating policies.

The three built-ins (``ratings_only``, ``commercial``, ``high_reliability``)
are always available and cannot be replaced; a library stores its own. Load
your own organisation's derating policy with ``policy import``: the built-in
``high_reliability`` is only in line with a cancelled public standard as
transcribed.
"""

from __future__ import annotations

from pathlib import Path

from partpick.cli import add_library_option
from partpick.errors import InputError
from partpick.outputs import write_stdout
from partpick.text import terminal_safe


def register(subparsers) -> None:
    parser = subparsers.add_parser("policy", help="list, show, import and export derating policies")
    commands = parser.add_subparsers(dest="policy_command", metavar="ACTION")
    parser.set_defaults(func=_no_action)
    listing = commands.add_parser("list", help="list the built-in and the library's policies")
    add_library_option(listing)
    listing.set_defaults(func=_list)
    show = commands.add_parser("show", help="print one policy as TOML")
    show.add_argument("name", metavar="NAME")
    add_library_option(show)
    show.set_defaults(func=_show)
    importing = commands.add_parser("import", help="store a policy from a TOML file in the library")
    importing.add_argument("file", metavar="F.toml")
    add_library_option(importing)
    importing.set_defaults(func=_import)
    export = commands.add_parser("export", help="write one policy as TOML")
    export.add_argument("name", metavar="NAME")
    export.add_argument("--output", metavar="F", help="file to write (default: standard output)")
    add_library_option(export)
    export.set_defaults(func=_export)


def _no_action(args) -> int:
    raise InputError("partpick policy: choose an action: list, show, import or export")


def _open(args):
    import sys

    from partpick.library.store import open_library

    library = open_library(getattr(args, "library", None))
    if library.note:  # e.g. migrated from an older schema, and where the backup is
        print(f"partpick: {terminal_safe(library.note, keep='')}", file=sys.stderr)
    return library


def _all_policies(library) -> dict:
    from partpick.checks.policy import BUILTIN_POLICIES
    from partpick.checks.policy import load_policies

    return {**load_policies(library), **BUILTIN_POLICIES}


def _find(args):
    import difflib

    with _open(args) as library:
        policies = _all_policies(library)
    if args.name not in policies:
        close = difflib.get_close_matches(args.name, list(policies), n=1)
        hint = f" (did you mean '{close[0]}'?)" if close else ""
        raise InputError(f"policy {args.name!r} is neither built in nor in the library{hint}")
    return policies[args.name]


def _list(args) -> int:
    with _open(args) as library:
        policies = _all_policies(library)
    width = max(len(n) for n in policies)
    lines = []
    for name in sorted(policies, key=lambda n: (not policies[n].builtin, n)):
        policy = policies[name]
        where = "built-in" if policy.builtin else "library"
        lines.append(terminal_safe(f"{name:<{width}}  {where:<8}  {policy.description}", keep=""))
    write_stdout("\n".join(lines) + "\n")
    return 0


def _show(args) -> int:
    from partpick.checks.policy import policy_to_toml

    write_stdout(policy_to_toml(_find(args)))
    return 0


def _import(args) -> int:
    from partpick.checks.policy import BUILTIN_POLICIES, policy_from_toml

    from partpick.inputs import read_input_bytes

    path = Path(args.file)
    try:
        text = read_input_bytes(path, "policy file").decode("utf-8")
    except UnicodeDecodeError as exc:
        raise InputError(f"{path}: cannot read the policy file (not UTF-8 text: {exc.reason})") from exc
    policy = policy_from_toml(text, str(path))
    if policy.name in BUILTIN_POLICIES:
        raise InputError(f"{path}: name {policy.name!r} is a built-in policy; give yours its own name")
    with _open(args) as library:
        library.save_policy(policy.to_dict())
        write_stdout(f"stored policy {policy.name} in {library.location}\n")
    return 0


def _export(args) -> int:
    from partpick.checks.policy import policy_to_toml
    from partpick.library.db import library_file
    from partpick.outputs import prepare_output

    location = getattr(args, "library", None)
    target = prepare_output(args.output, library=library_file(location)) if args.output is not None else None
    text = policy_to_toml(_find(args))
    if target is None:
        write_stdout(text)
    else:
        target.write(text.encode("utf-8"))
    return 0
