"""Union–find over hashable names (net names joined by links), with path compression."""

from __future__ import annotations

from typing import Callable, Hashable

__all__ = ["UnionFind"]


class UnionFind:
    """Disjoint sets of names; a name never joined is its own set.

    >>> sets = UnionFind()
    >>> sets.join("A", "B"); sets.join("B", "C")
    >>> sets.find("A") == sets.find("C"), sets.find("A") == sets.find("D")
    (True, False)
    """

    def __init__(self) -> None:
        self.parent: dict[Hashable, Hashable] = {}

    def find(self, name: Hashable) -> Hashable:
        """The representative of ``name``'s set."""
        root = name
        while self.parent.get(root, root) != root:
            root = self.parent[root]
        while name != root:  # path compression
            self.parent[name], name = root, self.parent.get(name, root)
        return root

    def join(self, a: Hashable, b: Hashable,
             keep: Callable[[Hashable], bool] | None = None) -> None:
        """Merge the sets of ``a`` and ``b``; a root for which ``keep`` is true stays root."""
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return
        if keep is not None and keep(rb) and not keep(ra):
            ra, rb = rb, ra
        self.parent[rb] = ra
