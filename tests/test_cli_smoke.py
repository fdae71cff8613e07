"""The CLI starts and lists its commands."""

import subprocess
import sys


def test_help_lists_commands():
    run = subprocess.run(
        [sys.executable, "-m", "robtui", "--help"], capture_output=True, text=True, check=False
    )
    assert run.returncode == 0, run.stderr
    assert "RoB 2" in run.stdout
