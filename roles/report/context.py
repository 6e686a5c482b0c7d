"""Result -> the plain values the report template shows (no computation of findings).

This module only selects, rounds and words what the pipeline found; the measures
themselves live in the stage modules.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..pipeline import Result

__all__ = ["build_context", "VOCABULARY", "TOP"]

#: How many rows a table in the PDF shows; the rest is in nodes.csv.
TOP = 12

VOCABULARY: dict[str, dict[str, str]] = {
    "organisation": {
        "member": "person",
        "members": "people",
        "Member": "Person",
        "Members": "People",
        "tie": "working tie",
        "ties": "working ties",
        "community": "team",
        "communities": "teams",
        "Community": "Team",
        "Communities": "Teams",
        "network": "organisation",
    },
    "supply": {
        "member": "firm",
        "members": "firms",
        "Member": "Firm",
        "Members": "Firms",
        "tie": "supply tie",
        "ties": "supply ties",
        "community": "cluster",
        "communities": "clusters",
        "Community": "Cluster",
        "Communities": "Clusters",
        "network": "supply network",
    },
    "general": {
        "member": "member",
        "members": "members",
        "Member": "Member",
        "Members": "Members",
        "tie": "tie",
        "ties": "ties",
        "community": "community",
        "communities": "communities",
        "Community": "Community",
        "Communities": "Communities",
        "network": "network",
    },
}


def _fmt(x: Any, digits: int = 2) -> str:
    if x is None:
        return "–"
    if isinstance(x, (float, np.floating)):
        if not np.isfinite(x):
            return "–"
        return f"{x:.{digits}f}"
    return str(x)


def _agreement_words(ari: float | None) -> str:
    # Bands are our own reading aid, not a published scale.
    if ari is None:
        return "could not be compared"
    if ari >= 0.8:
        return "largely agree"
    if ari >= 0.5:
        return "partly agree"
    if ari >= 0.2:
        return "agree only loosely"
    return "hardly agree"


def _communities(result: Result, v: dict[str, str]) -> list[dict[str, Any]]:
    g = result.graph
    und = g.to_undirected() if g.is_directed() else g
    table = result.nodes
    out = []
    for label, part in table[table.community > 0].groupby("community"):
        members = list(part.node)
        sub = und.subgraph(members)
        size = len(members)
        possible = size * (size - 1) / 2
        density = sub.number_of_edges() / possible if possible else 0.0
        links: dict[int, int] = {}
        comm = dict(zip(table.node, table.community, strict=True))
        for node in members:
            for nb in und.neighbors(node):
                c = comm[nb]
                if c != label and c > 0:
                    links[c] = links.get(c, 0) + 1
        key = part.sort_values(["within_z", "betweenness"], ascending=False).node.head(3)
        out.append(
            {
                "label": int(label),
                "size": size,
                "density": _fmt(density),
                "internal_ties": sub.number_of_edges(),
                "key_members": list(key),
                "links": ", ".join(
                    f"{v['Community']} {c} ({n})"
                    for c, n in sorted(links.items(), key=lambda kv: -kv[1])[:4]
                )
                or "none",
            }
        )
    out.sort(key=lambda c: -c["size"])
    return out


def _rows(result: Result, names: list[str]) -> list[dict[str, str]]:
    t = result.nodes.set_index("node")
    rows = []
    for name in names[:TOP]:
        r = t.loc[name]
        rows.append(
            {
                "node": name,
                "community": str(r.community),
                "role": r.role,
                "betweenness": _fmt(r.betweenness, 3),
                "participation": _fmt(r.participation),
                "within_z": _fmt(r.within_z),
                "dependents": str(int(r.dependents)),
                "agreement": _fmt(r.view_agreement),
            }
        )
    return rows


def build_context(
    result: Result,
    *,
    title: str,
    kind: str,
    paper: str,
    min_group_size: int,
    made: str,
) -> dict[str, Any]:
    """Everything the template needs, as strings, numbers and short lists."""
    s = result.summary
    v = VOCABULARY.get(kind, VOCABULARY["general"])
    views = s["views"]
    table = result.nodes
    spof = [d["node"] for d in s["single_points_of_failure"]]
    disagree = table[table.community > 0].sort_values("view_agreement").node.tolist()
    peripheral = (
        table[table.role == "peripheral"].sort_values("degree").node.tolist()
        if "peripheral" in set(table.role)
        else []
    )
    return {
        "title": title,
        "made": made,
        "paper": "A4" if paper == "a4" else "letter",
        "v": v,
        "kind": kind,
        "s": s,
        "min_group_size": min_group_size,
        "input_name": s["input"].get("file", "(given as a graph)"),
        "agreement_words": _agreement_words(views["ari"]),
        "ari": _fmt(views["ari"]),
        "nmi": _fmt(views["nmi"]),
        "communities": _communities(result, v),
        "bridges": _rows(result, s["bridges"]),
        "hubs": _rows(result, s["hubs"]),
        "spof": _rows(result, spof),
        "peripheral": _rows(result, peripheral),
        "disagree": _rows(result, disagree),
        "n_bridges": len(s["bridges"]),
        "n_hubs": len(s["hubs"]),
        "n_spof": len(spof),
        "top": TOP,
        "fmt": _fmt,
    }
