"""robtui read FILE [--json]: print the sentence map of a report (sections, pages, offsets)."""

from __future__ import annotations

import argparse
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "read",
        help="read a report (PDF, text, Markdown, HTML) and print its sentence map",
        description="Read a trial report and print each sentence with its section, page and "
        "character offsets, so quotes and suggestions can be traced back to the source.",
    )
    parser.add_argument("file", type=Path, help="the report file")
    parser.add_argument("--json", action="store_true", help="print the whole document as JSON")
    parser.add_argument(
        "--no-cache", action="store_true", help="parse again instead of using the cache"
    )
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.reading.reader import read_document

    document = read_document(args.file, use_cache=not args.no_cache)
    if args.json:
        print(document.model_dump_json(indent=2))
        return 0
    pages = f", {document.pages} pages" if document.pages else ""
    print(f"{document.path} ({document.kind}{pages}, {len(document.sentences)} sentences)")
    print(f"sha256 {document.sha256}")
    for warning in document.warnings:
        print(f"warning: {warning}")
    section = None
    for s in document.sentences:
        if s.section != section:
            section = s.section
            print(f"\n[{section}]")
        where = f"p{s.page} " if s.page is not None else ""
        tag = "" if s.block == "body" else f" <{s.block}>"
        print(f"  {s.index:4d} {where}{s.start}-{s.end}{tag}  {s.text}")
    return 0
