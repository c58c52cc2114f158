"""Shared by the atheris harnesses: run one reader on fuzzed bytes, allow only InputError.

Each harness calls :func:`run` with a function that reads bytes; any exception other than a
one-line :class:`linter.errors.InputError` propagates and atheris reports it as a crash (the
input is saved as ``crash-*``). Seeds are the project's valid fixtures.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Callable

import atheris

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from linter.errors import InputError  # noqa: E402


def guarded(read: Callable[[bytes], object]) -> Callable[[bytes], None]:
    def one_input(data: bytes) -> None:
        try:
            read(data)
        except InputError as error:
            text = str(error)
            if "\n" in text or "\r" in text:
                raise AssertionError(f"error text spans lines: {text!r}") from None
    return one_input


def run(read: Callable[[bytes], object]) -> None:
    """Start atheris; the corpus folder is the first argument (``make fuzz`` seeds it)."""
    atheris.instrument_all()  # every loaded function, linter's readers included
    atheris.Setup(sys.argv, guarded(read))
    atheris.Fuzz()
