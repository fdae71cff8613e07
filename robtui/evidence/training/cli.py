"""Options of the ranker's training command (kept free of heavy imports for `robtui --help`)."""

from __future__ import annotations

import argparse
from pathlib import Path


def add_arguments(parser: argparse.ArgumentParser) -> argparse.ArgumentParser:
    parser.add_argument("--corpus", type=Path, default=None,
                        help="corpus folder holding consort-tm/ (default ../shared/corpus)")
    parser.add_argument("--out", type=Path, default=None,
                        help="weights file to write (default: the shipped robtui/evidence/weights)")
    parser.add_argument("--folds", type=int, default=5, help="grouped CV folds (default 5)")
    parser.add_argument("--articles", type=int, default=None,
                        help="use only the first N articles, in id order (quick checks)")
    return parser
