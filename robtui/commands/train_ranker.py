"""robtui train-ranker: retrain the evidence ranker's shipped weights from the corpus."""

from __future__ import annotations

import argparse


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "train-ranker",
        help="retrain the evidence ranker from the development corpus (developers)",
        description=(
            "Train the evidence ranker from the annotated corpus (default ../shared/corpus) "
            "with settings chosen by cross-validation grouped by article; writes the weights "
            "and their provenance. Same as `python -m robtui.evidence.training.train`."
        ),
    )
    from robtui.evidence.training.cli import add_arguments

    add_arguments(parser)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.evidence.training.train import run_from_args

    return run_from_args(args)
