"""A cold `robtui suggest` loads the reader and the ranker, nothing of the front ends or of
training: each module it imports is start-up time every cold run pays (and, where Python writes
no bytecode, compiling time too)."""

from __future__ import annotations

import json
import os
import subprocess
import sys

from robtui.paths import bundled_dir

REPORT = bundled_dir("sample_reports") / "alder-migraine.pdf"  # invented trial report

# Packages `robtui suggest` never needs: the workbench, training and figure libraries, the
# second PDF library, the review store, exports, benchmarks and developer tools.
NOT_ON_THE_SUGGEST_PATH = (
    "textual", "rich", "sklearn", "scipy", "matplotlib", "pdfplumber", "pdfminer",
    "robtui.tui", "robtui.evidence.training", "robtui.export", "robtui.store.review_folder",
    "robtui.benchmarks", "robtui.devtools",
)

_PROBE = """
import contextlib, io, json, sys
from robtui.cli import main
with contextlib.redirect_stdout(io.StringIO()) as out:
    code = main(["suggest", sys.argv[1], "--json"])
print(json.dumps({"code": code, "questions": len(json.loads(out.getvalue())["questions"]),
                  "modules": sorted(sys.modules)}))
"""


def test_cold_suggest_imports_neither_front_ends_nor_training(tmp_path):
    env = dict(os.environ, ROBTUI_CACHE_DIR=str(tmp_path))  # empty cache: the PDF is read
    run = subprocess.run([sys.executable, "-c", _PROBE, str(REPORT)], capture_output=True,
                         text=True, check=False, timeout=300, env=env)
    assert run.returncode == 0, run.stderr
    seen = json.loads(run.stdout.splitlines()[-1])
    assert seen["code"] == 0 and seen["questions"] > 0
    modules = set(seen["modules"])
    assert {"robtui.reading.pdf", "robtui.evidence.ranker"} <= modules  # the path was taken
    loaded = [p for p in NOT_ON_THE_SUGGEST_PATH
              if any(m == p or m.startswith(p + ".") for m in modules)]
    assert loaded == [], f"robtui suggest imported {loaded}"
