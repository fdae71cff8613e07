"""Text bound for a terminal: control characters removed (a leaf module).

Labels, justifications, reasons and file names are user text; printed raw, an ESC or BEL byte
in them drives the terminal (moves the cursor, rewrites lines, sets the title, rings). The CLI
prints everything through ``SafeStream``, which removes C0 controls but tab and newline, DEL,
C1 controls, and the bidirectional overrides and isolates that make text read differently from
how it is stored (Boucher & Anderson, "Trojan Source", USENIX Security 2023).
"""

from __future__ import annotations

import re
from typing import TextIO

_UNSAFE = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


def terminal_safe(text: str) -> str:
    """``text`` without control characters (tab and newline kept)."""
    return _UNSAFE.sub("", text)


class SafeStream:
    """A text stream that removes control characters from everything written to it."""

    def __init__(self, stream: TextIO) -> None:
        self._stream = stream

    def write(self, text: str) -> int:
        self._stream.write(terminal_safe(text))
        return len(text)

    def __getattr__(self, name: str):
        return getattr(self._stream, name)
