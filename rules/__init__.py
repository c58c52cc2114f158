"""The rule set, installed as ``linter.rules``: one module per rule, registered by decorator.

A rule is a class whose docstring is its documentation page: the first line is the summary,
then an **Anti-pattern** and a **Best practice** section. Metadata are class attributes.
The registry refuses a duplicate id, an id that is not kebab-case, or a docstring without
its sections, at import, naming the rule.
"""

from __future__ import annotations

import importlib
import inspect
import pkgutil
import re
from typing import TYPE_CHECKING, Any, ClassVar, Iterable

if TYPE_CHECKING:
    from linter.findings import Finding

__all__ = ["Rule", "register", "all_rules", "RuleDefinitionError"]

_ID = re.compile(r"^[a-z]+(?:-[a-z]+)*$")
_REQUIRED_SECTIONS = ("Anti-pattern", "Best practice")
_REGISTRY: dict[str, type["Rule"]] = {}


class RuleDefinitionError(Exception):
    """A rule class that breaks the registry's conventions (a programming error, not input)."""


class Rule:
    """Base of every rule. Subclasses set ``id``, ``default_severity`` and a docstring."""

    id: ClassVar[str] = ""
    default_severity: ClassVar[str] = "warning"
    aliases: ClassVar[tuple[str, ...]] = ()
    groups: ClassVar[tuple[str, ...]] = ()
    options: ClassVar[tuple[Any, ...]] = ()
    """Declared options (``linter.config.RuleOption``); settings naming others are refused."""

    def check(self, context: Any) -> Iterable["Finding"]:
        """The findings of this rule on an analysed board; never prints."""
        raise NotImplementedError

    @classmethod
    def documentation(cls) -> str:
        """The docstring, dedented: the rule's documentation page."""
        return inspect.cleandoc(cls.__doc__ or "")

    @classmethod
    def summary(cls) -> str:
        """The first line of the documentation page."""
        return cls.documentation().splitlines()[0] if cls.__doc__ else ""


def register(cls: type[Rule]) -> type[Rule]:
    """Class decorator adding a rule to the registry, refusing mistakes."""
    if not _ID.match(cls.id):
        raise RuleDefinitionError(f"{cls.__name__}: rule id {cls.id!r} is not kebab-case words")
    if cls.default_severity not in ("error", "warning", "info"):
        raise RuleDefinitionError(f"{cls.id}: unknown default severity {cls.default_severity!r}")
    doc = cls.documentation()
    missing = [section for section in _REQUIRED_SECTIONS if f"**{section}**" not in doc]
    if not doc or missing:
        raise RuleDefinitionError(f"{cls.id}: docstring lacks {', '.join(missing) or 'a summary'}")
    for name in (cls.id, *cls.aliases):
        if name in _REGISTRY and _REGISTRY[name] is not cls:
            raise RuleDefinitionError(f"{cls.id}: rule id {name!r} is already registered")
        _REGISTRY[name] = cls
    return cls


def all_rules() -> dict[str, type[Rule]]:
    """Every registered rule by id (aliases excluded), importing the rule modules on first call."""
    for module in pkgutil.iter_modules(__path__):
        importlib.import_module(f"{__name__}.{module.name}")
    return {rule_id: rule for rule_id, rule in _REGISTRY.items() if rule.id == rule_id}
