"""Part kinds from references and descriptive text (common practice for reference letters)."""

import pytest

from linter.kinds import infer_kind


@pytest.mark.parametrize(
    ("ref", "value", "expected"),
    [
        # Reference-letter conventions are common practice (R resistor, C capacitor, Q transistor...).
        ("R12", "4k7", "resistor"),
        ("C3", "100n", "capacitor"),
        ("L1", "10u", "inductor"),
        ("FB1", "600R@100MHz", "link"),
        ("U4", "KM8C28", "ic"),
        ("J1", "12V IN", "connector"),
        ("SW2", None, "switch"),
        # An LED is known by a reference such as LED3 or by LED / colour words (common practice).
        ("LED3", None, "led"),
        ("D3", "RED", "led"),
        ("D8", "LED 0603 yellow", "led"),
        # A plain diode is not an LED.
        ("D19", "DSW100", "diode"),
        ("D1", "1N-type switching diode", "diode"),
        # Polarity words on a transistor.
        ("Q1", "NPN 45V", "npn"),
        ("Q2", "N-channel 30V", "nmos"),
        ("Q5", "P-CH MOSFET", "pmos"),
        ("Q6", "TN45S", "transistor"),
        # 0 Ω resistors are links (jumpers), common practice.
        ("R9", "0", "link"),
        ("R9", "0R", "link"),
        ("Z1", None, "other"),
    ],
)
def test_infer_kind(ref, value, expected):
    assert infer_kind(ref, value) == expected


def test_led_words_in_part_number_or_description():
    # Words anywhere in the descriptive fields mark an LED (common practice).
    assert infer_kind("D4", "LD0603", description="Blue indicator") == "led"
    assert infer_kind("D4", "LD0603", part_number="LED-GRN-0603") == "led"


def test_hierarchical_reference_uses_leaf():
    assert infer_kind("S2/R7", "1k") == "resistor"
