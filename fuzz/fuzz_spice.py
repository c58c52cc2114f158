"""atheris harness: the SPICE reader (``make fuzz``; seeds from fixtures/**/*.cir).

Decks are written to one temporary folder (``.include`` resolves against it; nothing outside
it may be read).
"""

import tempfile
from pathlib import Path

from _common import run  # noqa: I001 (sets sys.path first)

# imported before instrumentation; run() instruments every function loaded
from linter.readers import read_netlist

FOLDER = Path(tempfile.mkdtemp(prefix="ledlint-fuzz-spice-"))
DECK = FOLDER / "fuzz.cir"


def read(data: bytes) -> None:
    DECK.write_bytes(data)
    read_netlist(DECK, source="fuzz.cir", root=FOLDER)


if __name__ == "__main__":
    run(read)
