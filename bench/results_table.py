"""The harness's printed report: measures by size, ratios, start-up and the targets."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from bench.measure import Measure
    from bench.run import SizeResult

__all__ = ["format_report"]

_ROWS = ("floor", "floor, GC off", "sexpdata.loads", "ledlint EDIF", "ledlint EDIF hier",
         "ledlint SPICE", "ngspice -b")
_PEAKS = ("ledlint EDIF", "ledlint EDIF hier", "ledlint SPICE")


def _size_label(parts: int) -> str:
    return f"{parts // 1000}k" if parts % 1000 == 0 else str(parts)


def _seconds(measure: Measure | None) -> str:
    if measure is None:
        return "-"
    if measure.median is None:
        return "skipped" if (measure.error or "").startswith("skipped") else "n/a (error)"
    runs = "" if len(measure.seconds) > 1 else " (1 run)"
    return f"{measure.median:.3f}{runs}"


def _line(label: str, cells: list[str]) -> str:
    return f"{label:34}" + "".join(f"{cell:>16}" for cell in cells)


def _measure_rows(sizes: dict[int, SizeResult]) -> list[str]:
    results = list(sizes.values())
    lines = [_line("measure", [_size_label(p) for p in sizes]),
             _line("  EDIF size (MB)", [f"{r.files['edif'].stat().st_size / 1e6:.1f}"
                                        for r in results]),
             _line("  generation (s)", [f"{r.generate_s:.2f}" for r in results])]
    lines += [_line(f"  {name} (s)", [_seconds(r.measures.get(name)) for r in results])
              for name in _ROWS]
    for name in _PEAKS:
        peaks = [r.measures[name].peak_kb for r in results]
        lines.append(_line(f"  {name} peak (MiB)",
                           [f"{p / 1024:.0f}" if p else "n/a" for p in peaks]))
        lines.append(_line("    per part (KiB)", [f"{p / r.board.parts:.2f}" if p else "n/a"
                                                  for p, r in zip(peaks, results)]))
    for name in ("ledlint EDIF", "ledlint SPICE"):
        found = [r.reported(name) for r in results]
        lines.append(_line(f"  {name}: LED groups found", [
            f"{sum(f.values())}/{r.board.led_groups}" if f is not None else "n/a"
            for f, r in zip(found, results)]))
    return lines


def _ratio_rows(sizes: dict[int, SizeResult]) -> list[str]:
    def ratio(result: SizeResult, top: str, bottom: str) -> str:
        a, b = result.measures[top].median, result.measures[bottom].median
        return f"{a / b:.2f}" if a is not None and b else "n/a"

    results = list(sizes.values())
    return [_line("  ledlint EDIF / floor", [ratio(r, "ledlint EDIF", "floor") for r in results]),
            _line("  ledlint SPICE / ngspice", [ratio(r, "ledlint SPICE", "ngspice -b")
                                               for r in results]),
            _line("  sexpdata / floor", [ratio(r, "sexpdata.loads", "floor") for r in results])]


def _errors(sizes: dict[int, SizeResult], startup: dict[str, Measure]) -> list[str]:
    lines = []
    for parts, result in sizes.items():
        for measure in result.measures.values():
            if measure.error and not measure.error.startswith("skipped"):
                lines.append(f"  {_size_label(parts)} {measure.name}: n/a (error: {measure.error})")
    for measure in startup.values():
        if measure.error:
            lines.append(f"  start-up {measure.name}: n/a (error: {measure.error})")
    return lines


def _target_rows(targets: list[dict[str, Any]]) -> list[str]:
    lines = []
    for row in targets:
        value = f"{row['value']:.2f}" if row["value"] is not None else "n/a"
        limit = f"<= {row['limit']:g} {row['unit']}".rstrip()
        note = f"  ({row['note']})" if row["note"] else ""
        lines.append(f"  {row['verdict']:5} {row['label']:40} {value:>8}  {limit}{note}")
    return lines


def format_report(sizes: dict[int, SizeResult], startup: dict[str, Measure],
                  targets: list[dict[str, Any]]) -> str:
    """The whole printed report, medians in seconds."""
    lines = ["Medians of the timed runs, wall clock.", "", *_measure_rows(sizes), "",
             _line("ratios", []), *_ratio_rows(sizes), "", "start-up (s)"]
    lines += [f"  {name:32}{_seconds(m):>16}" for name, m in startup.items()]
    errors = _errors(sizes, startup)
    if errors:
        lines += ["", "errors", *errors]
    lines += ["", "targets", *_target_rows(targets)]
    return "\n".join(lines) + "\n"
