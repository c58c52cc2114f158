"""``linter.cli.run`` (the console script that ends the process at once) gives what
``sys.exit(main())`` gives: the same standard output, standard error and exit code.

Expected values: the plain path of our own code (``sys.exit(main())`` in a second process).
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"

_PLAIN = "import sys; from linter.cli import main; sys.argv[0] = 'ledlint'; sys.exit(main())"
_RUN = ("import atexit, sys; from linter.cli import run; sys.argv[0] = 'ledlint'; "
        "atexit.register(lambda: print('exit handler ran', file=sys.stderr)); run()")


@pytest.mark.parametrize("args", [
    ["check", str(DEMO / "dust_extractor_panel.edif"), "--bom", str(DEMO / "bom.csv"),
     "--format", "json"],
    ["check", str(DEMO / "dust_extractor_panel.edif"), "--format", "text"],
    ["check", str(DEMO / "missing.edif")],
    ["rules"],
])
def test_run_is_sys_exit_of_main(args: list[str]) -> None:
    plain = subprocess.run([sys.executable, "-c", _PLAIN, *args], capture_output=True,
                           text=True, cwd=ROOT)
    fast = subprocess.run([sys.executable, "-c", _RUN, *args], capture_output=True,
                          text=True, cwd=ROOT)
    assert fast.returncode == plain.returncode
    assert fast.stdout == plain.stdout
    assert fast.stderr == plain.stderr + "exit handler ran\n"
