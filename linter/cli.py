"""Command line: ``ledlint check``, ``ledlint rules``, ``ledlint baseline write``, ``ledlint --version``.

Standard output carries the report (or ``--output`` receives it, written whole or not at
all); standard error carries one-line errors. Exit codes: :data:`EXIT_CLEAN` when nothing
is at or above the fail level, :data:`EXIT_FINDINGS` when something is, and
:data:`EXIT_BAD_INPUT` when an input or the command line could not be used.
"""

from __future__ import annotations

import argparse
import atexit
import os
import stat
import sys
from pathlib import Path
from typing import Any, Iterable, NoReturn, Sequence

from linter import __version__
from linter.errors import LedlintError, UsageError, one_line
from linter.gc_pause import paused_gc

__all__ = ["main", "EXIT_CLEAN", "EXIT_FINDINGS", "EXIT_BAD_INPUT"]

EXIT_CLEAN = 0
"""No finding at or above the fail level."""
EXIT_FINDINGS = 1
"""At least one finding at or above the fail level."""
EXIT_BAD_INPUT = 2
"""An input file or the command line could not be used."""


def _terminal_columns() -> int:
    """``shutil.get_terminal_size().columns``, worked out as shutil does (``COLUMNS`` if it
    is a positive number, else standard output's terminal, else 80) without importing
    shutil: argparse makes a formatter for every argument added, and shutil brings bz2 and
    lzma with it (about 3 ms of every run)."""
    try:
        columns = int(os.environ["COLUMNS"])
    except (KeyError, ValueError):
        columns = 0
    if columns > 0:
        return columns
    try:
        return os.get_terminal_size(sys.__stdout__.fileno()).columns or 80  # type: ignore[union-attr]
    except (AttributeError, ValueError, OSError):
        return 80


class _Formatter(argparse.HelpFormatter):
    """argparse's help formatter at the width argparse itself would choose (see
    :func:`_terminal_columns`)."""

    def __init__(self, prog: str, indent_increment: int = 2, max_help_position: int = 24,
                 width: int | None = None) -> None:
        if width is None:
            width = _terminal_columns() - 2  # as argparse.HelpFormatter does
        super().__init__(prog, indent_increment, max_help_position, width)


class _Parser(argparse.ArgumentParser):
    """argparse that reports a bad command line in one line and exits 2 through our path."""

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        kwargs.setdefault("formatter_class", _Formatter)
        super().__init__(*args, **kwargs)

    def error(self, message: str) -> NoReturn:
        raise UsageError(f"{self.prog}: {message}")


def _build_parser() -> argparse.ArgumentParser:
    from linter.report import ReportFormat

    parser = _Parser(prog="ledlint", description="Design-rule checker for LED drive circuits.")
    parser.add_argument("--version", action="version", version=f"ledlint {__version__}")
    commands = parser.add_subparsers(dest="command", required=True, parser_class=_Parser)

    check = commands.add_parser("check", help="check a netlist and report findings")
    check.add_argument("netlist", type=Path,
                       help="EDIF 2.0.0 or SPICE netlist, or a folder: every netlist below it")
    check.add_argument("more_netlists", type=Path, nargs="*", metavar="NETLIST",
                       help="further netlists or folders, each board checked on its own")
    check.add_argument("--jobs", "-j", type=int, default=1, metavar="N",
                       help="check N boards at a time (separate processes); default 1")
    check.add_argument("--bom", type=Path, help="bill of materials (CSV)")
    check.add_argument("--config", type=Path, help="settings file (default: found upward)")
    check.add_argument("--parts", type=Path, action="append", default=[],
                       help="extra part data (TOML); may repeat")
    check.add_argument("--format", choices=tuple(choice.value for choice in ReportFormat),
                       default=ReportFormat.TEXT.value)
    check.add_argument("--output", "-o", type=Path, help="write the report here instead of stdout")
    check.add_argument("--fail-on", choices=("error", "warning", "info"), default="error")
    check.add_argument("--verbose", "-v", action="store_true", help="add per-group tables")
    check.add_argument("--quiet", "-q", action="store_true", help="print only findings")
    check.add_argument("--baseline", type=Path, metavar="FILE",
                       help="show only findings not in this baseline (ledlint baseline write)")

    rules = commands.add_parser("rules", help="list the rules, or print one rule's page")
    rules.add_argument("rule", nargs="?")
    _add_baseline_parser(commands)
    return parser


def _add_baseline_parser(commands: argparse._SubParsersAction) -> None:
    baseline = commands.add_parser("baseline", help="record the current findings as accepted")
    actions = baseline.add_subparsers(dest="baseline_action", required=True, parser_class=_Parser)
    write = actions.add_parser("write", help="write the fingerprints of the current findings")
    write.add_argument("file", type=Path, metavar="FILE", help="the baseline file to write")
    write.add_argument("netlist", type=Path, help="EDIF 2.0.0 or SPICE netlist")
    write.add_argument("--bom", type=Path, help="bill of materials (CSV)")
    write.add_argument("--config", type=Path, help="settings file (default: found upward)")
    write.add_argument("--parts", type=Path, action="append", default=[],
                       help="extra part data (TOML); may repeat")


def _same_file(first: Path, second: Path) -> bool:
    """True when both names lead to one file (existing or not)."""
    try:
        return os.path.samefile(first, second)
    except OSError:
        return first.resolve() == second.resolve()


def _refuse_output_over_input(args: argparse.Namespace, netlists: Sequence[Path]) -> None:
    """``--output`` may not name an input, nor a settings file found upward from a netlist."""
    if args.output is None:
        return
    inputs = [*netlists, *(path for path in (args.bom, args.config) if path), *args.parts]
    for netlist in netlists:
        for folder in netlist.resolve().parents:
            inputs += [folder / "ledlint.toml", folder / "pyproject.toml"]
    for path in inputs:
        if _same_file(args.output, path):
            raise UsageError(f"ledlint check: --output {args.output} is an input "
                             f"({path}); write the report to another file")


def writes_in_place(path: Path) -> bool:
    """True when ``path`` is a character device or a pipe (``/dev/null``, ``/dev/stdout``, a
    FIFO): such an output is written where it is, since renaming a finished file over it
    would replace the device or the pipe itself."""
    try:
        mode = os.stat(path).st_mode
    except (OSError, ValueError):
        return False
    return stat.S_ISCHR(mode) or stat.S_ISFIFO(mode)


def write_report(path: Path, pieces: str | Iterable[str]) -> None:
    """The report to ``--output``: a file through :func:`linter.output.write_atomically`
    (whole or not at all); a device or a pipe (:func:`writes_in_place`) in place, piece by
    piece as they come, as standard output would get them."""
    if writes_in_place(path):
        with open(path, "w", encoding="utf-8", newline="\n") as stream:
            for piece in ((pieces,) if isinstance(pieces, str) else pieces):
                stream.write(piece)
        return
    from linter.output import write_atomically

    write_atomically(path, pieces)


def _run_check(args: argparse.Namespace) -> int:
    from linter.cli_plan import wants_many

    if wants_many(args):  # several paths or a folder: one combined report (linter.batch)
        from linter.cli_many import run_many

        return run_many(args)
    with paused_gc():  # imports make no garbage cycles to collect (engine.load_check_modules)
        from linter.engine import CheckRequest, run_check
        from linter.findings import severity_rank

    netlists = (args.netlist,)
    _refuse_output_over_input(args, netlists)
    from linter.progress import Progress

    with Progress(total=len(netlists) + 1) as progress:  # on stderr, only on a terminal
        results = []
        for netlist in netlists:
            progress.step(f"checking {netlist.name}")
            results.append(run_check(CheckRequest(netlist=netlist, bom=args.bom,
                                                  config=args.config,
                                                  parts_files=tuple(args.parts),
                                                  baseline=args.baseline)))
        progress.step(f"writing the {args.format} report")
        to_terminal = args.output is None and sys.stdout.isatty() and "NO_COLOR" not in os.environ
        with paused_gc():  # the reporter's modules imported: no cycles to collect
            from linter.report import ReportFormat
            from linter.report.stream import report_chunks

            reporter = ReportFormat(args.format).reporter(verbose=args.verbose,
                                                          quiet=args.quiet, color=to_terminal)

        pieces = report_chunks(reporter, results)  # made as written: no whole report in memory
        if args.output is not None:
            write_report(args.output, pieces)
    if args.output is None:
        for piece in pieces:  # after the progress bar is gone: the report alone on stdout
            sys.stdout.write(piece)
    _say_baselined(results)
    threshold = severity_rank(args.fail_on)
    failing = any(severity_rank(f.severity) >= threshold
                  for result in results for f in result.findings)
    return EXIT_FINDINGS if failing else EXIT_CLEAN


def _say_baselined(results: Sequence) -> None:
    """``N findings in the baseline not shown`` on standard error, when a baseline hid any."""
    hidden = sum(len(getattr(result, "baselined", ())) for result in results)
    if hidden:
        word = "finding" if hidden == 1 else "findings"
        sys.stderr.write(f"{hidden} {word} in the baseline not shown\n")


def _run_baseline(args: argparse.Namespace) -> int:
    from linter.baseline import write_baseline
    from linter.engine import CheckRequest, run_check

    inputs = [args.netlist, *(path for path in (args.bom, args.config) if path), *args.parts]
    for path in inputs:
        if _same_file(args.file, path):
            raise UsageError(f"ledlint baseline write: {args.file} is an input; "
                             f"write the baseline to another file")
    result = run_check(CheckRequest(netlist=args.netlist, bom=args.bom, config=args.config,
                                    parts_files=tuple(args.parts)))
    try:
        count = write_baseline(args.file, result.findings)
    except OSError as exc:
        raise UsageError(f"ledlint baseline write: cannot write {args.file}: "
                         f"{exc.strerror or exc}") from None
    word = "finding" if count == 1 else "findings"
    sys.stderr.write(f"{args.file}: baseline of {count} {word} written\n")
    return EXIT_CLEAN


def _run_rules(args: argparse.Namespace) -> int:
    from linter.rules import all_rules

    registry = all_rules()
    if args.rule is None:
        for rule_id, rule in sorted(registry.items()):
            sys.stdout.write(f"{rule_id:20} {rule.default_severity:8} {rule.summary()}\n")
        return EXIT_CLEAN
    rule = registry.get(args.rule)
    if rule is None:
        raise UsageError(f"ledlint rules: no rule {args.rule!r}; `ledlint rules` lists them")
    sys.stdout.write(rule.documentation() + "\n")
    return EXIT_CLEAN


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``ledlint`` console script; returns the exit code."""
    try:
        with paused_gc():  # the parser and the report module imported: no cycles to collect
            parser = _build_parser()
        args = parser.parse_args(argv)
        if args.command == "check":
            return _run_check(args)
        if args.command == "baseline":
            return _run_baseline(args)
        return _run_rules(args)
    except LedlintError as exc:
        sys.stderr.write(f"{one_line(str(exc))}\n")
        return EXIT_BAD_INPUT
    except RecursionError:
        sys.stderr.write("ledlint: input nested too deeply\n")
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        sys.stderr.write("ledlint: interrupted\n")
        return 130


def run() -> NoReturn:
    """The console script: :func:`main`, then the process ends at once, without taking the
    run's objects apart one by one (millions on a large board: about 0.17 s of CPU after a
    100,000-part check). Exit handlers run and both streams are flushed first; a stream that
    cannot be flushed (a closed pipe) leaves the ending to the interpreter, as before."""
    code = main()
    atexit._run_exitfuncs()
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):
        sys.exit(code)
    os._exit(code)


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
