"""The rule registry refuses mistakes and every rule documents itself."""

import pytest

from linter.rules import Rule, RuleDefinitionError, all_rules, register


def test_every_rule_has_its_documentation_sections():
    rules = all_rules()
    assert rules, "no rules registered"
    for rule_id, rule in rules.items():
        doc = rule.documentation()
        assert rule.summary(), rule_id
        assert "**Anti-pattern**" in doc and "**Best practice**" in doc, rule_id
        assert rule.default_severity in ("error", "warning", "info"), rule_id


def test_duplicate_id_refused():
    existing = next(iter(all_rules()))

    class Copy(Rule):
        """Copy.

        **Anti-pattern**

        x

        **Best practice**

        y
        """

        id = existing

    with pytest.raises(RuleDefinitionError, match="already registered"):
        register(Copy)


def test_malformed_id_refused():
    class Bad(Rule):
        """Bad.

        **Anti-pattern**

        **Best practice**
        """

        id = "Bad_Rule"

    with pytest.raises(RuleDefinitionError, match="not kebab-case"):
        register(Bad)


def test_missing_sections_refused():
    class Thin(Rule):
        """Only a summary."""

        id = "thin-rule"

    with pytest.raises(RuleDefinitionError, match="docstring lacks"):
        register(Thin)
