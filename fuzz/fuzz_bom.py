"""atheris harness: the BOM reader (``make fuzz``; seeds from fixtures/**/*.csv)."""

from _common import run  # noqa: I001 (sets sys.path first)

# imported before instrumentation; run() instruments every function loaded
from linter.readers import decode_text
from linter.readers.bom import parse_bom
from linter.errors import BomError


def read(data: bytes) -> None:
    parse_bom(decode_text(data, "fuzz.csv", BomError), "fuzz.csv")


if __name__ == "__main__":
    run(read)
