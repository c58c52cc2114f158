"""The demo's HTML report in a real browser: Debian's headless Chromium loads it with no
console message, the findings section is in the DOM, and a screenshot is taken.

The page has no script of its own, so any console message (a script error, a resource that
failed to load through the dead proxy below) means something is wrong. A page with a
deliberate error checks that the detector sees one. Chromium missing is a failure, not a
skip (CI installs it: ``apt-get install chromium``).
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest

from linter.cli import main

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"
CHROMIUM = "/usr/bin/chromium"
TIMEOUT_S = 180
FLAGS = ("--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--enable-logging=stderr", "--v=0",
         "--proxy-server=http://127.0.0.1:9")  # a dead proxy: any network fetch fails loudly
_CONSOLE = re.compile(r":CONSOLE[:(\]]|Uncaught|Failed to load resource", re.I)


def _chromium() -> str:
    found = CHROMIUM if Path(CHROMIUM).exists() else shutil.which("chromium")
    if found is None:
        pytest.fail("chromium is missing: apt-get install -y chromium (CI installs it)")
    return found


def _run(page: Path, profile: Path, *extra: str) -> subprocess.CompletedProcess:
    command = [_chromium(), *FLAGS, f"--user-data-dir={profile}", *extra, page.as_uri()]
    return subprocess.run(command, capture_output=True, text=True, timeout=TIMEOUT_S)


def _console_lines(stderr: str) -> list[str]:
    return [line for line in stderr.splitlines() if _CONSOLE.search(line)]


@pytest.fixture(scope="module")
def demo_page(tmp_path_factory) -> Path:
    page = tmp_path_factory.mktemp("report") / "audit.html"
    code = main(["check", str(DEMO / "dust_extractor_panel.edif"), "--bom", str(DEMO / "bom.csv"),
                 "--format", "html", "-o", str(page)])
    assert code in (0, 1) and page.exists()
    return page


def test_the_detector_sees_a_script_error(tmp_path):
    page = tmp_path / "broken.html"
    page.write_text('<!DOCTYPE html><html><body><section id="findings"></section>'
                    "<script>no_such_function();</script></body></html>", encoding="utf-8")
    run = _run(page, tmp_path / "profile", "--dump-dom")
    assert run.returncode == 0, run.stderr[-2000:]
    assert _console_lines(run.stderr), "the console error was not seen: the check below could not fail"


def test_demo_report_loads_without_console_messages(demo_page, tmp_path):
    run = _run(demo_page, tmp_path / "profile", "--dump-dom")
    assert run.returncode == 0, run.stderr[-2000:]
    assert _console_lines(run.stderr) == []
    dom = run.stdout
    assert re.search(r'<section id="findings">\s*<h2>Findings</h2>', dom)
    assert 'id="summary"' in dom and '<section class="group"' in dom


def test_demo_report_screenshot(demo_page, tmp_path):
    shot = tmp_path / "audit.png"
    run = _run(demo_page, tmp_path / "profile", f"--screenshot={shot}", "--window-size=1280,2400",
               "--hide-scrollbars")
    assert run.returncode == 0, run.stderr[-2000:]
    assert _console_lines(run.stderr) == []
    data = shot.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"  # the PNG signature (PNG specification)
    assert len(data) > 50_000  # a blank 1280×2400 page gives about 14 kB (tried by hand)
