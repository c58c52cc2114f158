"""Start-up stays light: a one-board check loads no module it does not use.

The demo check is timed against ``python -c "import numpy, networkx"`` (bench/run.py); every
module a run loads without need is start-up time. Each test runs the whole check in a fresh
interpreter (``python -c``), then lists which of the named modules ended up in ``sys.modules``.
The expected absences come from the code itself (which module a format or a step needs), not
from a timing: speed is never asserted here.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"

# Libraries ledlint never needs for a JSON or SARIF report of one board: rich draws the text
# report only; networkx, pint, scipy, matplotlib, schemdraw and jinja2 are not used by the
# check at all (some may not even be installed, which this test does not mind).
HEAVY = ("rich", "networkx", "pint", "scipy", "matplotlib", "schemdraw", "jinja2")
# Standard-library modules only an error, an option or another command needs:
# importlib.resources (the defaults file is read as a plain file), difflib (suggestions in a
# bad settings file), tempfile (atomic report files, --output), threading (the progress bar's
# timer, on a terminal only), decimal (EDIF (e m x) numbers; the demo has none), shutil (the
# help formatter's width is found without it: linter.cli._terminal_columns); linter's batch
# and many-board modules.
NOT_ON_ONE_BOARD = ("importlib.resources", "difflib", "tempfile", "threading", "decimal",
                    "shutil", "linter.cli_many", "linter.batch")

_PROBE = """
import io, json, sys
from contextlib import redirect_stdout
from linter.cli import main
with redirect_stdout(io.StringIO()) as out:
    status = main(sys.argv[1:])
names = {names!r}
print(json.dumps({{"status": status, "written": len(out.getvalue()),
                  "loaded": [n for n in names if n in sys.modules]}}))
"""


def _loaded_after_check(fmt: str, names: tuple[str, ...]) -> dict[str, object]:
    """Run the demo check in a fresh interpreter; report which of ``names`` got imported."""
    command = [sys.executable, "-c", _PROBE.format(names=names), "check",
               str(DEMO / "dust_extractor_panel.edif"), "--bom", str(DEMO / "bom.csv"),
               "--format", fmt]
    done = subprocess.run(command, cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout)


@pytest.mark.parametrize("fmt", ["json", "sarif"])
def test_machine_readable_report_loads_no_heavy_library(fmt: str) -> None:
    names = HEAVY + NOT_ON_ONE_BOARD
    probe = _loaded_after_check(fmt, names)
    # the demo board has findings (fixtures/demo/BOARD.md): exit status 1 and a report written
    assert probe["status"] == 1
    assert probe["written"] > 0
    assert probe["loaded"] == []


def test_probe_sees_a_module_the_check_does_load() -> None:
    """The probe itself works: linter.engine and numpy are loaded by every check (so an empty
    list above means absent, not a probe that never looks)."""
    probe = _loaded_after_check("json", ("linter.engine", "numpy", "rich"))
    assert probe["loaded"] == ["linter.engine", "numpy"]


def test_plain_text_report_loads_no_rich() -> None:
    """Without colour (stdout is not a terminal here) and without --verbose, every line of the
    text report is plain text (linter.report.text_line): rich stays unloaded."""
    probe = _loaded_after_check("text", ("rich",))
    assert probe["status"] == 1 and probe["written"] > 0
    assert probe["loaded"] == []


def test_load_check_modules_gives_the_registry_and_restores_the_collector() -> None:
    """engine.load_check_modules: the rule registry (the same as rules.all_rules), topology
    and analysis imported, the collector on again afterwards (and left off when it was off)."""
    import gc

    from linter.engine import load_check_modules
    from linter.rules import all_rules

    assert gc.isenabled()
    assert load_check_modules() == all_rules()
    assert gc.isenabled()
    assert "linter.analysis" in sys.modules and "linter.topology" in sys.modules
    gc.disable()
    try:
        load_check_modules()
        assert not gc.isenabled()
    finally:
        gc.enable()
