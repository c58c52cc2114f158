"""Writing reports and baselines whole or not at all."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path
from typing import Iterable

__all__ = ["write_atomically"]


def write_atomically(path: Path, text: str | Iterable[str]) -> None:
    """Write ``text`` to ``path`` through a temporary file in the same folder, then rename.

    ``text`` is one string or an iterable of pieces written as they come (a streamed report:
    an exception while making the pieces removes the temporary file and leaves ``path`` as it
    was). An interrupted run leaves the old file (or no file) in place, never half a report. The
    file gets the permissions a plain ``open(path, "w")`` would give it: the old file's mode
    when it replaces one, else 0o666 less the umask (a temporary file starts at 0o600).
    """
    folder = path.resolve().parent
    mode = _mode_for(path)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        os.fchmod(handle, mode)
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as stream:
            for piece in ((text,) if isinstance(text, str) else text):
                stream.write(piece)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def _mode_for(path: Path) -> int:
    """The permission bits the written file should carry."""
    try:
        return path.stat().st_mode & 0o777
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask
