"""robtui evidence-map DIR: studies x signalling questions, where the prepared reports hold
strong evidence and where the ranker found none."""

from __future__ import annotations

import argparse
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "evidence-map",
        help="studies x signalling questions: where strong evidence was found and where none",
        description=(
            "Show, for every study and signalling question, how strong the best suggested "
            "sentence of the study's prepared files is: strong, some, none (the ranker found "
            "nothing: read the report) or not prepared (run `robtui prepare DIR`). A lead sees "
            "before assessing which trials report poorly. The map answers no question."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR", help="review folder")
    parser.add_argument("--effect", default=None,
                        help="domain 2 variant: an effect the review's question sets offer "
                             "(default: the first result's)")
    parser.add_argument("--export", choices=("csv", "md"), action="append", default=[],
                        help="also write the table to DIR/exports/ (repeat for several)")
    parser.add_argument("--out", default=None, metavar="NAME",
                        help="export file name without extension (default evidence-map-EFFECT)")
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace
    from robtui.export.safety import export_path
    from robtui.files import write_text_atomic
    from robtui.workspace.evidence_map import EXPORT_FORMATS, evidence_map, render_text
    from robtui.workspace.preparing import review_effects

    workspace = open_workspace(args.folder)
    folder = workspace.folder
    effect = args.effect or review_effects(folder)[0]
    workspace.sets.check_effect(effect, [s.id for s in folder.review.studies])
    emap = evidence_map(folder, effect, workspace.qset, workspace.sets)
    print(render_text(emap))
    if emap.prepared_fraction < 1.0:
        print(f"\n{1 - emap.prepared_fraction:.0%} of the cells are not prepared yet: run "
              f"`robtui prepare {args.folder}`")
    for fmt in args.export:
        name = f"{args.out or 'evidence-map-' + effect}.{fmt}"
        path = export_path(folder.exports_dir, name, folder.root)
        write_text_atomic(path, EXPORT_FORMATS[fmt](emap))
        print(f"wrote {path}")
    return 0
