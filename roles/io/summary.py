"""summary.json: built from a run's typed results, in one place.

The keys, their order and the rounding are the file's schema (README, "summary.json");
the report never reads this dict back.
"""

from __future__ import annotations

import dataclasses
from typing import TYPE_CHECKING, Any

import numpy as np

from ..report.notes import ISOLATED_TREATMENT, withheld_explanation

if TYPE_CHECKING:
    from ..results import Result

__all__ = ["summary_of", "saved"]


def saved(x: Any, digits: int = 4) -> float | None:
    """``x`` as summary.json gives it: rounded to ``digits`` places, None when missing or
    not finite (the report prints its figures through this too, so the two agree)."""
    if x is None or not np.isfinite(x):
        return None
    return round(float(x), digits)


def summary_of(result: Result) -> dict[str, Any]:
    """The content of ``summary.json`` for ``result`` (timings included).

    Parameters
    ----------
    result : roles.results.Result

    Returns
    -------
    dict
        JSON-ready: lists, dicts, numbers, strings and None only.
    """
    f = result.findings
    comparison = result.comparison
    groupings = result.groupings
    record = result.record
    summary: dict[str, Any] = {
        "nodes": f.nodes,
        "edges": f.edges,
        "directed": f.directed,
        "isolated": {
            "count": len(f.isolated),
            "names": f.isolated[:50],
            "treatment": ISOLATED_TREATMENT,
        },
        "communities": f.communities,
        "grouped": f.grouped,
        "community_view": f.community_view,
        "walks_over": f.walks_over,
        "view_modularity": {v: saved(m) for v, m in f.view_modularity.items()},
        "bridges": [str(b) for b in f.bridges],
        "hubs": [str(h) for h in f.hubs],
        "roles_withheld": (
            {
                "reason": f.roles_withheld.reason,
                "explanation": withheld_explanation(f.roles_withheld.reason, f.roles_withheld.z),
            }
            if f.roles_withheld is not None
            else None
        ),
        "traffic": [str(v) for v in f.traffic],
        "single_points_of_failure": [p.as_summary() for p in f.single_points],
        "views": {
            "ari": comparison.ari if comparison else None,
            "nmi": comparison.nmi if comparison else None,
            "neighbours_compared": comparison.k if comparison else 0,
            "groups": {v: g.n_groups for v, g in groupings.items()},
            "noise_share": {v: round(g.noise_share, 4) for v, g in groupings.items()},
            "contingency": comparison.contingency.tolist() if comparison else [],
        },
        "modularity": {
            "communities": round(f.modularity.communities, 4),
            "louvain": round(f.modularity.louvain, 4),
            "louvain_groups": f.modularity.louvain_groups,
            "nmi_with_louvain": round(f.modularity.nmi_with_louvain, 4),
        },
        "betweenness": dataclasses.asdict(f.betweenness) if f.betweenness is not None else {},
        "confidence_budget": result.budgets.confidence,
        "walk_budget": result.budgets.walk,
        "cluster_budget": result.budgets.cluster,
        "parameters": {**record.config.as_dict(), "directed": f.directed},
        "input": record.input,
        "versions": record.versions,
        "timings": record.timings,
        "view_timings": record.view_timings,
    }
    if result.what_if is not None:
        summary["what_if"] = [r.as_summary() for r in result.what_if.scenarios]
        summary["robustness"] = result.what_if.robustness.as_summary()
    if result.final_customers is not None:
        summary["final_customers"] = [c.as_summary() for c in result.final_customers]
    if result.confidence is not None:
        summary.update(result.confidence.as_summary())
    if result.formal is not None:
        g = result.formal
        summary["formal"] = {
            "attribute": g.attribute,
            "nmi": round(g.nmi, 4),
            "ei_index": {k: round(v, 4) for k, v in g.ei_index.items()},
            "ei_expected": {str(k): saved(r.expected) for k, r in g.ei_test.iterrows()},
            "ei_p_value": {str(k): saved(r.p_value) for k, r in g.ei_test.iterrows()},
            "ei_verdict": {str(k): str(r.verdict) for k, r in g.ei_test.iterrows()},
            "crosstab": {
                str(k): {str(c): int(v) for c, v in row.items()} for k, row in g.crosstab.iterrows()
            },
        }
    return summary
