"""What changed between two snapshots of one network: members, ties, communities, roles.

The functions here take the results of two single-snapshot runs (names joined by
member name) and return plain frozen values; the wording lives in the report.

Community events follow the types of Palla, Barabási & Vicsek [1]_ (growth,
contraction, merging, splitting, birth, death) with the continuation of Greene, Doyle
& Cunningham [2]_, who match communities of consecutive snapshots by the Jaccard index
of their members above a threshold.

References
----------
.. [1] G. Palla, A.-L. Barabási, T. Vicsek, "Quantifying social group evolution",
   Nature 446, 664-667, 2007. doi:10.1038/nature05670
.. [2] D. Greene, D. Doyle, P. Cunningham, "Tracking the evolution of communities in
   dynamic social networks", ASONAM 2010, 176-183. doi:10.1109/ASONAM.2010.17
"""

from __future__ import annotations

import itertools
from collections import Counter, defaultdict
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import networkx as nx

if TYPE_CHECKING:
    from ..results import Findings

__all__ = [
    "MATCH_JACCARD",
    "CONFIDENT",
    "CommunityEvent",
    "Move",
    "TiePair",
    "MemberChanges",
    "TieChanges",
    "member_changes",
    "tie_changes",
    "community_events",
    "moved_members",
    "growth_step",
]

#: Two communities of consecutive snapshots are the same community continued when the
#: Jaccard index of their members present in both snapshots is at least this. Greene et
#: al. (2010) use 0.3 and study 0.1-0.5; benchmarks/bench_snapshots.py measures the
#: overlaps of true continuations and of unrelated pairs on our test networks.
MATCH_JACCARD = 0.3

#: A member's confidence (mean Jaccard of its co-members over re-runs) at which its
#: placement is taken as settled: Hennig's (2007) "stable" bound, as in confidence.py.
CONFIDENT = 0.75

EVENTS = ("continuation", "growth", "contraction", "merging", "splitting", "birth", "death")


def growth_step(size: int) -> int:
    """Net members gained (or lost) that make a continued community grow (or contract).

    At least two members and a tenth of the community's earlier size, so that one
    hire or one departure in a large team reads as continuation (common practice in
    reading change tables, not a published bound).

    >>> growth_step(5), growth_step(40)
    (2, 4)
    """
    return max(2, -(-size // 10))


@dataclass(frozen=True)
class MemberChanges:
    """Who joined, who left, how many stayed (names sorted)."""

    joined: tuple[str, ...]
    left: tuple[str, ...]
    stayed: int


@dataclass(frozen=True)
class TiePair:
    """Ties gained and lost between two communities of the newer snapshot (a <= b)."""

    a: int
    b: int
    gained: int
    lost: int


@dataclass(frozen=True)
class TieChanges:
    """Ties added, removed and kept, and where the changes fell.

    ``pairs`` counts by the newer snapshot's communities of both ends; ties lost with
    a member who left have no community in the newer snapshot and are counted in
    ``lost_with_leavers`` instead.
    """

    added: int
    removed: int
    kept: int
    pairs: tuple[TiePair, ...]
    lost_with_leavers: int


@dataclass(frozen=True)
class CommunityEvent:
    """One event: which communities of each snapshot it concerns and its type."""

    event: str
    old: tuple[int, ...]
    new: tuple[int, ...]
    jaccard: tuple[float, ...] = ()
    joined: int = 0
    left: int = 0

    def as_dict(self) -> dict[str, Any]:
        return {
            "event": self.event,
            "old": list(self.old),
            "new": list(self.new),
            "jaccard": [round(j, 4) for j in self.jaccard],
            "joined": self.joined,
            "left": self.left,
        }


@dataclass(frozen=True)
class Move:
    """A member present in both snapshots whose community's counterpart changed."""

    member: str
    old: int
    new: int


@dataclass(frozen=True)
class _Matching:
    jaccard: dict[tuple[int, int], float] = field(default_factory=dict)


def member_changes(old: Iterable[str], new: Iterable[str]) -> MemberChanges:
    """Members who joined (only in ``new``), left (only in ``old``), and stayed.

    >>> member_changes(["a", "b", "c"], ["b", "c", "d"])
    MemberChanges(joined=('d',), left=('a',), stayed=2)
    """
    a, b = set(old), set(new)
    return MemberChanges(joined=tuple(sorted(b - a)), left=tuple(sorted(a - b)), stayed=len(a & b))


def _tie_keys(graph: nx.Graph) -> set[tuple[str, str]]:
    if graph.is_directed():
        return {(str(u), str(v)) for u, v in graph.edges() if u != v}
    return {tuple(sorted((str(u), str(v)))) for u, v in graph.edges() if u != v}  # type: ignore[misc]


def tie_changes(old: nx.Graph, new: nx.Graph, new_community: Mapping[str, int]) -> TieChanges:
    """Ties added, removed and kept between two snapshots, by community pair.

    A tie is the same tie when it joins the same two names (in the same direction for
    directed networks); weights are not compared.

    >>> old = nx.Graph([("a", "b"), ("b", "c")])
    >>> new = nx.Graph([("b", "c"), ("c", "d")])
    >>> t = tie_changes(old, new, {"b": 1, "c": 1, "d": 2})
    >>> (t.added, t.removed, t.kept, t.lost_with_leavers)
    (1, 1, 1, 1)
    """
    a, b = _tie_keys(old), _tie_keys(new)
    added, removed = b - a, a - b
    gained: Counter[tuple[int, int]] = Counter()
    lost: Counter[tuple[int, int]] = Counter()
    with_leavers = 0
    for u, v in added:
        cu, cv = new_community.get(u), new_community.get(v)
        if cu is not None and cv is not None:
            gained[(min(cu, cv), max(cu, cv))] += 1
    for u, v in removed:
        cu, cv = new_community.get(u), new_community.get(v)
        if cu is None or cv is None:
            with_leavers += 1
        else:
            lost[(min(cu, cv), max(cu, cv))] += 1
    pairs = tuple(
        TiePair(p[0], p[1], gained.get(p, 0), lost.get(p, 0))
        for p in sorted(set(gained) | set(lost))
    )
    return TieChanges(
        added=len(added),
        removed=len(removed),
        kept=len(a & b),
        pairs=pairs,
        lost_with_leavers=with_leavers,
    )


def _members(community: Mapping[str, int]) -> dict[int, set[str]]:
    out: dict[int, set[str]] = defaultdict(set)
    for name, c in community.items():
        if c > 0:  # community 0: members without ties, never a community
            out[int(c)].add(name)
    return dict(out)


def _overlaps(
    old: dict[int, set[str]], new: dict[int, set[str]], stayed: set[str]
) -> dict[tuple[int, int], float]:
    """Jaccard index of every old/new pair sharing a member, on members of both."""
    old_s = {c: m & stayed for c, m in old.items()}
    new_s = {c: m & stayed for c, m in new.items()}
    new_of = {name: c for c, m in new_s.items() for name in m}
    shared: Counter[tuple[int, int]] = Counter()
    for c, m in old_s.items():
        for name in m:
            if name in new_of:
                shared[(c, new_of[name])] += 1
    return {(c, d): k / (len(old_s[c]) + len(new_s[d]) - k) for (c, d), k in shared.items()}


def community_events(
    old: Mapping[str, int],
    new: Mapping[str, int],
    *,
    threshold: float = MATCH_JACCARD,
) -> tuple[CommunityEvent, ...]:
    """Match the communities of two snapshots and name what happened to each.

    Parameters
    ----------
    old, new : mapping
        Member name -> community id (``0``: no ties, not a community) of each snapshot.
    threshold : float
        Jaccard index, over members present in both snapshots, at which an older and a
        newer community are matched (Greene et al. 2010).

    Returns
    -------
    tuple of CommunityEvent
        ``splitting``: one older community matched by two or more newer ones;
        ``merging``: two or more older ones matched by one newer one; ``birth``: a
        newer community matched by none; ``death``: an older one matched by none;
        otherwise one to one, ``growth`` or ``contraction`` when the members who
        joined the network into it, less those who left the network from the older
        one, reach :func:`growth_step` of its older size, else ``continuation``.
        A group of matches that both splits and merges gives one ``splitting`` per
        older and one ``merging`` per newer community concerned.

    Examples
    --------
    >>> old = {"a": 1, "b": 1, "c": 1, "d": 2, "e": 2, "f": 2}
    >>> new = {"a": 1, "b": 1, "c": 1, "d": 1, "e": 1, "f": 1}
    >>> [e.event for e in community_events(old, new)]
    ['merging']
    """
    old_m, new_m = _members(old), _members(new)
    stayed = set(old) & set(new)
    jac = {p: j for p, j in _overlaps(old_m, new_m, stayed).items() if j >= threshold}
    fwd: dict[int, list[int]] = defaultdict(list)
    back: dict[int, list[int]] = defaultdict(list)
    for c, d in sorted(jac):
        fwd[c].append(d)
        back[d].append(c)
    left = set(old) - set(new)
    joined = set(new) - set(old)
    events: list[CommunityEvent] = []
    for c in sorted(old_m):
        ds = fwd.get(c, [])
        if not ds:
            events.append(CommunityEvent("death", (c,), (), left=len(old_m[c] & left)))
        elif len(ds) > 1:
            events.append(
                CommunityEvent(
                    "splitting",
                    (c,),
                    tuple(ds),
                    tuple(jac[(c, d)] for d in ds),
                    joined=sum(len(new_m[d] & joined) for d in ds),
                    left=len(old_m[c] & left),
                )
            )
    for d in sorted(new_m):
        cs = back.get(d, [])
        if not cs:
            events.append(CommunityEvent("birth", (), (d,), joined=len(new_m[d] & joined)))
        elif len(cs) > 1:
            events.append(
                CommunityEvent(
                    "merging",
                    tuple(cs),
                    (d,),
                    tuple(jac[(c, d)] for c in cs),
                    joined=len(new_m[d] & joined),
                    left=sum(len(old_m[c] & left) for c in cs),
                )
            )
        elif len(fwd[cs[0]]) == 1:
            c = cs[0]
            n_in, n_out = len(new_m[d] & joined), len(old_m[c] & left)
            step = growth_step(len(old_m[c]))
            net = n_in - n_out
            kind = "growth" if net >= step else "contraction" if -net >= step else "continuation"
            events.append(CommunityEvent(kind, (c,), (d,), (jac[(c, d)],), n_in, n_out))
    order = {"death": 0, "splitting": 1, "merging": 2, "birth": 3}
    events.sort(key=lambda e: (e.old or (10**9,), e.new or (10**9,), order.get(e.event, 4)))
    return tuple(events)


def _tie_weight(graph: nx.Graph, name: str, members: Mapping[str, int], to: set[int]) -> float:
    """Weight of ``name``'s ties (both directions) to members of communities ``to``."""
    if name not in graph:
        return 0.0
    nbrs = (
        itertools.chain(graph.succ[name].items(), graph.pred[name].items())
        if graph.is_directed()
        else graph[name].items()
    )
    return sum(float(d.get("weight", 1.0)) for v, d in nbrs if members.get(str(v)) in to)


def moved_members(
    old: Mapping[str, int],
    new: Mapping[str, int],
    events: Iterable[CommunityEvent],
    *,
    old_confidence: Mapping[str, float] | None = None,
    new_confidence: Mapping[str, float] | None = None,
    old_graph: nx.Graph | None = None,
    new_graph: nx.Graph | None = None,
    confident: float = CONFIDENT,
) -> tuple[Move, ...]:
    """Members of both snapshots whose community's counterpart changed.

    A member moved when its older community ``c`` and its newer community ``d`` were
    both matched (each took part in an event other than birth or death) and ``d`` is
    not one ``c`` was matched to. Two guards keep seed-to-seed variation out:

    - its confidence is at least ``confident`` in both runs (without confidence
      figures, when a run made no re-runs, no member is reported);
    - with the graphs given, its own ties moved too: in the older snapshot more of its
      tie weight went to ``c`` than to the older counterparts of ``d``, and in the newer
      snapshot more went to ``d`` than to the newer counterparts of ``c``. A member tied
      equally to two teams (a bridge) can land in either from one seed to the next;
      that is not a move.

    >>> old = {"a": 1, "b": 1, "c": 1, "x": 2, "y": 2, "z": 2}
    >>> new = {"a": 1, "b": 1, "c": 2, "x": 2, "y": 2, "z": 2}
    >>> ev = community_events(old, new)
    >>> sure = dict.fromkeys(old, 1.0)
    >>> moved_members(old, new, ev, old_confidence=sure, new_confidence=sure)
    (Move(member='c', old=1, new=2),)
    """
    if old_confidence is None or new_confidence is None:
        return ()
    matched: dict[int, set[int]] = defaultdict(set)
    matched_back: dict[int, set[int]] = defaultdict(set)
    for e in events:
        if e.event in ("birth", "death"):
            continue
        for c in e.old:
            matched[c].update(e.new)
        for d in e.new:
            matched_back[d].update(e.old)
    out = []
    for name in sorted(set(old) & set(new)):
        c, d = int(old[name]), int(new[name])
        if c <= 0 or d <= 0 or c not in matched or d not in matched_back or d in matched[c]:
            continue
        if old_confidence.get(name, 0.0) < confident or new_confidence.get(name, 0.0) < confident:
            continue
        if old_graph is not None and new_graph is not None:
            before = _tie_weight(old_graph, name, old, {c})
            if before <= _tie_weight(old_graph, name, old, matched_back[d]):
                continue
            after = _tie_weight(new_graph, name, new, {d})
            if after <= _tie_weight(new_graph, name, new, matched[c]):
                continue
        out.append(Move(name, c, d))
    return tuple(out)


# --------------------------------------------------------------------------------------
# Two runs -> one set of changes


@dataclass(frozen=True)
class RoleChange:
    """A member who became or stopped being hub-like, bridge-like or a single point of
    failure, with the figure behind the role in each snapshot (``None``: absent)."""

    member: str
    role: str
    change: str  # "became" or "stopped"
    before: float | None
    after: float | None


@dataclass(frozen=True)
class Changes:
    """Everything ``changes.json`` holds; see :func:`compare_results`."""

    members: MemberChanges
    ties: TieChanges
    events: tuple[CommunityEvent, ...]
    moved: tuple[Move, ...]
    roles: tuple[RoleChange, ...]
    threshold: float
    confident: float
    moved_checked: bool
    directed: bool

    def as_dict(self) -> dict[str, Any]:
        """The content of ``changes.json``."""
        out: dict[str, Any] = {
            "members": {
                "joined": list(self.members.joined),
                "left": list(self.members.left),
                "stayed": self.members.stayed,
            },
            "ties": {
                "added": self.ties.added,
                "removed": self.ties.removed,
                "kept": self.ties.kept,
                "lost_with_members_who_left": self.ties.lost_with_leavers,
                "between_communities": [
                    {"communities": [p.a, p.b], "gained": p.gained, "lost": p.lost}
                    for p in self.ties.pairs
                ],
            },
            "communities": [e.as_dict() for e in self.events],
            "matching": {
                "measure": "Jaccard index of members present in both snapshots",
                "threshold": self.threshold,
                "growth_rule": "net joiners minus leavers of at least max(2, a tenth of "
                "the earlier size)",
            },
            "moved": [{"member": m.member, "from": m.old, "to": m.new} for m in self.moved],
            "moved_rule": (
                f"both communities matched and the member's confidence at least "
                f"{self.confident} in both runs"
                if self.moved_checked
                else "not reported: a run had no confidence re-runs"
            ),
            "roles": [
                {
                    "member": r.member,
                    "role": r.role,
                    "change": r.change,
                    "before": r.before,
                    "after": r.after,
                }
                for r in self.roles
            ],
        }
        if self.directed:
            spof = [r for r in self.roles if r.role == "single point of failure"]
            out["single_points_of_failure"] = {
                "appeared": [
                    {"member": r.member, "cut_off_before": r.before, "cut_off_after": r.after}
                    for r in spof
                    if r.change == "became"
                ],
                "resolved": [
                    {"member": r.member, "cut_off_before": r.before, "cut_off_after": r.after}
                    for r in spof
                    if r.change == "stopped"
                ],
            }
        return out


def _column(nodes: Any, name: str) -> dict[str, float]:
    if name not in nodes.columns:
        return {}
    return {str(k): float(v) for k, v in zip(nodes["node"], nodes[name], strict=True)}


def _spof(findings: Findings) -> dict[str, float]:
    """Single point of failure -> its dependents."""
    return {str(e.node): float(e.dependents) for e in findings.single_points}


def _role_changes(old: Any, new: Any) -> tuple[RoleChange, ...]:
    """Hub-like, bridge-like and single points of failure that appeared or ended."""
    out: list[RoleChange] = []
    lists: tuple[tuple[str, str, str], ...] = (
        ("hub-like", "hubs", "within_z"),
        ("bridge-like", "bridges", "betweenness"),
    )
    # Hub-like and bridge-like are not stated for a snapshot whose communities are not
    # clear (Findings.roles_withheld): no change of them can be read across it.
    if old.findings.roles_withheld or new.findings.roles_withheld:
        lists = ()
    for role, key, figure in lists:
        a = {str(x) for x in getattr(old.findings, key)}
        b = {str(x) for x in getattr(new.findings, key)}
        fa, fb = _column(old.nodes, figure), _column(new.nodes, figure)
        for name in sorted(b - a):
            out.append(RoleChange(name, role, "became", fa.get(name), fb.get(name)))
        for name in sorted(a - b):
            out.append(RoleChange(name, role, "stopped", fa.get(name), fb.get(name)))
    da, db = _spof(old.findings), _spof(new.findings)
    ca, cb = _column(old.nodes, "dependents"), _column(new.nodes, "dependents")
    for name in sorted(set(db) - set(da)):
        out.append(RoleChange(name, "single point of failure", "became", ca.get(name), db[name]))
    for name in sorted(set(da) - set(db)):
        out.append(RoleChange(name, "single point of failure", "stopped", da[name], cb.get(name)))
    return tuple(out)


def compare_results(old: Any, new: Any, *, threshold: float = MATCH_JACCARD) -> Changes:
    """What changed between two single-snapshot results (:class:`roles.Result`).

    Members are joined by name. Communities are matched by :func:`community_events`;
    members are reported as moved only where both runs measured their confidence
    (:func:`moved_members`).
    """
    old_c = {str(k): int(v) for k, v in zip(old.nodes["node"], old.nodes["community"], strict=True)}
    new_c = {str(k): int(v) for k, v in zip(new.nodes["node"], new.nodes["community"], strict=True)}
    members = member_changes(old_c, new_c)
    ties = tie_changes(old.graph, new.graph, new_c)
    events = community_events(old_c, new_c, threshold=threshold)
    conf_a = _column(old.nodes, "confidence") or None
    conf_b = _column(new.nodes, "confidence") or None
    moved = moved_members(
        old_c,
        new_c,
        events,
        old_confidence=conf_a,
        new_confidence=conf_b,
        old_graph=old.graph,
        new_graph=new.graph,
    )
    return Changes(
        members=members,
        ties=ties,
        events=events,
        moved=moved,
        roles=_role_changes(old, new),
        threshold=threshold,
        confident=CONFIDENT,
        moved_checked=conf_a is not None and conf_b is not None,
        directed=bool(old.graph.is_directed() and new.graph.is_directed()),
    )


def compare_graphs(old: nx.Graph, new: nx.Graph, **run_options: Any) -> tuple[Any, Any, Changes]:
    """Analyse two snapshots with the same options and say what changed.

    Both are analysed by :func:`roles.run` with the same ``run_options`` (the same
    configuration and seed); returns ``(old_result, new_result, changes)``.

    >>> import networkx as nx
    >>> a = nx.relabel_nodes(nx.ring_of_cliques(4, 6), str)
    >>> _, _, ch = compare_graphs(a, a)   # doctest: +SKIP
    >>> {e.event for e in ch.events}      # doctest: +SKIP
    {'continuation'}
    """
    from ..pipeline import run

    return (a := run(old, **run_options)), (b := run(new, **run_options)), compare_results(a, b)
