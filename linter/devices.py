"""Device equations: the LED (Shockley diode with series resistance), the bipolar transistor
(Ebers–Moll transport model) and the MOSFET (Shichman–Hodges, SPICE level 1), with the curve
fits that turn datasheet figures into model parameters.

Every equation works on numpy arrays (any shape, broadcast together) so that the solver can
evaluate a whole batch of corners at once. Units are SI throughout: V, A, Ω, S, K.

Temperature (documented choice): the thermal voltage of every junction is held at the
datasheet reference temperature (25 °C), and a change of ambient acts as a shift of the whole
diode curve along the voltage axis by ``tempco · (T − T_ref)`` (V). The shift is carried by a
temperature-dependent saturation current

    Is(T) = Is(T_ref) · exp(−tempco · (T − T_ref) / (n · Vt))

so that at any current the junction voltage moves by exactly ``tempco · ΔT``; the series
resistance does not change. With a negative tempco (about −2 mV/K for red, −3 mV/K for blue
and white, from memory) Vf falls as the LED warms.
"""

from __future__ import annotations

import math

import numpy as np

from linter.partdata import LedData
from linter.records import record

__all__ = [
    "T_REF_C",
    "EXP_LIMIT",
    "thermal_voltage",
    "limited_exp",
    "LedCurve",
    "LED_DEFAULTS",
    "led_curve",
    "saturation_current",
    "led_voltage",
    "shifted_is",
    "diode_current",
    "pn_limit",
    "bjt_is_from_vbe",
    "bjt_currents",
    "mosfet_kp_from_rds_on",
    "mosfet_current",
]

T_REF_C: float = 25.0
"""Datasheet reference temperature, °C."""

EXP_LIMIT: float = 80.0
"""Argument above which ``exp`` is continued as a straight line (keeps Newton finite)."""

DEFAULT_TEST_CURRENT: float = 0.020
"""A, the test current assumed when a datasheet gives Vf without one (common practice)."""


BOLTZMANN: float = 1.380649e-23
"""J/K, the Boltzmann constant: exact by the 2019 SI definition (equals scipy.constants.k;
written out so that a check does not import scipy)."""
ELEMENTARY_CHARGE: float = 1.602176634e-19
"""C, exact by the 2019 SI definition (equals scipy.constants.e)."""
ZERO_CELSIUS: float = 273.15
"""K at 0 °C."""


def thermal_voltage(temp_c: float = T_REF_C) -> float:
    """Thermal voltage Vt = k·T/q in V at ``temp_c`` (°C); k and q as the SI defines them.

    >>> round(thermal_voltage(25.0) * 1e3, 3)
    25.693
    """
    return BOLTZMANN * (temp_c + ZERO_CELSIUS) / ELEMENTARY_CHARGE


VT_REF: float = thermal_voltage(T_REF_C)
"""Vt at 25 °C, V."""


def limited_exp(x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``exp(x)`` and its derivative, continued linearly above :data:`EXP_LIMIT`.

    Returns (value, derivative); both are continuous, so Newton's method stays finite.
    """
    x = np.asarray(x, dtype=float)
    clipped = np.minimum(x, EXP_LIMIT)
    e = np.exp(clipped)
    above = x > EXP_LIMIT
    if not above.any():   # the usual case: the value is exp itself (a copy, as np.where gives)
        return e.copy(), e
    value = np.where(above, e * (1.0 + x - EXP_LIMIT), e)
    return value, e


# --- LED -----------------------------------------------------------------------------------

@record
class LedDefaults:
    """Generic Shockley figures for a colour: ideality n, series resistance rs (Ω),
    tempco (V/K). From memory, typical of small indicator LEDs."""

    ideality: float
    rs: float
    tempco: float


LED_DEFAULTS: dict[str, LedDefaults] = {
    "red": LedDefaults(2.0, 5.0, -0.002),
    "orange": LedDefaults(2.0, 5.0, -0.002),
    "amber": LedDefaults(2.0, 5.0, -0.002),
    "yellow": LedDefaults(2.0, 5.0, -0.002),
    "yellow-green": LedDefaults(2.0, 8.0, -0.002),
    "green": LedDefaults(3.0, 10.0, -0.003),
    "blue": LedDefaults(3.0, 10.0, -0.003),
    "royal-blue": LedDefaults(3.0, 10.0, -0.003),
    "white": LedDefaults(3.0, 10.0, -0.003),
    "uv": LedDefaults(3.0, 10.0, -0.003),
    "ir": LedDefaults(1.8, 2.0, -0.0015),
}
"""Colour → generic figures (from memory). Unknown colours use ``red``'s, and say so."""


@record
class LedCurve:
    """An LED's fitted curve V = n·Vt·ln(I/Is + 1) + I·Rs at 25 °C, with its Vf corners.

    Attributes
    ----------
    is_typ, is_min_vf, is_max_vf : float
        Saturation currents (A) putting the curve through vf_typ, vf_min, vf_max at the
        test current (a smaller Is means a higher Vf).
    ideality : float
        Emission coefficient n.
    rs : float
        Series resistance, Ω.
    tempco : float
        V/K, the curve's shift per kelvin from 25 °C.
    test_current : float
        A, where the Vf figures hold.
    vf_typ, vf_min, vf_max : float
        V at the test current, 25 °C.
    assumed : tuple of str
        Figures taken from generic values (``ideality``, ``rs``, ``tempco``, ``vf_min``…).
    """

    is_typ: float
    is_min_vf: float
    is_max_vf: float
    ideality: float
    rs: float
    tempco: float
    test_current: float
    vf_typ: float
    vf_min: float
    vf_max: float
    assumed: tuple[str, ...] = ()


def saturation_current(vf: float, current: float, ideality: float, rs: float,
                       vt: float = VT_REF) -> float:
    """Is (A) that puts V = n·Vt·ln(I/Is + 1) + I·Rs through (vf, current).

    Is = I / (exp((Vf − I·Rs)/(n·Vt)) − 1).

    >>> i_s = saturation_current(2.0, 0.02, 2.0, 5.0)
    >>> abs(led_voltage(0.02, i_s, 2.0, 5.0) - 2.0) < 1e-12
    True
    """
    junction = vf - current * rs
    if junction <= 0.0:
        raise ValueError(f"series drop {current * rs:g} V exceeds Vf {vf:g} V")
    return current / math.expm1(junction / (ideality * vt))


def led_voltage(current: np.ndarray | float, i_s: np.ndarray | float, ideality: float,
                rs: float, vt: float = VT_REF) -> np.ndarray:
    """V (V) = n·Vt·ln(I/Is + 1) + I·Rs at ``current`` (A)."""
    current = np.asarray(current, dtype=float)
    return ideality * vt * np.log1p(current / i_s) + current * rs


def shifted_is(i_s: np.ndarray | float, shift_v: np.ndarray | float, ideality: float,
               vt: float = VT_REF) -> np.ndarray:
    """Is after shifting the junction curve by ``shift_v`` volts (positive: higher Vf).

    Is' = Is · exp(−ΔV/(n·Vt)); at any current the junction voltage rises by exactly ΔV
    (for I ≫ Is).
    """
    return np.asarray(i_s) * np.exp(-np.asarray(shift_v) / (ideality * vt))


def _led_figures(data: LedData) -> tuple[float, float, float, tuple[str, ...]]:
    """(ideality, rs, tempco, assumed) from data, else the colour's generic values."""
    assumed: list[str] = []
    generic = LED_DEFAULTS.get((data.color or "").casefold())
    if generic is None:
        generic = LED_DEFAULTS["red"]
        assumed.append("color")
    ideality = data.ideality
    if ideality is None:
        ideality = generic.ideality
        assumed.append("ideality")
    rs = data.rs
    if rs is None:
        rs = generic.rs
        assumed.append("rs")
    tempco = data.tempco
    if tempco is None:
        tempco = generic.tempco
        assumed.append("tempco")
    return ideality, rs, tempco, tuple(assumed)


def led_curve(data: LedData) -> LedCurve:
    """Fit an LED's curve to its datasheet (or take its SPICE figures) and its Vf corners.

    With ``spice_is`` set, IS, N (``ideality``) and RS (``rs``) are used as they are at
    nominal and vf_typ is what that curve gives at the test current. Otherwise Is is fitted
    so that the curve passes through (vf_typ, vf_test_current) with the given or generic
    n and Rs. vf_min / vf_max shift the curve (another Is) through those points at the
    test current. A missing vf_min or vf_max mirrors the other about vf_typ, and is named in
    ``assumed``; with neither, the corners equal typical.

    Raises
    ------
    ValueError
        When neither a SPICE model nor vf_typ is known.
    """
    ideality, rs, tempco, assumed_list = _led_figures(data)
    assumed = list(assumed_list)
    test_current = data.vf_test_current
    if test_current is None:
        test_current = DEFAULT_TEST_CURRENT
        assumed.append("vf_test_current")
    if data.spice_is is not None:
        is_typ = float(data.spice_is)
        vf_typ = float(led_voltage(test_current, is_typ, ideality, rs))
    elif data.vf_typ is not None:
        rs = min(rs, 0.5 * data.vf_typ / test_current)
        vf_typ = data.vf_typ
        is_typ = saturation_current(vf_typ, test_current, ideality, rs)
    else:
        raise ValueError("no vf_typ and no SPICE model")
    vf_min, vf_max = data.vf_min, data.vf_max
    if vf_max is None and vf_min is not None:
        vf_max = 2 * vf_typ - vf_min
        assumed.append("vf_max")
    elif vf_min is None and vf_max is not None:
        vf_min = 2 * vf_typ - vf_max
        assumed.append("vf_min")
    elif vf_min is None and vf_max is None:
        vf_min = vf_max = vf_typ
        assumed += ["vf_min", "vf_max"]
    vt_n = ideality * VT_REF
    return LedCurve(
        is_typ=is_typ,
        is_min_vf=float(is_typ * math.exp(-(vf_min - vf_typ) / vt_n)),
        is_max_vf=float(is_typ * math.exp(-(vf_max - vf_typ) / vt_n)),
        ideality=ideality, rs=rs, tempco=tempco, test_current=test_current,
        vf_typ=vf_typ, vf_min=float(vf_min), vf_max=float(vf_max), assumed=tuple(assumed),
    )


def diode_current(v: np.ndarray, i_s: np.ndarray, n_vt: np.ndarray
                  ) -> tuple[np.ndarray, np.ndarray]:
    """Ideal junction: I = Is·(exp(V/(n·Vt)) − 1) (A) and dI/dV (S)."""
    e, de = limited_exp(v / n_vt)
    return i_s * (e - 1.0), i_s * de / n_vt


def pn_limit(v_new: np.ndarray, v_old: np.ndarray, n_vt: np.ndarray, i_s: np.ndarray,
             v_crit: np.ndarray | None = None) -> np.ndarray:
    """SPICE's junction-voltage limiting: the junction voltage to evaluate at next.

    Above the critical voltage Vcrit = n·Vt·ln(n·Vt/(√2·Is)), a step of more than 2·n·Vt is
    cut to a logarithmic one, so that exp() does not run away between Newton iterations.
    ``v_crit`` may be passed in when already computed (it depends only on n·Vt and Is).
    """
    if v_crit is None:
        v_crit = n_vt * np.log(n_vt / (math.sqrt(2.0) * i_s))
    big = (v_new > v_crit) & (np.abs(v_new - v_old) > 2.0 * n_vt)
    arg = 1.0 + (v_new - v_old) / n_vt
    from_on = np.where(arg > 0, v_old + n_vt * np.log(np.maximum(arg, 1e-300)), v_crit)
    from_off = n_vt * np.log(np.maximum(v_new / n_vt, 1e-300))
    limited = np.where(v_old > 0, from_on, from_off)
    return np.where(big, limited, v_new)


# --- BJT -----------------------------------------------------------------------------------

def bjt_is_from_vbe(vbe: float, current: float, vt: float = VT_REF) -> float:
    """Transport saturation current Is (A) from Vbe (V) at collector current (A):
    Ic = Is·(exp(Vbe/Vt) − 1) in the forward-active region."""
    return current / math.expm1(vbe / vt)


def bjt_currents(vbe: np.ndarray, vbc: np.ndarray, i_s: np.ndarray, bf: np.ndarray,
                 br: np.ndarray, vt: float = VT_REF) -> dict[str, np.ndarray]:
    """Ebers–Moll transport model (SPICE Gummel–Poon with only IS, BF, BR).

    For an NPN (a PNP passes its voltages and takes its currents with the sign flipped):

        If = Is·(exp(Vbe/Vt) − 1),  Ir = Is·(exp(Vbc/Vt) − 1)
        Ic = If − Ir − Ir/BR,       Ib = If/BF + Ir/BR

    Returns ``ic``, ``ib`` (A, into the terminals) and the derivatives ``dic_dvbe``,
    ``dic_dvbc``, ``dib_dvbe``, ``dib_dvbc`` (S). Saturation (both junctions forward) comes
    out of the equations: Ic falls below BF·Ib.
    """
    ef, gef = limited_exp(vbe / vt)
    er, ger = limited_exp(vbc / vt)
    i_f = i_s * (ef - 1.0)
    i_r = i_s * (er - 1.0)
    gf = i_s * gef / vt
    gr = i_s * ger / vt
    return {
        "ic": i_f - i_r - i_r / br,
        "ib": i_f / bf + i_r / br,
        "dic_dvbe": gf,
        "dic_dvbc": -gr * (1.0 + 1.0 / br),
        "dib_dvbe": gf / bf,
        "dib_dvbc": gr / br,
    }


# --- MOSFET --------------------------------------------------------------------------------

def mosfet_kp_from_rds_on(rds_on: float, vgs: float, vth: float) -> float:
    """KP (A/V²) from on-resistance: in the triode region at small Vds,
    Rds = 1/(KP·(Vgs − Vth)), so KP = 1/(Rds_on·(Vgs − Vth))."""
    if vgs <= vth:
        raise ValueError(f"rds_on gate drive {vgs:g} V is not above threshold {vth:g} V")
    return 1.0 / (rds_on * (vgs - vth))


def _forward_mosfet(vgs: np.ndarray, vds: np.ndarray, vto: np.ndarray, kp: np.ndarray,
                    lam: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Level 1 for Vds ≥ 0: (Id, gm, gds)."""
    vov = vgs - vto
    on = vov > 0
    triode = on & (vds < vov)
    clm = 1.0 + lam * vds
    core_t = vov * vds - 0.5 * vds * vds
    core_s = 0.5 * vov * vov
    core = np.where(triode, core_t, core_s)
    i_d = np.where(on, kp * core * clm, 0.0)
    gm = np.where(on, kp * np.where(triode, vds, vov) * clm, 0.0)
    gds = np.where(on, kp * (np.where(triode, vov - vds, 0.0) * clm + lam * core), 0.0)
    return i_d, gm, gds


def mosfet_current(vgs: np.ndarray, vds: np.ndarray, vto: np.ndarray, kp: np.ndarray,
                   lam: np.ndarray | float = 0.0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Shichman–Hodges (SPICE level 1, W/L = 1) drain current (A) and gm, gds (S).

    Cut-off Vgs ≤ Vto: Id = 0. Triode 0 ≤ Vds < Vgs − Vto:
    Id = KP·((Vgs − Vto)·Vds − Vds²/2)·(1 + λ·Vds). Saturation:
    Id = KP/2·(Vgs − Vto)²·(1 + λ·Vds). For Vds < 0 drain and source swap roles.
    An N-MOSFET takes its voltages as they are, a P-MOSFET with the signs flipped.
    """
    vgs, vds = np.asarray(vgs, float), np.asarray(vds, float)
    lam = np.asarray(lam, float)
    reverse = vds < 0
    vgs_eff = np.where(reverse, vgs - vds, vgs)
    vds_eff = np.abs(vds)
    i_f, gm_f, gds_f = _forward_mosfet(vgs_eff, vds_eff, vto, kp, lam)
    i_d = np.where(reverse, -i_f, i_f)
    gm = np.where(reverse, -gm_f, gm_f)
    gds = np.where(reverse, gm_f + gds_f, gds_f)
    return i_d, gm, gds
