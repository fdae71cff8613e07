"""Only the command named is imported; every command is found by its own name."""

import pkgutil

import robtui.commands as commands_pkg
from robtui.cli import build_parser


def _commands(parser) -> list[str]:
    subparsers = next(a for a in parser._actions if a.dest == "command")
    return sorted(subparsers.choices)


def test_the_named_command_alone_is_registered() -> None:
    assert _commands(build_parser(["suggest", "x.pdf", "--json"])) == ["suggest"]
    assert _commands(build_parser(["evidence-map", "DIR"])) == ["evidence-map"]


def test_every_command_is_found_by_its_own_name() -> None:
    everything = _commands(build_parser())
    modules = [m.name for m in pkgutil.iter_modules(commands_pkg.__path__)
               if not m.name.startswith("_")]
    assert len(everything) == len(modules)
    for name in everything:
        assert _commands(build_parser([name, "--help"])) == [name]


def test_no_command_or_an_unknown_one_registers_them_all() -> None:
    everything = _commands(build_parser())
    assert _commands(build_parser(["--version"])) == everything
    assert _commands(build_parser(["nosuch"])) == everything
    assert _commands(build_parser(["evidence_map"])) == everything  # not a command's spelling
