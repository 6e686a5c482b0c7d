"""Result -> the plain values the report template shows.

This module selects, orders, rounds and words what the pipeline found, and lays out
the figures. It computes nothing the findings rest on: the measures live in the stage
modules. What it does count is presentation only: ties inside and between communities
(for the community map and table), a community's internal density, and, for the few
worst cases of a directed network, how many members lie downstream of them.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np
import pandas as pd

from ..analysis.confidence import CommunityStability, Stability, StructureTest
from ..analysis.findings import Withheld
from ..analysis.measures import BetweennessInfo
from ..io.summary import saved
from ..results import Findings, FormalGroups, Result
from . import figures
from .whatif import what_if_context

__all__ = ["build_context", "VOCABULARY", "TOP", "TOP_COMMUNITIES"]

#: How many rows a table in the PDF shows; the rest is in nodes.csv.
TOP = 12
#: Communities described one by one; smaller ones are summed into one row.
TOP_COMMUNITIES = 12
#: Circles on the community map; the rest are drawn as one "others" circle.
MAP_CIRCLES = 15
#: "Look at these first" says a member carries much of the traffic only when at least
#: this share of the shortest paths between others runs through it (betweenness; our
#: choice, one path in twenty). In the supplier demo the largest share is 0.0024.
TRAFFIC_FLOOR = 0.05
#: Final customers named per single point of failure; the rest are counted.
FINAL_NAMES = 6
#: Final customers of each list looked at for the names (summary.json lists as many).
FINAL_SEEN = 50
#: Largest network drawn whole, member by member. On the 6.3-inch text width, 300
#: members leave about 9 mm of figure per member (a 6.3 x 5.2 in figure), room for a
#: marker and its ties; beyond a few hundred, ties run into one grey mass and a
#: reader can no longer follow them (common practice; our own reading).
NETWORK_FIGURE_MAX = 300
#: Members without ties named in the report; all are in nodes.csv.
TOP_ISOLATED = 30

_BASE = {
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
    "upstream": "upstream",
    "downstream": "downstream",
    "if_lost": "if removed",
    "sources": "every source (a member no tie points to)",
    "path": "path from one",
    "hub_text": "many ties meet at this one member",
    "its": "its",
    "it": "it",
    "periphery": "a member at the edge of the network, or ties that were not recorded",
    "direction": "directed: each points from the first member of its row to the second",
}

VOCABULARY: dict[str, dict[str, str]] = {
    "organisation": {
        **_BASE,
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
        "if_lost": "if unavailable",
        "sources": "everyone no working tie points to",
        "hub_text": "much of the team's work may run through this one person",
        "its": "their",
        "it": "them",
        "periphery": "a newcomer, a specialist, part-time work or simply working ties that "
        "were not recorded",
        "direction": "directed: each points from the first person of its row to the second "
        "(for instance from the one who named the tie to the one named)",
    },
    "supply": {
        **_BASE,
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
        "upstream": "towards its suppliers",
        "downstream": "towards its customers",
        "if_lost": "if it fails",
        "sources": "every source of supply",
        "path": "supply path",
        "hub_text": "many supply ties meet at this one firm",
        "periphery": "a small or occasional supplier or customer, or supply ties that were "
        "not recorded",
        "direction": "directed: each points from supplier to customer",
    },
    "general": dict(_BASE),
}

#: How "Look at these first" says where a directed network's paths start, by --kind.
_SOURCES = {
    "supply": " from every source of supply",
    "organisation": " from every path that starts with someone no tie points to",
    "general": " from every source (a member no tie points to)",
}

_ROLE_ORDER = ("connector hub", "hub-like", "bridge-like", "peripheral", "member")


def _fmt(x: Any, digits: int = 2) -> str:
    if x is None:
        return "–"
    if isinstance(x, (bool, np.bool_)):
        return "yes" if x else "no"
    if isinstance(x, (int, np.integer)):
        return f"{int(x):,}"
    if isinstance(x, (float, np.floating)):
        if not np.isfinite(x):
            return "–"
        value = float(x)
        if abs(value) < 0.5 * 10.0**-digits:
            value = 0.0  # no "-0.000"
        return f"{value:.{digits}f}"
    return str(x)


def _agreement_words(ari: float | None) -> str:
    # Bands are our own reading aid, not a published scale.
    if ari is None or not np.isfinite(ari):
        return "could not be compared"
    if ari >= 0.8:
        return "largely agree"
    if ari >= 0.5:
        return "partly agree"
    if ari >= 0.2:
        return "agree only loosely"
    return "hardly agree"


def _nmi_words(nmi: float) -> str:
    # Our own reading aid, as above.
    if nmi >= 0.7:
        return "follow them closely"
    if nmi >= 0.4:
        return "partly follow them"
    return "cut across them"


# ------------------------------------------------------------------ communities


def _tie_counts(result: Result) -> tuple[dict[int, int], dict[tuple[int, int], int]]:
    """Ties inside each community and between each pair, counted once per tie."""
    g = result.graph
    und = g.to_undirected() if g.is_directed() else g
    comm = dict(zip(result.nodes.node, result.nodes.community.astype(int), strict=True))
    inside: dict[int, int] = {}
    between: dict[tuple[int, int], int] = {}
    for a, b in und.edges():
        ca, cb = comm[a], comm[b]
        if ca <= 0 or cb <= 0:
            continue
        if ca == cb:
            inside[ca] = inside.get(ca, 0) + 1
        else:
            key = (min(ca, cb), max(ca, cb))
            between[key] = between.get(key, 0) + 1
    return inside, between


def _group_label(attr: str, group: str) -> str:
    """A formal group as a reader says it: 'tier 4' for a short code, else its name."""
    return f"{attr} {group}" if len(group) <= 3 else group


def community_names(
    crosstab: Mapping[str, Mapping[str, int]], attribute: str, min_group_size: int
) -> dict[int, str]:
    """Each community named by the formal groups most of its members belong to.

    'mostly Assembly' when one group holds at least half of the community's members,
    'Sales and Design' when two hold at least 60% together, else 'mixed' (both bands
    are our own reading aid). Groups of fewer than ``min_group_size`` members are never
    named, so no name points at a small group.

    Parameters
    ----------
    crosstab : mapping
        Formal group -> community (as a string) -> members, as in summary.json.
    attribute : str
        The formal grouping's column name ('department', 'tier').
    min_group_size : int
        Smallest formal group that may be named.

    Returns
    -------
    dict
        Community number -> its name.

    Examples
    --------
    >>> cross = {"Assembly": {"1": 9, "2": 1}, "Sales": {"1": 1, "2": 4}, "X": {"2": 4}}
    >>> community_names(cross, "department", 5)
    {1: 'mostly Assembly', 2: 'mixed'}
    """
    sizes = {str(g): sum(int(n) for n in row.values()) for g, row in crosstab.items()}
    per: dict[int, dict[str, int]] = {}
    for g, row in crosstab.items():
        for col, n in row.items():
            if str(col) != "0" and int(n) > 0:
                per.setdefault(int(col), {})[str(g)] = int(n)
    names: dict[int, str] = {}
    for c, groups in per.items():
        total = sum(groups.values())
        ranked = sorted(
            ((g, n) for g, n in groups.items() if sizes[g] >= min_group_size),
            key=lambda gn: (-gn[1], gn[0]),
        )
        if ranked and ranked[0][1] >= 0.5 * total:
            names[c] = f"mostly {_group_label(attribute, ranked[0][0])}"
        elif len(ranked) >= 2 and ranked[0][1] + ranked[1][1] >= 0.6 * total:
            g1, g2 = ranked[0][0], ranked[1][0]
            short = len(g1) <= 3 and len(g2) <= 3  # 'tier 4 and 3', not 'tier 4 and tier 3'
            second = g2 if short else _group_label(attribute, g2)
            names[c] = f"{_group_label(attribute, g1)} and {second}"
        else:
            names[c] = "mixed"
    return dict(sorted(names.items()))


def _communities(result: Result, v: Mapping[str, str], names: Mapping[int, str]) -> dict[str, Any]:
    table = result.nodes
    found = table[table.community > 0]
    sizes = found.community.value_counts()
    order = sorted(sizes.index, key=lambda c: (-sizes[c], c))
    inside, between = _tie_counts(result)
    links: dict[int, dict[int, int]] = {c: {} for c in order}
    for (a, b), n in between.items():
        links[a][b] = n
        links[b][a] = n
    stab = result.confidence.stability if result.confidence is not None else None
    per = stab.communities if stab is not None else {}
    reruns = stab.runs if stab is not None else 0
    rows = []
    for c in order[:TOP_COMMUNITIES]:
        part = found[found.community == c]
        size = int(sizes[c])
        possible = size * (size - 1) / 2
        out_ties = sum(links[c].values())
        key = part.sort_values(["within_z", "degree"], ascending=False, kind="stable").node
        tied = sorted(links[c].items(), key=lambda kv: (-kv[1], kv[0]))[:3]
        rows.append(
            {
                "label": int(c),
                "name": names.get(int(c), ""),
                "size": size,
                "density": _fmt(inside.get(c, 0) / possible if possible else 0.0),
                "inside": _fmt(
                    inside.get(c, 0) / (inside.get(c, 0) + out_ties)
                    if inside.get(c, 0) + out_ties
                    else float("nan")
                ),
                "membership": _fmt(float(part.membership.mean())),
                "stability": _stability_words(per.get(int(c)), v),
                "key_members": list(key.head(3)),
                "links": [{"label": int(o), "ties": n} for o, n in tied],
            }
        )
    rest = order[TOP_COMMUNITIES:]
    rest_row = None
    if rest:
        rest_row = {
            "count": len(rest),
            "size": int(sizes[rest].sum()),
            "largest": int(sizes[rest].max()),
        }

    # The map: the largest communities as circles, the rest as one circle.
    shown = order[:MAP_CIRCLES]
    idx = {c: i for i, c in enumerate(shown)}
    k = len(shown) + (1 if len(order) > MAP_CIRCLES else 0)
    matrix = np.zeros((k, k))
    for (a, b), n in between.items():
        i, j = idx.get(a, k - 1), idx.get(b, k - 1)
        if i != j:
            matrix[i, j] += n
            matrix[j, i] += n
    map_sizes = [int(sizes[c]) for c in shown]
    labels = [f"{c} {names[c]}".replace(" mostly ", " ") if c in names else str(c) for c in shown]
    if len(order) > MAP_CIRCLES:
        map_sizes.append(int(sizes[order[MAP_CIRCLES:]].sum()))
        labels.append(f"{len(order) - MAP_CIRCLES} others")
    figure = None
    if len(order) >= 2:
        figure = figures.community_map(map_sizes, matrix, labels, words=v)
    return {
        "rows": rows,
        "rest": rest_row,
        "count": len(order),
        "map": figure,
        # Re-runs actually made: beyond the confidence budget's size limits there are
        # none, and every community's verdict is "not re-run".
        "has_stability": bool(per) and reruns > 0,
        "reruns_skipped": reruns == 0 and bool(result.budgets.confidence),
        "stable": sum(1 for x in per.values() if x.verdict == "stable"),
        "unstable": sorted(int(k) for k, x in per.items() if x.verdict == "unstable"),
        "median_confidence": _fmt(saved(stab.median_confidence) if stab is not None else None),
        "share_low": _fmt(100 * (_share_low(stab) or 0), 0),
        "reruns": reruns,
        "between_ties": int(sum(between.values())),
        "inside_ties": int(sum(inside.values())),
    }


def _share_low(stab: Stability | None) -> float | None:
    """Share of the members with ties whose confidence is below 0.5, as saved."""
    if stab is None:
        return None
    c = stab.confidence[np.isfinite(stab.confidence)]
    return saved(np.mean(c < 0.5)) if c.size else None


def _stability_words(c: CommunityStability | None, v: Mapping[str, str] = _BASE) -> str:
    """A community's re-run verdict (Hennig 2007 bands, from the pipeline) in words."""
    if c is None or c.verdict == "not re-run":
        return "–"
    words = {
        "stable": "stable",
        "pattern": f"recurs with varying {v['members']}",
        "unstable": "unstable",
    }
    return f"{words.get(c.verdict, c.verdict)} ({_fmt(saved(c.jaccard))})"


# ------------------------------------------------------------------------ roles


def _row(t: pd.DataFrame, name: str) -> dict[str, Any]:
    r = t.loc[name]
    out = {
        "node": name,
        "community": int(r.community),
        "role": str(r.role),
        "betweenness": _fmt(r.betweenness, 3),
        "participation": _fmt(r.participation),
        "within_z": _fmt(r.within_z),
        "constraint": _fmt(r.constraint),
        "effective_size": _fmt(r.effective_size, 1),
        "dependents": int(r.dependents),
        "degree": int(r.degree),
        "membership": _fmt(r.membership),
        "agreement": _fmt(r.view_agreement),
        "local_group": int(r.local_group),
        "far_group": int(r.far_group),
        "p": float(r.participation),
        "b": float(r.betweenness),
    }
    return out


def _role_words(role: str, n: int) -> str:
    """'188 members', '2 hub-like', '1 without ties'."""
    plural = {"member": "members", "connector hub": "connector hubs", "isolated": "isolated"}
    if role == "no ties":
        return f"{n:,} without ties"
    return f"{n:,} {plural.get(role, role) if n != 1 else role}"


def _neighbour_communities(result: Result, name: str, own: int) -> list[int]:
    """The communities of ``name``'s neighbours other than its own, most ties first."""
    g = result.graph
    und = g.to_undirected() if g.is_directed() else g
    comm = result.nodes.set_index("node").community
    counts: dict[int, int] = {}
    for nb in und.neighbors(name):
        c = int(comm[nb])
        if c > 0 and c != own:
            counts[c] = counts.get(c, 0) + 1
    return [c for c, _ in sorted(counts.items(), key=lambda kv: (-kv[1], kv[0]))]


def _roles(result: Result, v: Mapping[str, str]) -> dict[str, Any]:
    found = result.findings
    t = result.nodes.set_index("node")
    connected = result.nodes[result.nodes.community > 0]
    bridges = [_row(t, n) for n in found.bridges[:TOP]]
    for r in bridges:
        r["reaches"] = _neighbour_communities(result, r["node"], r["community"])[:3]
    hubs = [_row(t, n) for n in found.hubs[:TOP]]
    traffic_all = found.traffic
    traffic = [_row(t, n) for n in traffic_all[:TOP]]
    withheld = found.roles_withheld
    periph_all = connected[connected.role == "peripheral"].sort_values(
        ["degree", "participation"], kind="stable"
    )
    peripheral = [_row(t, n) for n in periph_all.node.head(TOP)]
    counts = result.nodes.role.value_counts()
    ordered = [r for r in _ROLE_ORDER if r in counts.index] + sorted(
        r for r in counts.index if r not in _ROLE_ORDER
    )
    role_counts = [
        {"role": r, "count": int(counts[r]), "words": _role_words(r, int(counts[r]))}
        for r in ordered
    ]
    names = connected.node.tolist()
    pos = {n: i for i, n in enumerate(names)}
    annotate = [pos[n] for n in (found.hubs[:3] + found.bridges[:3]) if n in pos]
    figure = None
    if len(connected) and found.communities >= 2 and not withheld:
        figure = figures.role_map(
            connected.within_z.to_numpy(dtype=float),
            connected.participation.to_numpy(dtype=float),
            connected.role.astype(str).tolist(),
            names=names,
            annotate=annotate,
            words=v,
        )
    from ..analysis.measures import BRIDGE_SHARE, HUB_Z

    return {
        "hub_z": _fmt(HUB_Z, 1),
        "bridge_share": _fmt(100 * BRIDGE_SHARE, 0),
        "withheld": _withheld_words(withheld, v) if withheld else None,
        "traffic": traffic,
        "n_traffic": len(traffic_all),
        "traffic_small": bool(traffic) and traffic[0]["b"] < TRAFFIC_FLOOR,
        "traffic_floor": _fmt(TRAFFIC_FLOOR),
        "bridges": bridges,
        "hubs": hubs,
        "peripheral": peripheral,
        "n_bridges": len(found.bridges),
        "n_hubs": len(found.hubs),
        "n_peripheral": len(periph_all),
        "counts": role_counts,
        "map": figure,
    }


def _withheld_words(withheld: Withheld, v: Mapping[str, str]) -> str:
    """Why no member is called hub-like or bridge-like, in the report's words."""
    if withheld.reason == "no groups":
        return (
            f"no {v['communities']} were found, and hub-like and bridge-like only make sense "
            f"relative to {v['communities']}"
        )
    return (
        f"the {v['communities']} are not clearly stronger than in random networks (structure "
        f"test), so hub-like and bridge-like, which are read against the {v['communities']}, "
        "would rest on groups that may not be real"
    )


#: How many names of those cut off a sentence or table cell shows before a count.
CUT_NAMES = 3


def _cut_off_words(names: list[str]) -> str:
    """'A, B and C', or 'A, B, C and 4 more'."""
    if len(names) <= 1:
        return "".join(names)
    if len(names) <= CUT_NAMES:
        return f"{', '.join(names[:-1])} and {names[-1]}"
    return f"{', '.join(names[:CUT_NAMES])} and {len(names) - CUT_NAMES} more"


# ---------------------------------------------------------------- dependencies


def _dependencies(result: Result, v: Mapping[str, str]) -> dict[str, Any]:
    import networkx as nx

    t = result.nodes.set_index("node")
    entries = result.findings.single_points[:TOP]
    rows = [_row(t, d.node) for d in entries]
    for r, d in zip(rows, entries, strict=True):
        r["cut_off"] = _cut_off_words(list(d.cut_off))
        r["n_cut_off"] = len(d.cut_off)
        r["one_tie_each"] = d.one_tie_each
    directed = result.findings.directed
    reach = None
    if directed and rows:
        # Presentation only: how many members lie downstream at all, beside the
        # pipeline's count of those that depend on the node alone.
        reach = [len(nx.descendants(result.graph, r["node"])) for r in rows]
        for r, n in zip(rows, reach, strict=True):
            r["reach"] = n
    figure = None
    if rows:
        figure = figures.dependents_chart(
            [r["node"] for r in rows],
            [r["dependents"] for r in rows],
            reach=reach,
            directed=directed,
            words=v,
        )
    total = int((result.nodes.dependents > 0).sum())
    thin = any(r["one_tie_each"] for r in rows)
    finals = {f.node: f for f in result.final_customers or []}
    customers = []
    for r in rows:
        f = finals.get(r["node"])
        if f is None:
            continue
        r["final_reached"] = len(f.reached)
        r["final_cut_off"] = len(f.cut_off)
        # The others reached are sought among the first FINAL_SEEN of each list, as
        # summary.json gives them.
        cut = list(f.cut_off[:FINAL_SEEN])
        also = [n for n in f.reached[:FINAL_SEEN] if n not in set(cut)]
        customers.append(
            {
                "node": r["node"],
                "reached": len(f.reached),
                "cut_off": len(f.cut_off),
                "cut_names": cut[:FINAL_NAMES],
                "cut_more": len(f.cut_off) - len(cut[:FINAL_NAMES]),
                "also_names": also[:FINAL_NAMES],
                "also_more": len(f.reached) - len(f.cut_off) - len(also[:FINAL_NAMES]),
            }
        )
    return {
        "rows": rows,
        "figure": figure,
        "count": total,
        "directed": directed,
        "customers": customers,
        "thin": thin,
    }


# ----------------------------------------------------------------------- views


def _reading(r: Mapping[str, Any], moved: bool, grouped: bool, v: Mapping[str, str] = _BASE) -> str:
    """One line on what a low neighbour overlap usually means for this member."""
    it, its = v["it"], v["its"]
    if not grouped:
        if r["degree"] <= 2:
            return f"few ties, so neither view places {it} firmly"
        return f"{its} nearest neighbours differ between the views"
    if moved and r["p"] >= 0.5:
        return "ties in several groups, and each view sides with another: a go-between"
    if moved:
        return f"{its} close circle lies in one group, {its} wider region in another"
    if r["degree"] <= 2:
        return f"few ties, so neither view places {it} firmly"
    if r["membership_value"] < 0.5:
        return "held loosely by the group: near a boundary"
    if r["role"] in ("bridge-like", "connector hub"):
        return f"a bridge: {its} close circle mixes several groups"
    if r["role"] == "hub-like":
        return f"a hub with many ties: each view weighs {its} wide circle differently"
    if r["p"] > 0:
        return f"same group in both views; ties to other groups change {its} nearest neighbours"
    return f"same group in both views, different neighbours among {its} group-mates"


def _matched(cont: np.ndarray) -> dict[int, int]:
    """Local group -> the far group holding most of its members (1-based labels)."""
    return {i + 1: int(np.argmax(row)) + 1 for i, row in enumerate(cont) if row.sum() > 0}


def _views(result: Result, v: Mapping[str, str]) -> dict[str, Any]:
    found = result.findings
    comparison = result.comparison
    table = result.nodes
    t = table.set_index("node")
    connected = table[table.community > 0]
    cont = np.asarray(comparison.contingency if comparison else [], dtype=float)
    groups = {view: g.n_groups for view, g in result.groupings.items()}
    both = groups.get("local", 0) > 0 and groups.get("far", 0) > 0
    match = _matched(cont) if both and cont.ndim == 2 else {}
    # A member "moves" when its far group is not the one most of its local group is in:
    # the off-diagonal cells of the contingency figure.
    moved = np.array(
        [
            bool(match) and match.get(int(lg)) != int(fg)
            for lg, fg in zip(connected.local_group, connected.far_group, strict=True)
        ],
        dtype=bool,
    )
    ranked = (
        connected.assign(_moved=moved)
        .dropna(subset=["view_agreement"])
        .sort_values(
            ["_moved", "view_agreement", "membership"], ascending=[False, True, True], kind="stable"
        )
    )
    disagree = []
    for name, m in zip(ranked.node.head(TOP), ranked._moved.head(TOP), strict=True):
        r = _row(t, name)
        r["membership_value"] = float(t.loc[name].membership)
        r["moved"] = bool(m)
        r["reading"] = _reading(r, bool(m), both, v)
        disagree.append(r)
    contingency = None
    if cont.ndim == 2 and cont.size and both:
        contingency = figures.contingency_heatmap(
            cont,
            row_labels=[str(i + 1) for i in range(cont.shape[0])],
            col_labels=[str(j + 1) for j in range(cont.shape[1])],
            row_title="group in the local view",
            col_title="group in the far view",
            key="views",
            words=v,
            caption=(
                f"Rows are the groups of the local view, columns those of the far view; each "
                f"number counts the {v['members']} in both, and the darker a cell, the larger "
                "its share of the row. One dark cell per row: the views draw the same "
                "groups. A row spread over several columns: the far view splits what the "
                "local view keeps together (or the other way round)."
            ),
        )
    projection = None
    idx = connected.index.to_numpy()
    if len(idx) >= 3 and {"local", "far"} <= set(result.vectors):
        projection = figures.projections(
            {view: np.asarray(result.vectors[view])[idx] for view in ("local", "far")},
            connected.community.to_numpy(dtype=int),
            titles={"local": "Local view", "far": "Far view"},
            words=v,
        )
    params = result.record.config.views
    differ = result.confidence.views_differ if result.confidence is not None else None
    ari = comparison.ari if comparison else None
    return {
        "differ": differ,
        "ari": _fmt(ari),
        "nmi": _fmt(comparison.nmi if comparison else None),
        "words": _agreement_words(ari),
        "k": comparison.k if comparison else 0,
        "groups": groups,
        "noise": {
            view: _fmt(100 * round(g.noise_share, 4), 0) for view, g in result.groupings.items()
        },
        "contingency": contingency,
        "projection": projection,
        "disagree": disagree,
        "community_view": found.community_view,
        # The chosen view first.
        "modularity": sorted(
            ((view, _fmt(saved(q), 3)) for view, q in found.view_modularity.items()),
            key=lambda vq: vq[0] != found.community_view,
        ),
        "p_local": params["local"].p if "local" in params else None,
        "q_local": params["local"].q if "local" in params else None,
        "p_far": params["far"].p if "far" in params else None,
        "q_far": params["far"].q if "far" in params else None,
        "low_agreement": int((connected.view_agreement < 0.2).sum()),
        "moved": int(moved.sum()),
        # Our own reading aid: when the median member shares under a tenth of its
        # neighbours, the views say little about who is near whom.
        "weak": bool(len(connected) and float(connected.view_agreement.median()) < 0.1),
        "both": both,
        "connected": len(connected),
    }


# -------------------------------------------------------------- formal groups


_BROKER_KINDS = ("coordinator", "itinerant", "representative", "gatekeeper", "liaison")


def crosstab_counts(formal: FormalGroups) -> dict[str, dict[str, int]]:
    """Formal group -> community label -> members, names as strings (as in summary.json)."""
    return {
        str(k): {str(c): int(n) for c, n in row.items()} for k, row in formal.crosstab.iterrows()
    }


def _formal(result: Result, v: Mapping[str, str], min_group_size: int) -> dict[str, Any] | None:
    f = result.formal
    if f is None:
        return None
    cross = crosstab_counts(f)
    sizes = {str(g): int(sum(row.values())) for g, row in cross.items()}
    shown = sorted((g for g, n in sizes.items() if n >= min_group_size), key=lambda g: -sizes[g])
    hidden = [g for g in sizes if sizes[g] < min_group_size]
    ei = {str(g): round(float(x), 4) for g, x in f.ei_index.items() if str(g) in shown}
    attr = f.attribute
    expected = {str(k): saved(x) for k, x in f.ei_test["expected"].items()}
    verdict = {str(k): str(x) for k, x in f.ei_test["verdict"].items()}
    ei_rows: list[dict[str, Any]] = [
        {
            "group": g,
            "label": f"{attr} {g}" if len(g) <= 3 else g,
            "size": sizes[g],
            "ei": _fmt(ei[g]),
            "expected": _fmt(expected.get(g)),
            "gap": ei[g] - e if (e := expected.get(g)) is not None else 0.0,
            "verdict": str(verdict.get(g, "")),
            "reading": _EI_READING.get(str(verdict.get(g, "")), _ei_band(ei[g])),
        }
        for g in sorted(ei, key=lambda g: (ei[g], g))
    ]
    # Headlines: only groups whose E-I index differs clearly from what their size
    # predicts (roles.analysis.formal.ei_test), the largest gap first.
    inward = sorted((r for r in ei_rows if r["verdict"] == "more inward"), key=lambda r: r["gap"])
    outward = sorted(
        (r for r in ei_rows if r["verdict"] == "more outward"), key=lambda r: -r["gap"]
    )
    figure = None
    if shown and result.findings.communities >= 2:
        # Members without ties (community 0) are left out: in a small team such a cell
        # would point at one person.
        cols = sorted(
            {str(c) for g in shown for c in cross[g] if str(c) != "0"}, key=lambda c: (len(c), c)
        )
        table = np.array([[cross[g].get(c, 0) for c in cols] for g in shown], dtype=float)
        keep = table.sum(axis=0) > 0
        cols = [c for c, k in zip(cols, keep, strict=True) if k]
        table = table[:, keep]
        figure = figures.contingency_heatmap(
            table,
            row_labels=shown,
            col_labels=cols,
            row_title=f.attribute,
            col_title=v["community"],
            key="formal",
            words=v,
            caption=(
                f"Rows are the values of '{f.attribute}' given with the data, columns the "
                f"{v['communities']} found; each number counts {v['members']}, and the darker "
                f"a cell, the larger its share of the row. A row with one dark cell is one "
                f"{v['community']}; a row spread out works across {v['communities']}. "
                f"{v['Members']} without {v['ties']} are left out."
                + (
                    f" {len(hidden)} group{'s' if len(hidden) != 1 else ''} of fewer than "
                    f"{min_group_size} {v['members']} left out."
                    if hidden
                    else ""
                )
            ),
        )
    table = result.nodes
    brokers: list[dict[str, Any]] = []
    if all(k in table.columns for k in _BROKER_KINDS):
        between = table[["itinerant", "representative", "gatekeeper", "liaison"]].sum(axis=1)
        top = table.assign(_between=between)
        top = top[top._between > 0].sort_values("_between", ascending=False, kind="stable")
        for r in top.head(TOP).itertuples():
            group = str(getattr(r, attr)) if attr in table.columns else ""
            brokers.append(
                {
                    "node": r.node,
                    "group": group if sizes.get(group, 0) >= min_group_size else "(small group)",
                    **{k: int(getattr(r, k)) for k in _BROKER_KINDS},
                }
            )
    nmi = round(f.nmi, 4)
    if result.findings.communities < 2:
        nmi = float("nan")
    return {
        "cuts": _cuts(cross, shown, attr) if np.isfinite(nmi) else [],
        "attribute": attr,
        "nmi": _fmt(nmi),
        "nmi_words": _nmi_words(nmi) if np.isfinite(nmi) else "cannot be compared with it",
        "figure": figure,
        "ei": ei_rows,
        "inward": inward[0] if inward else None,
        "outward": outward[0] if outward else None,
        "tested": bool(verdict),
        "all_inward": len(inward) >= 2 and len(inward) == len(ei_rows),
        "no_inside": any(r["verdict"] == "no inside ties" for r in ei_rows),
        "hidden": len(hidden),
        "shown": len(shown),
        "brokers": brokers,
        **_broker_columns(table, result.findings.directed, v),
    }


_EI_READING = {
    "more inward": "more inward-looking than its size predicts",
    "more outward": "more outward-looking than its size predicts",
    "as sizes predict": "as its size predicts",
    "no inside ties": "no tie stays inside it (+1 by construction when ties only run "
    "between groups, as between supply tiers)",
    "no ties": "no ties",
}


def _ei_band(ei: float) -> str:
    """Reading of an E-I index without its expected value (older summaries)."""
    if not np.isfinite(ei):
        return "no ties"
    return "mostly inward" if ei < -0.33 else ("mostly outward" if ei > 0.33 else "mixed")


_BROKER_HEADS = {
    "coordinator": "Coordi&shy;nator",
    "itinerant": "Itinerant",
    "representative": "Represen&shy;tative",
    "gatekeeper": "Gate&shy;keeper",
    "liaison": "Liaison",
}


def _broker_columns(table: pd.DataFrame, directed: bool, v: Mapping[str, str]) -> dict[str, Any]:
    """The brokerage columns worth printing, and why the others are not.

    Without direction every path a - v - b is counted both ways, so representative and
    gatekeeper counts are equal (Gould & Fernandez 1989): one column holds both. A
    column that is zero for every member (in a tiered supply network, often four of
    the five) is left out and named in a note.
    """
    kinds = [k for k in _BROKER_KINDS if k in table.columns]
    if not directed:
        kinds = [k for k in kinds if k != "gatekeeper"]
    zero = [k for k in kinds if not (table[k] != 0).any()]
    heads = dict(_BROKER_HEADS)
    if not directed:
        heads["representative"] = "Represen&shy;tative or gate&shy;keeper"
    notes = []
    if not directed:
        notes.append(
            f"Without direction, a {v['member']} that passes its group's {v['ties']} out also "
            "lets others in: representative and gatekeeper counts are the same, shown once."
        )
    if zero:
        names = ", ".join(k for k in zero)
        notes.append(f"Zero for every {v['member']}, so not shown: {names}.")
    return {
        "broker_columns": [(k, heads[k]) for k in kinds if k not in zero],
        "broker_notes": notes,
    }


def _cuts(
    cross: Mapping[str, Mapping[str, int]], shown: list[str], attribute: str
) -> list[dict[str, Any]]:
    """Communities that draw substantially on more than one formal group.

    "Substantially": the second-largest group holds at least a fifth of the community
    (our own reading aid). Only groups of at least --min-group-size are counted.
    """
    by_comm: dict[str, dict[str, int]] = {}
    for g in shown:
        for c, n in cross[g].items():
            if str(c) != "0" and n > 0:
                by_comm.setdefault(str(c), {})[g] = int(n)
    out: list[dict[str, Any]] = []
    for c, groups in sorted(by_comm.items(), key=lambda kv: (-sum(kv[1].values()), kv[0])):
        ranked = sorted(groups.items(), key=lambda kv: (-kv[1], kv[0]))
        total = sum(groups.values())
        if len(ranked) >= 2 and ranked[1][1] >= 0.2 * total:
            parts = [{"group": g, "n": n, "label": _group_label(attribute, g)} for g, n in ranked]
            out.append({"community": c, "groups": parts[:3]})
    return out[:3]


# -------------------------------------------------------------------- method


def _flatten(d: Mapping[str, Any], prefix: str = "") -> list[tuple[str, str]]:
    out: list[tuple[str, str]] = []
    for k, val in d.items():
        name = f"{prefix}{k}"
        if isinstance(val, Mapping):
            out.extend(_flatten(val, name + "."))
        else:
            out.append((name, _fmt(val, 3) if isinstance(val, float) else str(val)))
    return out


_COUNT_WORDS = {
    "rows_read": "rows read",
    "blank_rows_skipped": "blank rows skipped",
    "self_loops_dropped": "{ties} from a {member} to itself dropped",
    "duplicate_edges_merged": "repeated {ties} merged (weights added)",
    "names_trimmed": "names with spaces trimmed",
    "columns_ignored": "columns ignored",
    "zero_weight_edges_dropped": "{ties} of weight zero dropped",
    "nodes": "{members} read",
    "edges": "{ties} kept",
    "nodes_only_in_nodes_file": "{members} only in the nodes file (kept without {ties})",
    "nodes_missing_from_nodes_file": "{members} missing from the nodes file",
    "names_normalised": "names in another Unicode form (decomposed accents) read as one",
    "lookalike_names": "names that look like another but differ by invisible characters "
    "(kept apart)",
    "nodes_lookalike_names": "names of the nodes file that look like a {member}'s but differ "
    "by invisible characters",
}


def _method(result: Result, v: Mapping[str, str]) -> dict[str, Any]:
    record = result.record
    inp = record.input

    def words(key: str) -> str:
        return _COUNT_WORDS.get(key, key.replace("_", " ")).format(**v)

    counts = [{"what": words(k), "n": _fmt(val)} for k, val in inp.get("counts", {}).items()]
    for key in (
        "nodes_only_in_nodes_file",
        "nodes_missing_from_nodes_file",
        "nodes_lookalike_names",
    ):
        if key in inp:
            counts.append({"what": words(key), "n": _fmt(inp[key])})
    for key, example in (
        ("lookalike_names", inp.get("lookalike_example")),
        ("nodes_lookalike_names", inp.get("nodes_lookalike_example")),
    ):
        for row in counts:
            if example and row["what"] == words(key):
                row["what"] += ", for example " + " and ".join(example)
    grouping = [
        {
            "view": view,
            "groups": g.n_groups,
            "min_size": g.min_cluster_size,
            "dims": g.dimensions,
            "noise": _fmt(100 * g.noise_share, 0),
        }
        for view, g in result.groupings.items()
    ]
    return {
        "parameters": _flatten({**record.config.as_dict(), "directed": result.findings.directed}),
        "counts": counts,
        "grouping": grouping,
        "timings": [(k, _fmt(float(t), 2)) for k, t in record.timings.items()],
        "total_time": _fmt(float(sum(record.timings.values())), 1),
        "versions": list(record.versions.items()),
        "structure": _structure(result.confidence.structure if result.confidence else None),
        "stability": _stability(result.confidence.stability if result.confidence else None, v),
        "betweenness": _betweenness(result.findings.betweenness),
        "file": inp.get("file", "(given as a graph)"),
        "nodes_file": inp.get("nodes_file"),
        "sha256": inp.get("sha256", "–"),
        "format": inp.get("format", "–"),
    }


def _structure(st: StructureTest | None) -> dict[str, Any] | None:
    """The structure test's figures (None when it did not run)."""
    if st is None:
        return None
    rows = [
        (
            "Verdict",
            "not tested"
            if not st.tested
            else ("clear community structure" if st.clear else "not clear"),
        ),
        # The structure test counts every tie once, whatever its weight (the swaps move
        # ties, not weights: roles.analysis.confidence); section 7's other table uses weights.
        (
            "Modularity of the communities, each tie counted once",
            _fmt(saved(st.modularity_communities)),
        ),
        (
            "Best modularity found in the network (ties counted once)",
            _fmt(saved(st.modularity_best)),
        ),
        (
            "Best modularity in randomised networks",
            f"{_fmt(saved(st.null_mean))} ± {_fmt(saved(st.null_sd), 3)}",
        ),
        ("Distance in standard deviations (z)", _fmt(saved(st.z, 2))),
        ("Empirical p-value", _fmt(saved(st.p_value), 3)),
        ("Randomised networks", _fmt(st.randomisations)),
    ]
    return {
        "rows": [(k, val) for k, val in rows if val not in ("–", "– ± –")],
        "rule": st.rule,
        "budget": st.budget,
    }


#: How each member's confidence is measured (as summary.json's stability section says).
CONFIDENCE_MEASURE = (
    "per member: mean over re-runs of the Jaccard index of its co-members in the reported "
    "communities and in the re-run"
)


def _community_rule(v: Mapping[str, str]) -> str:
    """The re-run verdict bands in words (Hennig 2007); "pattern" said as section 2 says it."""
    from ..analysis.confidence import PATTERN_JACCARD, STABLE_JACCARD

    return (
        f"mean best-match Jaccard index over re-runs (Hennig 2007): stable >= {STABLE_JACCARD}, "
        f"recurs with varying {v['members']} >= {PATTERN_JACCARD}, unstable below"
    )


def _stability(st: Stability | None, v: Mapping[str, str] = _BASE) -> dict[str, Any] | None:
    """The seed-stability check's figures (None when no re-run was made)."""
    if st is None or not st.runs:
        return None
    share = _share_low(st)
    rows = [
        ("Re-runs with other seeds", _fmt(st.runs)),
        ("View re-run", st.view),
        ("Median member confidence", _fmt(saved(st.median_confidence))),
        ("Members below 0.5", f"{_fmt(100 * share, 0)}%" if share is not None else "–"),
    ]
    return {
        "rows": [(k, val) for k, val in rows if val != "–"],
        # One word for one verdict across the report: section 2 says "recurs with
        # varying members" where the pipeline's rule says "pattern".
        "rule": _community_rule(v),
        "measure": CONFIDENCE_MEASURE,
        "budget": st.budget,
    }


def _betweenness(b: BetweennessInfo | None) -> str | None:
    """How betweenness was computed (:class:`roles.analysis.measures.BetweennessInfo`)."""
    if b is None:
        return None
    weighted = " along the strongest ties (distance = 1 / weight)" if b.weighted else ""
    if b.method == "exact":
        return f"exact, every member a starting point (Brandes 2001){weighted}"
    return (
        f"estimated from {_fmt(b.k)} randomly drawn starting points{weighted}; "
        f"largest standard error {_fmt(b.expected_error, 4)}, "
        f"95% bound {_fmt(b.error_bound, 4)}"
    )


# ------------------------------------------------------------- reader's extras


def _add_formal_group(result: Result, ctx: dict[str, Any], min_group_size: int) -> None:
    """Each member's formal group (tier, department) beside its community in the tables.

    Groups under ``min_group_size`` print as '(small group)', as in the brokerage table.
    """
    attr = result.formal.attribute if result.formal is not None else ""
    if not attr or attr not in result.nodes.columns:
        ctx["group_column"] = None
        return
    values = dict(zip(result.nodes.node, result.nodes[attr].astype(str), strict=True))
    sizes = result.nodes[attr].astype(str).value_counts()
    ctx["group_column"] = attr

    def group(node: str) -> str:
        g = values.get(node, "")
        if not g.strip():
            return "–"
        return g if sizes.get(g, 0) >= min_group_size else "(small group)"

    for part in (ctx["roles"]["bridges"], ctx["roles"]["hubs"], ctx["roles"]["peripheral"]):
        for r in part:
            r["group"] = group(r["node"])
    for r in ctx["dependencies"]["rows"]:
        r["group"] = group(r["node"])


def _network_map(
    result: Result, v: Mapping[str, str], names: Mapping[int, str]
) -> figures.Figure | None:
    """The whole network, when it is small enough to read member by member."""
    table = result.nodes
    connected = table[table.community > 0]
    if len(connected) < 3 or len(connected) > NETWORK_FIGURE_MAX:
        return None
    members = connected.node.tolist()
    pos = {n: i for i, n in enumerate(members)}
    ties = [(pos[a], pos[b]) for a, b in result.graph.edges() if a in pos and b in pos]
    found = result.findings
    key = found.hubs[:3] + found.bridges[:3] + [d.node for d in found.single_points[:3]]
    annotate = [pos[n] for n in dict.fromkeys(key) if n in pos]
    return figures.network_map(
        len(members),
        ties,
        connected.community.astype(int).tolist(),
        names=members,
        annotate=annotate,
        community_names=names,
        seed=result.record.config.seed,
        words=v,
    )


def _without_ties(found: Findings) -> dict[str, Any] | None:
    """Names of the members without any tie (the first TOP_ISOLATED)."""
    count = len(found.isolated)
    if not count:
        return None
    shown = [str(n) for n in found.isolated[:TOP_ISOLATED]]
    return {"names": shown, "more": count - len(shown), "count": count}


def _check_next(ctx: Mapping[str, Any], v: Mapping[str, str], kind: str) -> list[str]:
    """What to check next, in the reader's terms (our own list, drawn from the cautions)."""
    deps = ctx["dependencies"]["rows"]
    worst = ", ".join(r["node"] for r in deps[:3])
    iso = ctx["without_ties"]
    out: list[str] = []
    if kind == "supply":
        if deps:
            out.append(
                f"Verify the single sources of section 4 ({worst}) with procurement: is there "
                "a second qualified supplier, stock, or a contract that the data does not show?"
            )
        out.append(
            "Confirm what a recorded supply tie means here: a current order, a framework "
            "contract, a past delivery? Volumes, inventory and lead times are not in it."
        )
        if ctx["dependencies"]["customers"]:
            out.append(
                "Ask the final customers named in section 4 how long they could run "
                "without that supplier."
            )
        out.append(
            "Ask your first-tier suppliers for their own suppliers: the deeper tiers are "
            "where records are most often missing."
        )
    else:
        out.append(
            f"Confirm what a recorded {v['tie']} means here (a survey answer, shared "
            "meetings, messages) and which period it covers, before reading anything into it."
        )
        if deps:
            out.append(
                f"Talk with the {v['members']} around {worst} (section 4) about how work "
                f"would reach the others {v['if_lost']}: the data holds only recorded "
                f"{v['ties']}."
            )
        if iso:
            out.append(
                f"Check the {iso['count']} {v['member'] if iso['count'] == 1 else v['members']} "
                f"without {v['ties']} (section 2): missing data, or really apart?"
            )
        if kind == "organisation":
            out.append(
                "Agree who receives this report and when the data will be deleted, before "
                "it is shared (section 6)."
            )
    if kind == "general" and deps and ctx["directed"]:
        out.append(
            f"Verify the single points of failure of section 4 ({worst}) with those concerned."
        )
    return out


# ------------------------------------------------------------------- summary


def _first_looks(
    ctx: Mapping[str, Any], v: Mapping[str, str], clear: bool | None
) -> list[dict[str, str]]:
    """The two or three things to look at first, most urgent first."""
    out: list[dict[str, str]] = []
    deps = ctx["dependencies"]["rows"]
    # A single point of failure whose every cut-off member has one recorded tie rests on
    # thin evidence: it never stands alone in this list.
    solid = [d for d in deps if not d.get("one_tie_each")]
    thin = [d for d in deps if d.get("one_tie_each")]

    def spof_item(d: Mapping[str, Any]) -> dict[str, str]:
        n = d["dependents"]
        names = f" ({d['cut_off']})" if d.get("cut_off") else ""
        return {
            "who": d["node"],
            "text": f"{v['if_lost']}, cuts off {n} other "
            f"{v['member'] if n == 1 else v['members']}{names}"
            + (_SOURCES.get(ctx["kind"], _SOURCES["general"]) if ctx["directed"] else "")
            + (
                f"; {'each of them has' if n != 1 else 'that one has'} a single recorded "
                f"{v['tie']}, so check the records first"
                if d.get("one_tie_each")
                else ""
            )
            + ". Check whether there is a second route.",
            "where": "section 4",
        }

    if solid:
        out.append(spof_item(solid[0]))
    bridges = [b for b in ctx["roles"]["bridges"][:1] if b["b"] >= TRAFFIC_FLOOR]
    if bridges:
        b = bridges[0]
        reach = b.get("reaches") or []
        if reach:
            others = [str(c) for c in reach[:2]]
            plural = v["communities"] if len(others) > 1 else v["community"]
            between = f"{v['community']} {b['community']} and {plural} {' and '.join(others)}"
        else:
            between = v["communities"]
        out.append(
            {
                "who": b["node"],
                "text": f"carries much of the traffic between {between}; ask what would "
                f"happen to it without this one {v['member']}.",
                "where": "section 3",
            }
        )
    traffic = [t for t in ctx["roles"]["traffic"][:1] if t["b"] >= TRAFFIC_FLOOR]
    if ctx["roles"]["withheld"] and traffic:
        t = traffic[0]
        out.append(
            {
                "who": t["node"],
                "text": f"the largest share of shortest paths between other {v['members']} "
                f"runs through {v['it']} (betweenness {t['betweenness']}); ask what would "
                f"happen without this one {v['member']}.",
                "where": "section 3",
            }
        )
    named = {item["who"] for item in out}
    formal = ctx["formal"]
    hubs = [h for h in ctx["roles"]["hubs"] if h["node"] not in named]
    if ctx["no_groups"]:
        out.append(
            {
                "who": "",
                "text": f"no clear {v['communities']} were found, so read the roles and "
                f"dependencies, not the groups; {v['ties']} spread fairly evenly, or a chain "
                "or tree of supply, give this result.",
                "where": "section 2",
            }
        )
    elif clear is False:
        out.append(
            {
                "who": "",
                "text": f"the {v['communities']} are not clearly stronger than in random "
                f"networks with the same numbers of {v['ties']}: read them as a rough "
                "sketch, not as a finding.",
                "where": "section 2",
            }
        )
    elif formal and formal["inward"]:
        g = formal["inward"]
        out.append(
            {
                "who": g["label"],
                "text": (
                    f"every {formal['attribute']} keeps clearly more {v['ties']} inside than "
                    "its size predicts, this one most"
                    if formal["all_inward"]
                    else "more inward-looking than its size predicts"
                )
                + f" (E-I index {g['ei']} against {g['expected']} if {v['ties']} ignored the "
                f"{formal['attribute']}): is that by design?",
                "where": "section 2",
            }
        )
    if len(out) < 3 and hubs:
        h = hubs[0]
        where = f" of {v['community']} {h['community']}" if not ctx["no_groups"] else ""
        out.append(
            {
                "who": h["node"],
                "text": f"the strongest hub{where} ({h['degree']} {v['ties']}): {v['hub_text']}.",
                "where": "section 3",
            }
        )
    if thin and out and len(out) < 3:
        out.append(spof_item(thin[0]))
    for item in out:
        if not item["who"]:
            item["text"] = item["text"][:1].upper() + item["text"][1:]
    return out[:3]


def build_context(
    result: Result,
    *,
    title: str,
    kind: str,
    paper: str,
    min_group_size: int,
    made: str,
    pseudonymized: bool = False,
) -> dict[str, Any]:
    """Everything the template needs, as strings, numbers, short lists and figures.

    Parameters
    ----------
    result : Result
        What the pipeline found; only read.
    title : str
        Printed on the cover and in the running header.
    kind : {'organisation', 'supply', 'general'}
        Chooses the vocabulary (people and teams, firms and clusters, or neutral).
    paper : {'a4', 'letter'}
        Page size.
    min_group_size : int
        No figure or table reports on an attribute group smaller than this.
    made : str
        When the report was made, as printed on the cover.
    pseudonymized : bool
        Whether the names were replaced by codes before the analysis.

    Returns
    -------
    dict
    """
    found = result.findings
    v = VOCABULARY.get(kind, VOCABULARY["general"])
    structure = result.confidence.structure if result.confidence is not None else None
    clear = bool(structure.clear) if structure is not None and structure.tested else None
    check = found.modularity
    ctx: dict[str, Any] = {
        "title": title,
        "made": made,
        "paper": "A4" if paper == "a4" else "letter",
        "v": v,
        "kind": kind,
        "found": found,
        "directed": found.directed,
        "seed": result.record.config.seed,
        "budgets": result.budgets,
        # As summary.json gives them.
        "check": {
            "communities": round(check.communities, 4),
            "louvain": round(check.louvain, 4),
            "louvain_groups": check.louvain_groups,
            "nmi_with_louvain": round(check.nmi_with_louvain, 4),
        },
        "min_group_size": min_group_size,
        "pseudonymized": pseudonymized,
        "input_name": result.record.input.get("file", "(given as a graph)"),
        "top": TOP,
        "fmt": _fmt,
        "clear": clear,
        "no_groups": not found.grouped,
        "isolated": len(found.isolated),
    }
    f = result.formal
    names = community_names(crosstab_counts(f), f.attribute, min_group_size) if f else {}
    ctx["community_names"] = names
    ctx["communities"] = _communities(result, v, names)
    ctx["roles"] = _roles(result, v)
    ctx["dependencies"] = _dependencies(result, v)
    _add_formal_group(result, ctx, min_group_size)
    ctx["network_map"] = _network_map(result, v, names)
    ctx["without_ties"] = _without_ties(found)
    ctx["walks_ignored"] = found.directed and found.walks_over.startswith("ties in both directions")
    ctx["walks_over"] = found.walks_over
    ctx["views"] = _views(result, v)
    ctx["formal"] = _formal(result, v, min_group_size)
    ctx["method"] = _method(result, v)
    ctx["what_if"] = what_if_context(result, v, kind)
    ctx["first_looks"] = _first_looks(ctx, v, clear)
    ctx["check_next"] = _check_next(ctx, v, kind)
    return ctx
