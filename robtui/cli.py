"""Command-line entry point: argument parsing only; every command calls the library.

Command modules live in ``robtui.commands`` and are discovered, so adding a command means
adding a module there (see robtui/commands/__init__.py).
"""

from __future__ import annotations

import argparse
import importlib
import pkgutil
import sys
from collections.abc import Sequence

from robtui import __version__
from robtui.errors import RobtuiError
from robtui.terminal import SafeStream

EXIT_USAGE = 2
# Commands that hand the terminal to the workbench (Textual draws with control sequences).
_FULL_SCREEN = frozenset({"open", "demo"})


def build_parser(argv: Sequence[str] | None = None) -> argparse.ArgumentParser:
    """The command-line parser. Given the arguments, only the command they name is imported and
    registered (a command's module may import much that the others do not need); without them,
    or when they name no command, every command is, as ``robtui --help`` lists them."""
    parser = argparse.ArgumentParser(
        prog="robtui",
        description=(
            "Risk-of-bias assessment of randomised trials (RoB 2) in the terminal. "
            "Suggestions are candidates: the reviewers decide, following their own handbook."
        ),
    )
    parser.add_argument("--version", action="version", version=f"robtui {__version__}")
    subparsers = parser.add_subparsers(dest="command", metavar="COMMAND")
    import robtui.commands as commands_pkg

    names = sorted(info.name for info in pkgutil.iter_modules(commands_pkg.__path__)
                   if not info.name.startswith("_"))
    named = _command_module(argv, names)
    for name in [named] if named else names:
        importlib.import_module(f"robtui.commands.{name}").register(subparsers)
    return parser


def _command_module(argv: Sequence[str] | None, names: Sequence[str]) -> str | None:
    """The module of the command ``argv`` names ("evidence-map" is evidence_map), if any: the
    first argument not starting with "-" (robtui's own options take no values)."""
    first = next((a for a in argv or () if not a.startswith("-")), None)
    module = first.replace("-", "_") if first else None
    return module if module in names and "_" not in (first or "") else None


def main(argv: Sequence[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    parser = build_parser(argv)
    args = parser.parse_args(argv)
    if not getattr(args, "func", None):
        parser.print_help()
        return EXIT_USAGE
    if getattr(args, "command", None) in _FULL_SCREEN:
        return _run(args)
    # Every line a command prints may hold user text: control characters are removed.
    streams = sys.stdout, sys.stderr
    sys.stdout, sys.stderr = SafeStream(sys.stdout), SafeStream(sys.stderr)
    try:
        return _run(args)
    finally:
        sys.stdout, sys.stderr = streams


def _run(args: argparse.Namespace) -> int:
    try:
        return int(args.func(args) or 0)
    except RobtuiError as error:
        print(f"robtui: {error}", file=sys.stderr)
        return EXIT_USAGE
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return 0
    except OSError as error:
        # A folder of the review turned into a file, a full disk, no permission: the user's
        # environment, not a robtui bug, so one line instead of a traceback.
        where = error.filename or "a file of the review"
        print(
            f"robtui: {where}: {error.strerror or error}: check that the path exists, that "
            "folders of the review are folders, and that you may write there",
            file=sys.stderr,
        )
        return EXIT_USAGE


if __name__ == "__main__":
    sys.exit(main())
