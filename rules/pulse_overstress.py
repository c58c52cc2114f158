"""Rule ``pulse-overstress``: a pulsed LED beyond its peak rating, its pulse terms or if_max."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Iterable

from linter.findings import Finding
from linter.partdata import LedData
from linter.results import GroupResult, LedResult
from linter.rulekit import (amps, at_corner, figures_of, led_data, part_location, renamer, say,
                            solved_groups)
from linter.rules import Rule, register
from linter.units import format_si


@dataclass(frozen=True)
class _Verdict:
    """What is wrong with one pulsed LED: reasons in words, values, and whether any reason
    is a breach of a known rating (else only a rating is missing)."""

    reasons: tuple[str, ...]
    values: dict
    breach: bool


def _percent(fraction: float) -> str:
    return f"{fraction * 100:.3g} %"


@register
class PulseOverstress(Rule):
    """A pulsed LED exceeds its peak current rating, the pulse terms of it, or its average.

    A group is pulsed when one of its nets is named in the settings
    (``[pulsed."NET"] duty = "10%"``, ``period = "1 ms"``). Its worst-case current is the
    peak. Above the continuous maximum ``if_max`` the datasheet's peak rating applies, and
    only on its terms: the peak must stay within ``if_peak``, the pulse (duty × period)
    within ``if_peak_pulse`` and the duty within ``if_peak_duty`` (a peak rating holds for
    short pulses at low duty, for example 100 µs at 1/10, common practice). At any peak the
    average, duty × peak, must stay within ``if_max``. A peak above ``if_max`` with no peak
    rating in the part data, or a pulse length that cannot be told (no period), is a
    warning: unknown, not guessed.

    **Anti-pattern**

    A red LED (if_max 25 mA, if_peak 100 mA at 100 µs, 1/10) multiplexed at 60 mA peak,
    30 % duty, 1 ms period: 300 µs pulses, 30 % duty and 18 mA average — the pulse and duty
    break the peak rating's terms::

        [pulsed."ROW1"]
        duty = "30%"
        period = "1 ms"

    **Best practice**

    Keep the pulse within the rating's terms (10 % of 1 ms is 100 µs), or the peak within
    ``if_max``::

        [pulsed."ROW1"]
        duty = "10%"
        period = "1 ms"
    """

    id = "pulse-overstress"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        pulsed = context.settings.pulsed
        if not pulsed:
            return
        for result in solved_groups(context):
            nets = [net for net in result.group.nets if net in pulsed]
            if not nets:
                continue
            pulse = pulsed[nets[0]]
            base, refs = figures_of(result)  # a follower's records are left unbuilt
            name = renamer(refs)
            for led in base.leds:
                data = led_data(context, name(led.ref))
                if data is None:
                    continue
                verdict = _judge(led.current.max, pulse.duty, pulse.period, data)
                if verdict.reasons:
                    yield self._finding(context, result, led, nets[0], verdict, name(led.ref))

    def _finding(self, context: Any, result: GroupResult, led: LedResult, net: str,
                 verdict: _Verdict, ref: str | None = None) -> Finding:
        """``led``: the record holding the figures (a follower's template's, see
        :func:`~linter.rulekit.figures_of`); ``ref`` its name in ``result``'s group
        (default: the record's)."""
        refs = figures_of(result)[1] if ref is not None else None
        ref = led.ref if ref is None else ref
        peak = led.current.max
        where = at_corner(led.current.at_max, result, (ref,), refs)
        message = say(ref, f"{amps(peak)} peak at {where} on pulsed net {net}: "
                           f"{'; '.join(verdict.reasons)}")
        severity = context.severity(self) if verdict.breach else context.severity(self, "warning")
        values = {"peak_a": peak, **verdict.values}
        return Finding(rule=self.id, severity=severity, message=message, parts=(ref,),
                       nets=(net,), group=result.id, values=values,
                       fix=_fix(ref, peak, verdict), location=part_location(context, ref))


def _judge(peak: float, duty: float, period: float | None, data: LedData) -> _Verdict:
    """Every breach of a pulsed LED: peak, pulse length, duty, average."""
    reasons: list[str] = []
    values: dict = {"duty": duty, "average_a": duty * peak}
    breach = False
    width = None if period is None else duty * period
    if width is not None:
        values.update(period_s=period, pulse_s=width)
    if data.if_max is not None:
        values["if_max_a"] = data.if_max
        if duty * peak > data.if_max:
            reasons.append(f"average {amps(duty * peak)} ({_percent(duty)} duty) above its "
                           f"{amps(data.if_max)} if_max")
            breach = True
    if data.if_max is None or peak <= data.if_max:
        return _Verdict(tuple(reasons), values, breach)
    if data.if_peak is None:
        reasons.append(f"above its {amps(data.if_max)} if_max and the part data gives no "
                       f"if_peak")
        return _Verdict(tuple(reasons), values, breach)
    values["if_peak_a"] = data.if_peak
    if peak > data.if_peak:
        reasons.append(f"above its {amps(data.if_peak)} if_peak")
        breach = True
    if data.if_peak_pulse is not None:
        values["if_peak_pulse_s"] = data.if_peak_pulse
        if width is None:
            reasons.append(f"pulse length unknown (no period given; the peak rating allows "
                           f"{format_si(data.if_peak_pulse, 's')})")
        elif width > data.if_peak_pulse:
            reasons.append(f"{format_si(width, 's')} pulses ({_percent(duty)} of "
                           f"{format_si(period, 's')}), longer than the "
                           f"{format_si(data.if_peak_pulse, 's')} the peak rating allows")
            breach = True
    if data.if_peak_duty is not None:
        values["if_peak_duty"] = data.if_peak_duty
        if duty > data.if_peak_duty:
            reasons.append(f"{_percent(duty)} duty, above the {_percent(data.if_peak_duty)} "
                           f"the peak rating allows")
            breach = True
    return _Verdict(tuple(reasons), values, breach)


def _fix(ref: str, peak: float, verdict: _Verdict) -> str:
    """Computed remedies: the duty, pulse and peak that would meet the ratings."""
    values = verdict.values
    pieces: list[str] = []
    if_max = values.get("if_max_a")
    if if_max is not None and values["average_a"] > if_max:
        pieces.append(f"duty at most {_percent(if_max / peak)} at this peak")
    if "if_peak_duty" in values and values["duty"] > values["if_peak_duty"]:
        pieces.append(f"duty at most {_percent(values['if_peak_duty'])}")
    if "pulse_s" in values and "if_peak_pulse_s" in values \
            and values["pulse_s"] > values["if_peak_pulse_s"]:
        pieces.append(f"pulses of at most {format_si(values['if_peak_pulse_s'], 's')} "
                      f"(period at most {format_si(values['if_peak_pulse_s'] / values['duty'], 's')} "
                      f"at this duty)")
    if "if_peak_a" in values and peak > values["if_peak_a"]:
        pieces.append(f"a peak at most {amps(values['if_peak_a'])}")
    if not pieces:
        if if_max is not None and "if_peak_a" not in values:
            return (f"add if_peak, if_peak_pulse and if_peak_duty for {ref} from its "
                    f"datasheet, or keep the peak within {amps(if_max)}")
        return f"give the period of the pulses on this net so that the pulse length of {ref} can be checked"
    if if_max is not None and peak > if_max:
        pieces.append(f"or a peak within the continuous {amps(if_max)}")
    return f"for {ref}: " + ", ".join(pieces)
