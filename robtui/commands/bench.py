"""robtui bench NAME [options]: run a benchmark module of robtui.benchmarks and print figures."""

from __future__ import annotations

import argparse
import importlib
import pkgutil

from robtui.errors import InputError


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "bench",
        help="run a benchmark and print its figures",
        description="Benchmarks print figures; run `robtui bench NAME --help` for a benchmark's options.",
    )
    parser.add_argument("name", help="benchmark name (reading, evidence, real-pdfs, workbench, review, ...)")
    parser.add_argument("options", nargs=argparse.REMAINDER, help="options for the benchmark")
    parser.set_defaults(func=run)


def available() -> list[str]:
    import robtui.benchmarks as pkg

    return sorted(
        m.name.replace("_", "-") for m in pkgutil.iter_modules(pkg.__path__)
        if not m.name.startswith("_")
    )


def run(args: argparse.Namespace) -> int:
    names = available()
    if args.name not in names:
        raise InputError(f"no benchmark named {args.name!r}; choose one of: {', '.join(names)}")
    module = importlib.import_module(f"robtui.benchmarks.{args.name.replace('-', '_')}")
    return int(module.main(list(args.options)) or 0)
