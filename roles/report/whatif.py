"""The "if members were gone" section: removal scenarios and robustness in words.

Reads the :class:`~roles.analysis.whatif.WhatIf` the pipeline stored in ``Result.what_if`` and
turns it into short tables, sentences and the robustness figure. Nothing here is
computed that the findings rest on; it only selects, rounds and words.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np

from ..analysis.whatif import Removal, RobustnessCurve, WhatIf
from ..results import Result
from . import figures

__all__ = ["what_if_context", "SECTION_TITLE", "NAMES_SHOWN"]

#: The section's title in the reader's words.
SECTION_TITLE = {
    "organisation": "If people left",
    "supply": "If firms failed",
    "general": "If members were gone",
}

#: Names listed in a scenario table before "and N more".
NAMES_SHOWN = 8

_WHY = {
    "asked": "named for this report",
    "single point of failure": "a single point of failure (most dependents)",
    "bridge-like": "bridge-like (links {communities})",
    "single point of failure, bridge-like": "a single point of failure and bridge-like",
    "pair": "the pair that cuts off the most",
}


def _names(names: Sequence[str], limit: int = NAMES_SHOWN) -> str:
    if not names:
        return "none"
    shown = ", ".join(names[:limit])
    more = len(names) - limit
    return shown + (f" and {more:,} more" if more > 0 else "")


def _half_point(curve: RobustnessCurve) -> float | None:
    """Share removed when the largest connected part first falls below half of all."""
    below = np.flatnonzero(curve.largest < 0.5)
    return float(curve.removed[below[0]]) if below.shape[0] else None


def _three(x: float) -> str:
    """At least three decimals, and three significant digits below 0.1."""
    if x <= 0:
        return "0"
    return f"{x:.{max(3, 2 - int(np.floor(np.log10(x))))}f}"


def _pct(x: float) -> str:
    return f"{100 * x:.0f}%"


def _scenario(r: Removal, v: Mapping[str, str], directed: bool, grouped: bool) -> dict[str, Any]:
    rows: list[tuple[str, str]] = []
    why = _WHY.get(r.why, r.why).format(**v)
    if r.why == "pair":
        why += f" ({r.pairs_tried:,} pairs tried)"
    rows.append(("Why this scenario", why))
    cut = len(r.cut_off)
    if directed:
        label = f"{v['Members']} left without any source of supply"
    else:
        label = f"{v['Members']} cut off from the main body of their part"
    rows.append((label, f"{cut:,}" + (f": {_names(r.cut_off)}" if cut else "")))
    if r.final_customers_cut_off is not None:
        final = r.final_customers_cut_off
        rows.append(
            (
                "Of these, final customers (no customers of their own)",
                f"{len(final):,}" + (f": {_names(final)}" if final else ""),
            )
        )
    lost = f"{r.ties_lost:,}"
    if grouped:
        lost += f", {r.ties_lost_between_communities:,} of them between {v['communities']}"
    rows.append((f"{v['ties'].capitalize()} lost", lost))
    if grouped:
        falls = [
            f"{v['Community']} {a} – {v['Community']} {b}: {t.before:,} → {t.after:,}"
            for t in r.community_ties
            for a, b in [t.communities]
        ]
        rows.append(
            (
                f"Links between {v['communities']} lost or more than halved",
                "; ".join(falls[:NAMES_SHOWN]) if falls else "none",
            )
        )
        split = ", ".join(f"{v['Community']} {c}" for c in r.communities_split)
        rows.append((f"{v['Communities']} that fall apart", split or "none"))
    e0, e1 = r.efficiency_before, r.efficiency_after
    change = f" ({(e1 - e0) / e0:+.1%})" if e0 > 0 else ""
    eff = f"{_three(e0)} → {_three(e1)}{change}"
    if not r.efficiency_exact:
        eff += (
            f", estimated from {r.efficiency_sources:,} randomly chosen {v['members']} "
            f"(± {r.efficiency_error:.2g})"
        )
    rows.append(("How easily the rest reach one another (global efficiency)", eff))
    return {"removed": _names(r.removed, 20), "rows": rows}


def _meaning(what: WhatIf, v: Mapping[str, str]) -> str:
    """One or two sentences on what the robustness curves say about this network."""
    attack, failure = what.robustness.betweenness_order, what.robustness.random_order
    start = float(attack.largest[0])
    if start < 0.5:
        return (
            f"Even before anyone is removed, the largest connected part holds only "
            f"{_pct(start)} of the {v['members']}: the recorded {v['network']} is already in "
            "pieces, so read the curves with care."
        )
    a, f = _half_point(attack), _half_point(failure)
    text = (
        f"Taking out the {v['members']} that lie on the most shortest paths first, the "
        f"largest connected part falls below half of all {v['members']} once "
        f"{_pct(a or 1.0)} of them are gone; taken out at random, once {_pct(f or 1.0)} are "
        "gone. "
    )
    # Our own reading, not a published bound: a betweenness-order R below half the
    # random-order R means a few members carry the cohesion.
    if attack.R < 0.5 * failure.R:
        text += (
            f"The {v['network']} holds up against chance losses far better than against the "
            f"loss of its most in-between {v['members']} (R {attack.R:.2f} against "
            f"{failure.R:.2f}): its cohesion rests on a few of them."
        )
    else:
        text += (
            f"Losing the most in-between {v['members']} first does more harm than chance "
            f"losses (R {attack.R:.2f} against {failure.R:.2f} at random), but less than "
            f"twice as much: the {v['network']} does not hang on a few {v['members']} alone."
        )
    return text


def what_if_context(result: Result, v: Mapping[str, str], kind: str) -> dict[str, Any] | None:
    """The section's tables, sentences and figure; None when the run made none.

    Parameters
    ----------
    result : Result
        What the pipeline found; only read.
    v : mapping
        The report's vocabulary (:data:`roles.report.context.VOCABULARY`).
    kind : {'organisation', 'supply', 'general'}
        Chooses the section title.

    Returns
    -------
    dict or None
    """
    what = result.what_if
    if what is None:
        return None
    directed = result.findings.directed
    grouped = result.findings.grouped
    rob = what.robustness
    figure = figures.robustness_chart(
        rob.betweenness_order.removed,
        rob.betweenness_order.largest,
        rob.random_order.largest,
        R=(rob.betweenness_order.R, rob.random_order.R),
        words=v,
    )
    return {
        "title": SECTION_TITLE.get(kind, SECTION_TITLE["general"]),
        "asked": what.asked,
        "directed": directed,
        "scenarios": [_scenario(r, v, directed, grouped) for r in what.scenarios],
        "figure": figure,
        "meaning": _meaning(what, v),
        "orders": rob.random_orders,
        "sources": what.scenarios[0].efficiency_sources if what.scenarios else 0,
        "sampled": any(not r.efficiency_exact for r in what.scenarios),
    }
