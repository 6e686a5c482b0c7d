"""The rules every format shares: what a name and a weight may be, and the graph built.

Names are refused when they hold control characters or print as nothing; weights when
they are not finite numbers of at least 0 or fall outside what a 32-bit float holds.
:func:`_build_graph` drops ties of weight 0, counts what it dropped and builds the
networkx graph every format ends in.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable

import networkx as nx
import numpy as np

from ...errors import InputError
from ..names import lookalike_groups, skeleton
from .files import _show

__all__: list[str] = []

# In names, tabs, line breaks and lone surrogates are refused too.
_BAD_NAME = re.compile("[\x00-\x1f\x7f-\x9f\ud800-\udfff\ufffe\uffff]")
# The same without NUL, to scan names joined by NUL (text with NUL is refused earlier).
_BAD_NAME_JOINED = re.compile("[\x01-\x1f\x7f-\x9f\ud800-\udfff\ufffe\uffff]")

# Ties are stored as 32-bit floats (graph.CSRGraph): a positive weight must lie between
# the smallest normal and the largest finite float32, or it would become 0 (or lose its
# precision) or infinity there.
_WEIGHT_MIN = float(np.finfo(np.float32).tiny)  # 1.1754944e-38
_WEIGHT_MAX = float(np.finfo(np.float32).max)  # 3.4028235e+38


def _weight_problem(value: str, column: str) -> str:
    """What is wrong with a weight cell and what to do, as one sentence pair."""
    v = value.strip()
    if not v:
        return f"the {column!r} cell is empty. Fill in a number, or delete the row."
    try:
        x = float(v)
    except ValueError:
        if re.fullmatch(r"[+-]?\d+,\d+", v):
            fix = "Write decimals with a point (2.5, not 2,5)."
        else:
            fix = "Weights must be numbers such as 1, 2.5 or 0.3."
        return f"the weight {_show(value)} is not a number. {fix}"
    if math.isnan(x):
        return f"the weight {_show(value)} is not a number (NaN). Give a number, or delete the row."
    if math.isinf(x):
        return f"the weight {_show(value)} is infinite. Give a finite number."
    return (
        f"the weight {_show(value)} is negative. Tie strengths must be 0 or more; a "
        "negative tie cannot be walked."
    )


def _weight_range_problem(value: str, column: str) -> str | None:
    """What is wrong with a finite weight of 0 or more that 32-bit floats cannot hold."""
    x = float(value)
    if 0.0 < x < _WEIGHT_MIN:
        return (
            f"the {column!r} value {_show(value)} is smaller than {_WEIGHT_MIN:.2g}, the "
            "smallest tie strength the tool stores (as a 32-bit number); it would become 0. "
            "Multiply all weights by the same factor (say 1e30), which keeps every "
            "proportion between ties, or write 0 for no tie."
        )
    if x > _WEIGHT_MAX:
        return _too_large(value, column)
    return None


def _too_large(value: str, column: str, summed: bool = False) -> str:
    what = "repeated rows of this tie add up to" if summed else f"the {column!r} value is"
    return (
        f"{what} {_show(value)}, more than {_WEIGHT_MAX:.3g}, the largest tie strength "
        "the tool stores (as a 32-bit number). Divide all weights by the same factor "
        "(say 1e30), which keeps every proportion between ties."
    )


_INVISIBLE_NAME = (
    "the name {} is made only of characters that print as nothing (zero-width or "
    "format characters), so it would show as an empty name. Fill it in or delete the row."
)


def _invisible_name(names: Iterable[str]) -> str | None:
    """The first name made only of invisible characters, if any."""
    for name in names:
        if not name.isascii() and not skeleton(name):
            return name
    return None


def _name_problem(name: str) -> str | None:
    m = _BAD_NAME.search(name)
    if m is None:
        return None
    ch = m.group()
    kind = {"\t": "a tab", "\n": "a line break", "\r": "a line break"}.get(ch)
    return kind or f"the control character U+{ord(ch):04X}"


def _build_graph(
    names: Iterable[str],
    edges: dict[tuple[str, str], float],
    directed: bool,
    counts: dict[str, int],
    path: str,
) -> nx.Graph:
    kept = [(a, b, w) for (a, b), w in edges.items() if w > 0.0]
    counts["zero_weight_edges_dropped"] = len(edges) - len(kept)
    if not kept:
        if edges:
            zero_rows = counts["rows_read"] - counts["self_loops_dropped"]
            raise InputError(
                f"all {zero_rows} weights are 0, so there is no tie to analyse. A weight "
                "of 0 means no tie; give the ties' strengths, or drop the weight column "
                "to count every row as 1.",
                path=path,
            )
        if counts["self_loops_dropped"]:
            raise InputError(
                "every tie is a self-loop (a node tied to itself), so no tie is left once "
                "they are dropped. Each row must name two different nodes.",
                path=path,
            )
        raise InputError("the network has no ties. Give at least one tie.", path=path)
    graph: nx.Graph = nx.DiGraph() if directed else nx.Graph()
    graph.add_nodes_from(names)
    graph.add_weighted_edges_from(kept, weight="weight")
    counts["lookalike_names"] = sum(len(g) for g in lookalike_groups(graph))
    counts["nodes"] = graph.number_of_nodes()
    counts["edges"] = graph.number_of_edges()
    return graph
