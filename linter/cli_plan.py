"""Whether ``ledlint check`` was asked about one board or several (several paths or a folder).

Kept apart from :mod:`linter.cli_many` so that checking one board does not load the batch
machinery (:mod:`linter.batch`, the combined reporter) at all.
"""

from __future__ import annotations

import argparse

from linter.errors import UsageError

__all__ = ["wants_many"]


def wants_many(args: argparse.Namespace) -> bool:
    """True when the command line names several paths or a folder.

    Raises
    ------
    UsageError
        ``--jobs`` below 1.
    """
    if args.jobs < 1:
        raise UsageError(f"ledlint check: --jobs {args.jobs}: give a whole number of 1 or more")
    return bool(args.more_netlists) or args.netlist.is_dir()
