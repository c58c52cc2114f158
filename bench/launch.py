"""Run one command from a small process and record its time, exit status and peak memory.

Usage: ``python -S bench/launch.py RESULT_FILE TIMEOUT_S COMMAND...``; writes
``seconds status peak_kib`` (one line) to RESULT_FILE, or ``cannot-start REASON`` when the
command cannot be started.

Why a launcher: on Linux a child's ``ru_maxrss`` includes the resident size of the process it
was forked from, up to the ``exec`` (the kernel keeps the old memory map's high-water mark). The
benchmark harness holds whole boards and parse trees in memory, so a command forked straight
from it would be charged with the harness's own hundreds of MiB. Forked from this launcher
(a few MiB), the peak is the command's own.
"""

import os
import subprocess
import sys
import threading
import time


def main(argv: list[str]) -> int:
    result_file, timeout, command = argv[0], float(argv[1]), argv[2:]
    started = time.perf_counter()
    try:
        process = subprocess.Popen(command)
    except OSError as exc:
        with open(result_file, "w", encoding="utf-8") as out:
            out.write(f"cannot-start {exc.strerror or exc}\n")
        return 0
    timer = threading.Timer(timeout, process.kill)
    timer.start()
    _, status, usage = os.wait4(process.pid, 0)
    elapsed = time.perf_counter() - started
    timer.cancel()
    with open(result_file, "w", encoding="ascii") as out:
        out.write(f"{elapsed!r} {os.waitstatus_to_exitcode(status)} {usage.ru_maxrss}\n")
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
