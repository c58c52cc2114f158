"""atheris harness: parts files (``--parts``; ``make fuzz``; seeds from fixtures/**/*.toml)."""

import tempfile
from pathlib import Path

from _common import run  # noqa: I001 (sets sys.path first)

# imported before instrumentation; run() instruments every function loaded
from linter.config import read_parts_file

FILE = Path(tempfile.mkdtemp(prefix="ledlint-fuzz-parts-")) / "parts.toml"


def read(data: bytes) -> None:
    FILE.write_bytes(data)
    read_parts_file(FILE, "parts.toml")


if __name__ == "__main__":
    run(read)
