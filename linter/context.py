"""What every rule reads: the enriched circuit, settings, rails, part data, BOM and groups.

:class:`AnalysisContext` is built once by the engine and handed to each rule's ``check``.
It is frozen; later analysis stages (topology, solve) add their results with
:func:`dataclasses.replace` (``groups``).
"""

from __future__ import annotations

from dataclasses import field
from typing import TYPE_CHECKING, Any, Mapping

from linter.model import Circuit
from linter.partdata import PartData, Rail
from linter.records import record

if TYPE_CHECKING:
    from linter.bom_join import BomDiscrepancy
    from linter.config import Settings
    from linter.readers.bom import Bom

__all__ = ["AnalysisContext", "rule_id_of"]

_MISSING = object()


def rule_id_of(rule: Any) -> str:
    """The id of a rule given as an instance, a class or the id itself."""
    return rule if isinstance(rule, str) else rule.id


@record
class AnalysisContext:
    """The analysed board, as every rule sees it.

    Attributes
    ----------
    circuit : Circuit
        After BOM and part data: kinds, part numbers and BOM properties applied.
    settings : Settings
    rails : Mapping[str, Rail]
        Nets of known voltage (settings, SPICE sources, net names).
    part_data : Mapping[str, PartData]
        Figures by part reference (LEDs, resistors, transistors, microcontrollers).
    bom : Bom or None
        The BOM when one was given.
    bom_discrepancies : tuple of BomDiscrepancy
    groups : tuple
        LED groups with their solved operating points (empty until group analysis runs).
    """

    circuit: Circuit
    settings: "Settings"
    rails: Mapping[str, Rail] = field(default_factory=dict, hash=False)
    part_data: Mapping[str, PartData] = field(default_factory=dict, hash=False)
    bom: "Bom | None" = None
    bom_discrepancies: tuple["BomDiscrepancy", ...] = ()
    groups: tuple = ()

    def enabled(self, rule: Any) -> bool:
        """False when ``[rules.ID] enabled = false``."""
        settings = self.settings.rules.get(rule_id_of(rule))
        return settings is None or settings.enabled is not False

    def severity(self, rule: Any, default: str | None = None) -> str:
        """The severity for a finding of ``rule``: ``[rules.ID] severity`` if set, else
        ``default`` (for rules with more than one level), else the rule's default severity."""
        settings = self.settings.rules.get(rule_id_of(rule))
        if settings is not None and settings.severity is not None:
            return settings.severity
        if default is not None:
            return default
        if isinstance(rule, str):
            from linter.rules import all_rules

            return all_rules()[rule].default_severity
        return rule.default_severity

    def option(self, rule: Any, name: str, default: Any = _MISSING) -> Any:
        """Option ``name`` of ``rule``: the settings' value, else the rule's declared default,
        else ``default``; a LookupError names an option that has none of these."""
        settings = self.settings.rules.get(rule_id_of(rule))
        if settings is not None and name in settings.options:
            return settings.options[name]
        rule_class = None if isinstance(rule, str) else rule
        for option in getattr(rule_class, "options", None) or ():
            if option.name == name:
                return option.default
        if default is _MISSING:
            raise LookupError(f"rule {rule_id_of(rule)} has no option {name!r}")
        return default
