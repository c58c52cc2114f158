"""Electrical figures of parts, as the analysis uses them (all SI floats).

These frozen records are the contract between :mod:`linter.parts` (which fills them from
settings, parts files, the BOM and generic defaults) and the analysis (topology, solve,
rules). A figure that came from a generic default rather than the part's own data is named
in ``assumed`` (field names), with ``note`` saying what was assumed in words, so that the
reports can say so (``unknown-part``). Unknown stays unknown: where no figure and no
sensible generic value exists the field is None and the consumer says it could not check.
"""

from __future__ import annotations

from typing import Literal, Mapping

from linter.records import record

__all__ = [
    "LedData",
    "BjtData",
    "MosfetData",
    "McuData",
    "ResistorData",
    "PartData",
    "Rail",
    "Ambient",
    "PartDataMap",
]

LedColor = Literal[
    "red", "orange", "amber", "yellow", "yellow-green", "green", "blue", "royal-blue",
    "white", "ir", "uv",
]


@record
class LedData:
    """An LED's datasheet figures (25 °C unless said).

    vf_typ, vf_min, vf_max : V at ``vf_test_current``.
    vf_test_current : A.
    if_max : A, continuous maximum; if_recommended : A, top of the recommended range.
    if_peak, if_peak_pulse, if_peak_duty : A, s, fraction: the pulsed rating and its terms.
    vr_max : V, reverse voltage rating. pd_max : W at 25 °C.
    tempco : V/K, Vf change per kelvin (negative).
    ideality, rs : Shockley emission coefficient n and series resistance in Ω, when known
        (a SPICE ``.model`` gives IS, N, RS; then ``spice_is`` is set and used directly).
    """

    color: str | None = None
    vf_typ: float | None = None
    vf_min: float | None = None
    vf_max: float | None = None
    vf_test_current: float | None = None
    if_max: float | None = None
    if_recommended: float | None = None
    if_peak: float | None = None
    if_peak_pulse: float | None = None
    if_peak_duty: float | None = None
    vr_max: float | None = None
    pd_max: float | None = None
    tempco: float | None = None
    ideality: float | None = None
    rs: float | None = None
    spice_is: float | None = None
    part_number: str | None = None
    assumed: tuple[str, ...] = ()
    note: str | None = None


@record
class BjtData:
    """A bipolar transistor: polarity, gain range (hfe at the operating current), Vbe at
    ``vbe_current`` (V, A), Vce_sat (V), ratings vce_max (V), ic_max (A), pd_max (W at 25 °C).
    ``spice_is``/``spice_bf`` when a SPICE ``.model`` gives them."""

    polarity: Literal["npn", "pnp"]
    hfe_min: float | None = None
    hfe_typ: float | None = None
    vbe: float | None = None
    vbe_current: float | None = None
    vce_sat: float | None = None
    vce_max: float | None = None
    ic_max: float | None = None
    pd_max: float | None = None
    spice_is: float | None = None
    spice_bf: float | None = None
    spice_br: float | None = None
    part_number: str | None = None
    assumed: tuple[str, ...] = ()
    note: str | None = None


@record
class MosfetData:
    """A MOSFET used as a switch: threshold vgs_th (V), rds_on (Ω) at gate drive rds_on_vgs
    (V), ratings vds_max (V), id_max (A), pd_max (W at 25 °C). ``spice_vto`` (V) and
    ``spice_kp`` (A/V²) when a SPICE ``.model`` gives VTO and KP."""

    polarity: Literal["nmos", "pmos"]
    vgs_th: float | None = None
    rds_on: float | None = None
    rds_on_vgs: float | None = None
    vds_max: float | None = None
    id_max: float | None = None
    pd_max: float | None = None
    spice_vto: float | None = None
    spice_kp: float | None = None
    part_number: str | None = None
    assumed: tuple[str, ...] = ()
    note: str | None = None


@record
class McuData:
    """A microcontroller's output pins: each pin is the supply behind ``output_resistance``
    (Ω). pin_current_max and package_current_max in A; supply_pins / ground_pins name the
    pins whose nets give the supply voltage; ``supply_voltage`` (V) when given directly."""

    pin_current_max: float | None = None
    package_current_max: float | None = None
    output_resistance: float | None = None
    supply_pins: tuple[str, ...] = ()
    ground_pins: tuple[str, ...] = ()
    supply_voltage: float | None = None
    part_number: str | None = None
    assumed: tuple[str, ...] = ()
    note: str | None = None


@record
class ResistorData:
    """A resistor: ohms (Ω) as the analysis uses it, tolerance (fraction), power rating (W at
    70 °C, before derating), package (``0603``), and where the rating came from
    (``power_source``: "part data", "BOM", "0603 chip size", "axial package", or None when
    unknown)."""

    ohms: float | None
    tolerance: float | None = None
    power: float | None = None
    package: str | None = None
    power_source: str | None = None
    part_number: str | None = None
    assumed: tuple[str, ...] = ()
    note: str | None = None


PartData = LedData | BjtData | MosfetData | McuData | ResistorData


@record
class Rail:
    """A net of known voltage: min, nom, max in V. ``inferred`` when read from the net's name
    rather than stated in the settings or a SPICE source; ``origin`` says where it came from."""

    name: str
    nom: float
    min: float
    max: float
    inferred: bool = False
    origin: str = ""

    def __post_init__(self) -> None:
        if not (self.min <= self.nom <= self.max):
            raise ValueError(f"rail {self.name}: need min <= nom <= max, got "
                             f"{self.min}, {self.nom}, {self.max}")

    @property
    def is_ground(self) -> bool:
        """True for a 0 V rail with no tolerance."""
        return self.min == self.nom == self.max == 0.0

    def __str__(self) -> str:
        if self.min == self.nom == self.max:
            return f"{self.nom:g} V"
        return f"{self.nom:g} V ({self.min:g}–{self.max:g} V)"


@record
class Ambient:
    """Ambient temperature range in °C; datasheet figures are at ``reference`` (25 °C)."""

    min: float = 0.0
    max: float = 40.0
    reference: float = 25.0


PartDataMap = Mapping[str, PartData]
"""Part data by part reference."""
