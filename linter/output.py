"""Writing reports and baselines whole or not at all."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

__all__ = ["write_atomically"]


def write_atomically(path: Path, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file in the same folder, then rename.

    An interrupted run leaves the old file (or no file) in place, never half a report.
    """
    folder = path.resolve().parent
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as stream:
            stream.write(text)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
