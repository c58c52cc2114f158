"""Computed fixes: resistor for a current, power rating, derating, NPN sink, rails."""

import doctest
import math

import pytest
from hypothesis import assume, given, strategies as st

from linter import eseries, fixes, fixes_rating, fixes_resistor, fixes_sink
from linter.fixes import (
    collector_current, derated_resistor_rating, derated_transistor_rating, line_current,
    per_led_resistors, rail_for_resistor, rail_for_sink, resistor_for_current,
    resistor_for_current_solved, resistor_rating, sink_design,
)
from linter.partdata import BjtData


@pytest.mark.parametrize("module", [fixes_rating, fixes_resistor, fixes_sink])
def test_docstring_examples_hold(module):
    failures, attempted = doctest.testmod(module)
    assert attempted > 0 and failures == 0


def test_fixes_gathers_every_public_function():
    for module in (fixes_rating, fixes_resistor, fixes_sink):
        for name in module.__all__:
            assert getattr(fixes, name) is getattr(module, name), name


# --- resistor for a current -------------------------------------------------------------

def test_five_volts_minus_two_over_150_ohms_is_20_ma():
    # Common practice: 5 V minus 2 V over 150 Ω is 20 mA.
    assert line_current(5.0, 2.0, 150.0) == pytest.approx(0.020)
    choice = resistor_for_current(5.0, 2.0, 0.020, "E24", 0.0)
    assert choice.ohms == 150.0  # 3 V / 20 mA = 150 Ω, an E24 value (IEC 60063)
    assert choice.current_max_a == pytest.approx(0.020)


def test_own_tolerance_pushes_to_next_value():
    # By hand: R_min = 3 V / (20 mA · 0.95) = 157.9 Ω; next E24 value is 160 Ω (IEC 60063).
    choice = resistor_for_current(5.0, 2.0, 0.020, tolerance=0.05,
                                  v_nom=5.0, vf_sum_typ=2.0, v_min=4.75, vf_sum_max=2.4)
    assert choice.series == "E24" and choice.ohms == 160.0
    assert choice.current_max_a == pytest.approx(3.0 / (160 * 0.95))     # by hand, 19.7 mA
    assert choice.current_nom_a == pytest.approx(3.0 / 160)              # by hand, 18.75 mA
    assert choice.current_min_a == pytest.approx(2.35 / (160 * 1.05))    # by hand, 14.0 mA
    assert "160 Ω (E24, 5 %)" in choice.text


def test_pin_output_resistance_counts():
    # By hand: R_min = (3 V − 20 mA · 25 Ω)/(20 mA · 0.95) = 131.6 Ω → 150 Ω (E24 has 130, 150).
    choice = resistor_for_current(5.0, 2.0, 0.020, tolerance=0.05, r_series=25.0)
    assert choice.ohms == 150.0


def test_one_percent_parts_use_e96():
    # By hand: R_min = 3 V / (20 mA · 0.99) = 151.5 Ω → 154 Ω (IEC 60063 E96: 150, 154).
    choice = resistor_for_current(5.0, 2.0, 0.020, tolerance=0.01)
    assert (choice.series, choice.ohms) == ("E96", 154.0)


def test_no_resistor_limits_a_current_that_cannot_reach_the_target():
    assert resistor_for_current(2.0, 2.1, 0.020) is None
    assert resistor_for_current(2.5, 2.0, 0.020, r_series=30.0) is None  # 0.5 V / 30 Ω < 20 mA


@given(v=st.floats(3.0, 48.0), vf=st.floats(1.5, 12.0), i=st.floats(1e-3, 0.1),
       tol=st.sampled_from([0.01, 0.02, 0.05, 0.1]), rs=st.floats(0.0, 50.0))
def test_chosen_resistor_is_the_smallest_that_meets_the_target(v, vf, i, tol, rs):
    assume(v - vf - i * rs > 0.05)
    choice = resistor_for_current(v, vf, i, tolerance=tol, r_series=rs)
    # Definition I = (V − ΣVf)/(R·(1 − t) + R_s), evaluated here independently.
    assert (v - vf) / (choice.ohms * (1 - tol) + rs) <= i * (1 + 1e-9)
    lower = eseries.below(choice.ohms / 1.001, choice.series)
    assert (v - vf) / (lower * (1 - tol) + rs) > i


def _led_string_current(v_max, count, ohms, tol):
    """Worst-case current of ``count`` LEDs with a Shockley curve (n = 2, Is = 1e-18 A,
    Vt = 25.85 mV at 300 K from scipy.constants k·T/q), solved by bisection (independent)."""
    n_vt = 2 * 0.025852
    low, high = 0.0, v_max / (ohms * (1 - tol))
    for _ in range(200):
        mid = (low + high) / 2
        vf = count * n_vt * math.log(mid / 1e-18 + 1)
        if vf + mid * ohms * (1 - tol) > v_max:
            high = mid
        else:
            low = mid
    return low


def test_solver_search_finds_smallest_value_meeting_target():
    target = 0.020

    def current(ohms):
        i_max = _led_string_current(13.2, 4, ohms, 0.05)
        return (i_max * 0.9, i_max * 0.8, i_max)

    choice = resistor_for_current_solved(current, target, r_start=10.0, tolerance=0.05)
    assert current(choice.ohms)[2] <= target
    assert current(eseries.below(choice.ohms / 1.001, "E24"))[2] > target
    # Starting above the answer finds the same value by stepping down.
    again = resistor_for_current_solved(current, target, r_start=2000.0, tolerance=0.05)
    assert again.ohms == choice.ohms


def test_solver_search_gives_up_when_no_value_suffices():
    assert resistor_for_current_solved(lambda r: (1.0, 1.0, 1.0), 0.02, 100.0,
                                       max_steps=20) is None


def test_per_led_resistors():
    # Common practice: four LEDs at 20 mA on one resistor put 80 mA through it; one resistor
    # each of 150 Ω (3 V / 20 mA, by hand) gives each its own 20 mA.
    fix = per_led_resistors(4, 5.0, 2.0, 0.020, "E24", 0.0, v_nom=5.0, vf_sum_typ=2.0)
    assert fix.count == 4 and fix.choice.ohms == 150.0
    assert fix.text.startswith("one resistor per LED: 4 × 150 Ω")
    with pytest.raises(ValueError):
        per_led_resistors(0, 5.0, 2.0, 0.02)


# --- rails ------------------------------------------------------------------------------

def test_rail_for_resistor_meets_swing_ratio_exactly():
    vf_min, vf_max, q, t, a, b = 7.2, 9.6, 1.5, 0.05, 1.05, 0.95
    volts = rail_for_resistor(vf_min, vf_max, q, rail_min_ratio=b, rail_max_ratio=a,
                              resistor_tolerance=t)
    # Definition I = (V − ΣVf)/R at the extreme corners; R cancels in the ratio.
    ratio = ((a * volts - vf_min) / (1 - t)) / ((b * volts - vf_max) / (1 + t))
    assert ratio == pytest.approx(q)
    # A higher rail swings less.
    higher = volts * 1.2
    assert ((a * higher - vf_min) / (1 - t)) / ((b * higher - vf_max) / (1 + t)) < q


def test_rail_for_resistor_none_when_rail_tolerance_alone_is_too_wide():
    # ±20 % on the rail: 1.2/0.8 = 1.5 already, by hand.
    assert rail_for_resistor(2.0, 2.2, 1.5, rail_min_ratio=0.8, rail_max_ratio=1.2) is None
    assert rail_for_resistor(2.0, 2.2, 1.5, rail_min_ratio=0.75, rail_max_ratio=1.25) is None


def test_rail_for_sink():
    # DESIGN electrical model: rail_min = ΣVf(max) + Ie·Re + Vce_sat; 8 + 1.8 + 0.2 by hand.
    assert rail_for_sink(8.0, 1.8, 0.2) == pytest.approx(10.0)


# --- derating and ratings ---------------------------------------------------------------

def test_resistor_derating_curve():
    # Common practice (thick film): full to 70 °C, zero at 155 °C, linear between.
    assert derated_resistor_rating(0.25, 70.0, 1.0) == pytest.approx(0.25)
    assert derated_resistor_rating(0.25, 112.5, 1.0) == pytest.approx(0.125)
    assert derated_resistor_rating(0.25, 155.0, 1.0) == 0.0
    assert derated_resistor_rating(0.25, 40.0, 0.6) == pytest.approx(0.15)  # 60 % share


def test_transistor_derating_curve():
    # Common practice (small-signal packages): full at 25 °C, zero at 150 °C, linear between.
    assert derated_transistor_rating(0.3, 25.0, 1.0) == pytest.approx(0.3)
    assert derated_transistor_rating(0.3, -20.0, 1.0) == pytest.approx(0.3)  # never above rating
    assert derated_transistor_rating(0.3, 87.5, 1.0) == pytest.approx(0.15)
    assert derated_transistor_rating(0.3, 150.0, 0.6) == 0.0
    with pytest.raises(ValueError):
        derated_transistor_rating(0.3, 25.0, 1.5)


def test_resistor_rating_picks_smallest_package():
    # Chip ratings from memory; at 40 °C with a 60 % share: 0805 may take 75 mW, 1206 150 mW.
    choice = resistor_rating(0.12, 40.0, 0.6)
    assert (choice.package, choice.rating_w, choice.count) == ("1206", 0.25, 1)
    assert choice.text == "1206, 250 mW"
    assert resistor_rating(0.05, 40.0, 0.6).package == "0603"   # 0603 takes 60 mW
    assert resistor_rating(0.0, 40.0).package == "0201"


def test_resistor_rating_splits_when_nothing_is_big_enough():
    # 2512 (1 W) at 40 °C × 60 % takes 0.6 W: 1.5 W needs ⌈2.5⌉ = 3 parts (by hand).
    choice = resistor_rating(1.5, 40.0, 0.6)
    assert (choice.package, choice.count) == ("2512", 3)
    assert choice.text == "split across 3 parts of 2512, 1 W (500 mW each)"
    # At 112.5 °C the 2512 keeps half: 0.3 W each, so 0.5 W needs two (by hand).
    assert resistor_rating(0.5, 112.5, 0.6).count == 2
    assert resistor_rating(0.01, 160.0) is None


# --- NPN sink ---------------------------------------------------------------------------

def test_collector_current_formula():
    # DESIGN electrical model, β → ∞: Ic = (Vth − Vbe)/Re = 1.8 V / 91 Ω = 19.8 mA by hand.
    assert collector_current(2.5, 500.0, 0.7, 91.0, math.inf) == pytest.approx(1.8 / 91)
    # Finite β: β/(β+1)·(Vth − Vbe)/(Re + Rth/(β+1)), numbers by hand: 100/101·1.8/(91 + 500/101).
    assert collector_current(2.5, 500.0, 0.7, 91.0, 100.0) == pytest.approx(0.018574, rel=1e-4)


def test_half_of_five_volts_gives_91_ohm_sink():
    # Common practice: a base at half of 5 V gives about 1.8 V on the emitter, so 91 Ω
    # (the E24 value next to 90 Ω) sets about 20 mA.
    design = sink_design(11.4, 8.0, 0.020, 5.0, v_rail_max=13.2, vf_string_min=7.2,
                         reference_name="+5V")
    assert design.r_top == design.r_bottom           # half of 5 V
    assert design.v_base == pytest.approx(2.5)
    assert design.r_emitter == 91.0
    assert design.v_emitter == pytest.approx(1.8, abs=0.1)
    assert design.current_nom_a == pytest.approx(0.020, rel=0.05)
    assert design.current_nom_a <= 0.020
    assert design.text.startswith(f"NPN sink: divider {design.r_top / 1000:g} kΩ/")
    assert "from +5V, emitter 91 Ω (E24)" in design.text


def test_sink_rail_min_is_string_plus_emitter_plus_saturation():
    # Common practice: four red LEDs in series need about 8 V plus the emitter voltage plus
    # Vce_sat (DESIGN: rail_min = ΣVf(max) + Ie·Re + Vce_sat).
    design = sink_design(11.4, 8.0, 0.020, 5.0, reference_name="+5V")
    assert design.rail_min_v == pytest.approx(8.0 + design.v_emitter_max + 0.2)
    assert 9.5 < design.rail_min_v < 10.5  # about 8 + 1.8..2 + 0.2 V
    assert design.regulates


def test_sink_divider_carries_ten_times_base_current():
    transistor = BjtData(polarity="npn", hfe_min=50.0, hfe_typ=120.0, vbe=0.65, vce_sat=0.1)
    design = sink_design(11.4, 8.0, 0.030, 5.0, transistor=transistor)
    # Common practice: divider current at least ten times the worst-case base current.
    assert design.divider_current_a >= 10 * 0.030 / 50.0
    assert design.assumed == ()
    assert design.current_min_a < design.current_nom_a < design.current_max_a


def test_sink_emitter_held_to_headroom():
    # Rail min 10.5 V, string 9.6 V, Vce_sat 0.2 V (generic): 0.7 V left for the emitter.
    design = sink_design(10.5, 9.6, 0.020, 5.0, v_rail_max=12.6)
    assert design.v_emitter < 0.8
    assert design.assumed  # generic NPN figures are named


def test_sink_that_cannot_regulate_says_so():
    design = sink_design(9.0, 9.6, 0.020, 5.0)
    assert not design.regulates and design.rail_min_v > 9.6


def test_sink_dissipation_at_rail_max():
    design = sink_design(11.4, 8.0, 0.020, 5.0, v_rail_max=13.2, vf_string_min=7.2)
    # Q drops what the string and emitter leave at the top rail: (13.2 − 7.2 − Ve)·Ic.
    bound = (13.2 - 7.2) * design.current_max_a
    assert 0 < design.transistor_power_w <= bound


def test_sink_refused_when_reference_cannot_bias():
    assert sink_design(11.4, 8.0, 0.020, 1.0) is None


def test_sink_needs_an_npn():
    with pytest.raises(ValueError, match="needs an NPN"):
        sink_design(11.4, 8.0, 0.020, 5.0, transistor=BjtData(polarity="pnp"))


def test_sink_search_keeps_a_preferred_sink_within_the_limit():
    from linter.fixes import current_ratio, sink_search

    # 12 V ±10 % rail, two white LEDs (ΣVf 5.8–6.8 V), 20 mA, 5 V ±2 % reference (from
    # memory); the limit is set just above the preferred sink's own swing
    preferred = sink_design(10.8, 6.8, 0.020, 5.0, v_rail_max=13.2, vf_string_min=5.8,
                            reference_name="+5V", reference_tolerance=0.02)
    limit = current_ratio(preferred) * 1.001
    search = sink_search(limit, 10.8, 6.8, 0.020, 5.0, v_rail_max=13.2, vf_string_min=5.8,
                         reference_name="+5V", reference_tolerance=0.02)
    assert search.design == preferred == search.preferred


def test_sink_search_lifts_the_emitter_until_the_swing_fits():
    from linter.fixes import current_ratio, sink_search

    kwargs = dict(v_rail_max=13.2, vf_string_min=5.8, reference_name="+5V",
                  reference_tolerance=0.02)
    search = sink_search(1.45, 10.8, 6.8, 0.020, 5.0, **kwargs)
    assert current_ratio(search.preferred) > 1.45
    design = search.design
    assert design is not None and design.regulates
    # Sink equation Ie = (Vb − Vbe)/Re at the corners the design names (β unbounded at the
    # top, β_min 100 at the bottom; Vbe 0.7 ± 0.1 V generic, from memory)
    t = 0.05 if design.series == "E24" else 0.01
    vb_high = 5.0 * 1.02 * design.r_bottom * (1 + t) / (design.r_top * (1 - t)
                                                        + design.r_bottom * (1 + t))
    top, bottom = design.r_top * (1 + t), design.r_bottom * (1 - t)
    vb_low = 5.0 * 0.98 * bottom / (top + bottom)
    i_high = (vb_high - 0.6) / (design.r_emitter * (1 - t))
    i_low = 100 / 101 * (vb_low - 0.8) / (design.r_emitter * (1 + t)
                                          + top * bottom / (top + bottom) / 101)
    assert i_high / i_low <= 1.45
    assert current_ratio(design) == pytest.approx(i_high / i_low, rel=1e-9)
    assert design.v_emitter > search.preferred.v_emitter


def test_sink_search_says_none_fits_where_the_reference_alone_swings_too_much():
    from linter.fixes import sink_search

    # Ie = (Vb − Vbe)/Re: with the reference ±20 % and Re ±1 % (the tightest the search
    # tries), Imax/Imin ≥ (1.2/0.8)·(1.01/0.99) = 1.53 for any divider, before the divider's
    # and the Vbe spread widen it
    search = sink_search(1.5, 11.4, 8.0, 0.020, 5.0, v_rail_max=13.2, vf_string_min=7.2,
                         reference_name="+5V", reference_tolerance=0.2)
    assert search.design is None and search.preferred is not None
    assert search.best_ratio >= (1.2 / 0.8) * (1.01 / 0.99) > 1.5
