"""Two snapshots' changes -> the change report (report.html, report.pdf).

Reads :class:`roles.analysis.snapshots.Changes` and the two runs' results; computes nothing the
findings rest on, only selects, orders and words them, and draws the flow of members
between the two snapshots' communities.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Any

from ..analysis.snapshots import Changes, CommunityEvent
from .context import VOCABULARY, _fmt, community_names, crosstab_counts
from .figures import Figure, _draw, _label
from .render import render_html, write_pdf

__all__ = ["build_change_context", "render_changes", "flow_figure"]

#: Rows shown per table; everything is in changes.json.
TOP = 15
#: Communities drawn one by one on each side of the flow figure; the rest as "others".
FLOW_BOXES = 14

_EVENT_WORDS = {
    "continuation": "continued",
    "growth": "grew",
    "contraction": "shrank",
    "merging": "merged",
    "splitting": "split",
    "birth": "new",
    "death": "gone",
}


def _names(result: Any, min_group_size: int) -> dict[int, str]:
    """Community id -> "2 (mostly Design)", named by the formal groups when given
    (:func:`roles.report.context.community_names`, which never names a small group)."""
    out = {int(c): str(c) for c in result.nodes["community"].unique() if int(c) > 0}
    formal = result.formal
    if formal is not None and len(formal.crosstab):
        named = community_names(crosstab_counts(formal), formal.attribute, min_group_size)
        out.update({c: f"{c} ({name})" for c, name in named.items() if c in out})
    return out


def _sizes(nodes: Any) -> dict[int, int]:
    s = nodes["community"].value_counts()
    return {int(k): int(v) for k, v in s.items() if int(k) > 0}


def _flows(old: Any, new: Any) -> dict[tuple[int, int], int]:
    a = dict(zip(old.nodes["node"].astype(str), old.nodes["community"], strict=True))
    b = dict(zip(new.nodes["node"].astype(str), new.nodes["community"], strict=True))
    flows: Counter[tuple[int, int]] = Counter()
    for name, c in a.items():
        d = b.get(name)
        if d is not None and c > 0 and d > 0:
            flows[(int(c), int(d))] += 1
    return dict(flows)


def _keep(sizes: Mapping[int, int], also: set[int]) -> list[int]:
    """The largest communities (and those in ``also``) up to FLOW_BOXES, in id order."""
    ranked = sorted(sizes, key=lambda c: (c not in also, -sizes[c], c))
    return sorted(ranked[:FLOW_BOXES])


def flow_figure(
    old_sizes: Mapping[int, int],
    new_sizes: Mapping[int, int],
    flows: Mapping[tuple[int, int], int],
    events: Sequence[CommunityEvent],
    *,
    old_names: Mapping[int, str],
    new_names: Mapping[int, str],
    words: Mapping[str, str],
) -> Figure:
    """Older communities on the left, newer on the right, bands for the members who
    stayed and moved between them (band width = members); hatched ends mark members who
    left or joined the network. Matched pairs (an event other than birth or death) are
    drawn dark, the rest light, so the picture reads in greyscale."""
    from matplotlib.patches import PathPatch, Rectangle
    from matplotlib.path import Path as MPath

    matched = {
        (c, d) for e in events if e.event not in ("birth", "death") for c in e.old for d in e.new
    }
    kind_new = {d: e.event for e in events for d in e.new}
    kind_old = {c: e.event for e in events for c in e.old}
    left_ids = _keep(old_sizes, {c for c, _ in matched})
    right_ids = _keep(new_sizes, {d for _, d in matched})
    other_l = sum(v for c, v in old_sizes.items() if c not in left_ids)
    other_r = sum(v for d, v in new_sizes.items() if d not in right_ids)
    total = max(sum(old_sizes.values()), sum(new_sizes.values()), 1)
    gap = 0.012 * total
    height = total + gap * (max(len(left_ids), len(right_ids)) + 1)

    def stack(ids: list[int], sizes: Mapping[int, int], other: int) -> dict[Any, list[float]]:
        pos: dict[Any, list[float]] = {}
        y = height
        boxes: list[tuple[Any, int]] = [(c, sizes[c]) for c in ids]
        if other:
            boxes.append(("others", other))
        for c, h in boxes:
            pos[c] = [y - h, y]  # bottom, top
            y -= h + gap
        return pos

    lp = stack(left_ids, old_sizes, other_l)
    rp = stack(right_ids, new_sizes, other_r)
    lcur = {c: p[1] for c, p in lp.items()}  # bands fill boxes from the top
    rcur = {d: p[1] for d, p in rp.items()}
    x0, x1, wbox = 0.0, 1.0, 0.06

    def paint(fig: Any, ax: Any) -> None:
        for (c, d), k in sorted(flows.items()):
            lc = c if c in lp else "others"
            rd = d if d in rp else "others"
            if lc not in lp or rd not in rp:
                continue
            ya, yb = lcur[lc], rcur[rd]
            lcur[lc] -= k
            rcur[rd] -= k
            xa, xb = x0 + wbox, x1 - wbox
            xm = (xa + xb) / 2
            verts = [
                (xa, ya), (xm, ya), (xm, yb), (xb, yb),
                (xb, yb - k), (xm, yb - k), (xm, ya - k), (xa, ya - k), (xa, ya),
            ]  # fmt: skip
            codes = [MPath.MOVETO, *[MPath.CURVE4] * 3, MPath.LINETO, *[MPath.CURVE4] * 3]
            codes.append(MPath.CLOSEPOLY)
            dark = (c, d) in matched
            ax.add_patch(
                PathPatch(
                    MPath(verts, codes),
                    facecolor="#4a4a4a" if dark else "#c8c8c8",
                    alpha=0.55 if dark else 0.5,
                    lw=0,
                )
            )
        for pos, cur, x, names, kinds, sign in (
            (lp, lcur, x0, old_names, kind_old, -1),
            (rp, rcur, x1 - wbox, new_names, kind_new, 1),
        ):
            for c, (bottom, top) in pos.items():
                ax.add_patch(
                    Rectangle(
                        (x, bottom),
                        wbox,
                        top - bottom,
                        facecolor="white",
                        edgecolor="#222222",
                        lw=0.7,
                    )
                )
                rest = cur[c] - bottom  # members who left (left) or joined (right)
                if rest > 0 and c != "others":
                    ax.add_patch(
                        Rectangle(
                            (x, bottom),
                            wbox,
                            rest,
                            facecolor="white",
                            edgecolor="#222222",
                            hatch="////",
                            lw=0.5,
                        )
                    )
                label = "others" if c == "others" else _label(names.get(c, str(c)), 34)
                event = "" if c == "others" else _EVENT_WORDS.get(kinds.get(c, ""), "")
                size = top - bottom
                text = f"{label}: {size:.0f}" + (f", {event}" if event else "")
                tx = x - 0.01 if sign < 0 else x + wbox + 0.01
                ax.text(
                    tx,
                    (top + bottom) / 2,
                    text,
                    ha="right" if sign < 0 else "left",
                    va="center",
                    fontsize=6.5,
                )
        ax.text(
            x0 + wbox / 2, height + gap * 1.5, "before", ha="center", fontsize=7.5, weight="bold"
        )
        ax.text(
            x1 - wbox / 2, height + gap * 1.5, "after", ha="center", fontsize=7.5, weight="bold"
        )
        ax.set_xlim(-0.55, 1.55)
        ax.set_ylim(-gap, height + gap * 4)
        ax.axis("off")

    rows = max(len(lp), len(rp))
    svg = _draw("flow", (6.6, min(7.5, 1.4 + 0.32 * rows)), paint)
    caption = (
        f"Where the {words['members']} of each {words['community']} went. Left: the "
        f"{words['communities']} of the earlier snapshot; right: those of the later one; box "
        f"height counts {words['members']}. Dark bands join {words['communities']} matched as "
        f"the same, split or merged; light bands are {words['members']} who moved elsewhere. "
        f"Hatched ends: {words['members']} who left the data (left side) or joined it (right "
        "side)."
    )
    return Figure(svg, caption)


def _figure_of(x: float | None) -> str:
    return "-" if x is None else _fmt(x)


def build_change_context(
    changes: Changes,
    old: Any,
    new: Any,
    *,
    title: str,
    kind: str,
    paper: str,
    min_group_size: int,
    made: str,
    inputs: tuple[str, str] = ("", ""),
    pseudonymized: bool = False,
) -> dict[str, Any]:
    """Everything the change report's template shows."""
    v = VOCABULARY.get(kind, VOCABULARY["general"])
    old_names = _names(old, min_group_size)
    new_names = _names(new, min_group_size)
    counts = Counter(e.event for e in changes.events)

    def ids(cs: Sequence[int], names: Mapping[int, str]) -> str:
        return ", ".join(names.get(c, str(c)) for c in cs) or "-"

    events = [
        {
            "event": e.event,
            "words": _EVENT_WORDS[e.event],
            "old": ids(e.old, old_names),
            "new": ids(e.new, new_names),
            "overlap": ", ".join(f"{j:.2f}" for j in e.jaccard) or "-",
            "joined": e.joined,
            "left": e.left,
        }
        for e in changes.events
    ]
    interesting = [e for e in events if e["event"] != "continuation"]
    pairs = sorted(changes.ties.pairs, key=lambda p: (-(p.gained + p.lost), p.a, p.b))
    ctx: dict[str, Any] = {
        "title": title,
        "made": made,
        "paper": "A4" if paper == "a4" else "letter",
        "v": v,
        "kind": kind,
        "fmt": _fmt,
        "min_group_size": min_group_size,
        "pseudonymized": pseudonymized,
        "inputs": inputs,
        "old": old.findings,
        "new": new.findings,
        "seed": new.record.config.seed,
        "members": changes.members,
        "joined_shown": list(changes.members.joined[:TOP]),
        "left_shown": list(changes.members.left[:TOP]),
        "ties": changes.ties,
        "pairs": [
            {
                "a": new_names.get(p.a, str(p.a)),
                "b": new_names.get(p.b, str(p.b)),
                "gained": p.gained,
                "lost": p.lost,
            }
            for p in pairs[:TOP]
        ],
        "n_pairs": len(pairs),
        "event_counts": [(_EVENT_WORDS[k], counts[k]) for k in _EVENT_WORDS if counts[k]],
        "events": (interesting or events)[: TOP * 2],
        "n_events": len(interesting or events),
        "n_continued": counts["continuation"],
        "moved": [
            {
                "member": m.member,
                "from": old_names.get(m.old, str(m.old)),
                "to": new_names.get(m.new, str(m.new)),
            }
            for m in changes.moved[:TOP]
        ],
        "n_moved": len(changes.moved),
        "moved_checked": changes.moved_checked,
        "roles": [
            {
                "member": r.member,
                "role": r.role,
                "change": r.change,
                "before": _figure_of(r.before),
                "after": _figure_of(r.after),
            }
            for r in changes.roles[: TOP * 2]
        ],
        "n_roles": len(changes.roles),
        "threshold": changes.threshold,
        "confident": changes.confident,
        "flow": flow_figure(
            _sizes(old.nodes),
            _sizes(new.nodes),
            _flows(old, new),
            changes.events,
            old_names=old_names,
            new_names=new_names,
            words=v,
        ),
        "directed": changes.directed,
        "spof": changes.as_dict().get("single_points_of_failure"),
        # read by the shared cautions (templates/cautions.html)
        "check_next": [],
        "walks_ignored": any(
            r.findings.directed and r.findings.walks_over.startswith("ties in both directions")
            for r in (old, new)
        ),
        "walks_over": new.findings.walks_over,
    }
    return ctx


def render_changes(folder: Path, context: dict[str, Any], *, pdf: bool = True) -> None:
    """Write ``report.html`` and (when ``pdf``) ``report.pdf`` of the change report into
    ``folder``."""
    html = render_html(context, template="changes.html")
    (Path(folder) / "report.html").write_text(html, encoding="utf-8")
    if pdf:
        write_pdf(html, Path(folder) / "report.pdf")
