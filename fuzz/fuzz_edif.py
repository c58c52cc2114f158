"""atheris harness: the EDIF reader (``make fuzz``; seeds from fixtures/**/*.edif)."""

from _common import run  # noqa: I001 (sets sys.path first)

# imported before instrumentation; run() instruments every function loaded
from linter.readers.edif import read_edif
from linter.readers import decode_text


def read(data: bytes) -> None:
    read_edif(decode_text(data, "fuzz.edif"), "fuzz.edif")


if __name__ == "__main__":
    run(read)
