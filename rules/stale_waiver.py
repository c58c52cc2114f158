"""Rule ``stale-waiver``: a waiver in the settings that has expired or waives nothing."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.rules import Rule, register


@register
class StaleWaiver(Rule):
    """A ``[[waive]]`` entry that has expired or no longer matches any finding.

    Waivers record accepted findings with a reason. One whose ``until`` date has passed stops
    applying (the finding it covered comes back); one that matches no finding is dead weight
    that may hide a future problem on the same parts. The engine reports both after every
    other rule has run, because only then is it known what each waiver matched; this class
    carries the documentation and the ``[rules.stale-waiver]`` settings.

    **Anti-pattern**

    A ``[[waive]]`` for ``shared-ballast`` on D7 and D8 left in place after R6 was split into
    four resistors.

    **Best practice**

    Give each waiver an ``until`` date and delete it once its finding is gone.
    """

    id = "stale-waiver"
    default_severity = "info"

    def check(self, context: Any) -> Iterable[Finding]:
        """Nothing here: :func:`linter.waivers.apply_waivers` produces these findings."""
        return ()
