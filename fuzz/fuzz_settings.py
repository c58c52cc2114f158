"""atheris harness: the settings reader (``make fuzz``; seeds from fixtures/**/*.toml)."""

from _common import run  # noqa: I001 (sets sys.path first)

# imported before instrumentation; run() instruments every function loaded
from linter.config import settings_from_text
from linter.errors import ConfigError
from linter.readers import decode_text


def read(data: bytes) -> None:
    settings_from_text(decode_text(data, "ledlint.toml", ConfigError))


if __name__ == "__main__":
    run(read)
