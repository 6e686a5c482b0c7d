"""Which role findings the report may state, and the single points of failure in full.

Hub-like and bridge-like are read against the communities; :func:`roles_withheld`
says when there is nothing to read them against. :func:`single_points` lists the
members with dependents and names whom each would cut off.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import networkx as nx
import pandas as pd

__all__ = ["SinglePoint", "Withheld", "roles_withheld", "single_points"]


@dataclass(frozen=True)
class Withheld:
    """Why hub-like and bridge-like members are not reported.

    Attributes
    ----------
    reason : {'no groups', 'structure not clear'}
    z : float
        The structure test's z (NaN when it did not run); the sentence is written by
        :func:`roles.report.notes.withheld_explanation`.
    """

    reason: str
    z: float = float("nan")


def roles_withheld(grouped: bool, structure: Any) -> Withheld | None:
    """Why hub-like and bridge-like members are not reported, or None when they are.

    Both labels are read against the communities, so they are findings only when there
    are communities and the structure test (when it ran) found them clear.

    Parameters
    ----------
    grouped : bool
        Whether the chosen view found any groups.
    structure : StructureTest or None
        The structure test of :mod:`roles.analysis.confidence`; None when it did not run.

    Returns
    -------
    Withheld or None
    """
    if not grouped:
        return Withheld("no groups")
    if structure is not None and structure.tested and not structure.clear:
        return Withheld("structure not clear", float(structure.z))
    return None


@dataclass(frozen=True)
class SinglePoint:
    """A member whose loss cuts others off.

    Attributes
    ----------
    node : str
    dependents : int
        Members cut off (dominated in a directed network, beyond a cut vertex otherwise).
    cut_off : tuple of str
        Their names, sorted.
    one_tie_each : bool
        Every member cut off has a single recorded tie: thin evidence.
    """

    node: str
    dependents: int
    cut_off: tuple[str, ...]
    one_tie_each: bool

    def as_summary(self) -> dict[str, Any]:
        """The entry of ``summary.json['single_points_of_failure']``."""
        return {
            "node": self.node,
            "dependents": self.dependents,
            "cut_off": list(self.cut_off),
            "one_tie_each": self.one_tie_each,
        }


def single_points(graph: nx.Graph, nodes: pd.DataFrame, top: int = 50) -> list[SinglePoint]:
    """The ``top`` members with the most dependents, with whom each would cut off.

    ``cut_off`` follows :func:`roles.analysis.whatif.what_if` (all names, sorted);
    ``one_tie_each`` is True when every member cut off has a single recorded tie (one
    neighbour, whatever the direction): thin evidence, as one missing record would
    undo it.
    """
    from .whatif import cut_off_each

    worst = nodes[nodes.dependents > 0].sort_values("dependents", ascending=False, kind="stable")
    names = [str(v) for v in worst.node.head(top)]
    cut = cut_off_each(graph, names)
    und = graph.to_undirected(as_view=True) if graph.is_directed() else graph

    def neighbours(v: str) -> int:
        return sum(1 for w in und.adj[v] if w != v)

    out = []
    for v, d in zip(names, worst.dependents.head(top), strict=True):
        gone = list(cut[v])
        out.append(
            SinglePoint(
                node=v,
                dependents=int(d),
                cut_off=tuple(gone),
                one_tie_each=bool(gone) and all(neighbours(w) == 1 for w in gone),
            )
        )
    return out
