"""The graph's ties as index arrays, shared by every measure family (private).

:func:`_ties` checks the graph once (no parallel ties, positive finite weights) and
numbers its nodes in graph order; the measures work on these arrays.
"""

from __future__ import annotations

import numbers
from collections.abc import Hashable, Mapping
from dataclasses import dataclass
from typing import Any

import networkx as nx
import numpy as np

from ...errors import InputError


@dataclass(frozen=True)
class _Ties:
    """The graph's ties as index arrays (self-loops removed)."""

    nodes: list[Hashable]
    src: np.ndarray  # int64
    dst: np.ndarray  # int64
    w: np.ndarray  # float64, positive
    directed: bool

    @property
    def n(self) -> int:
        return len(self.nodes)


def _ties(G: nx.Graph, weight: str | None) -> _Ties:
    if G.is_multigraph():
        raise InputError(
            "the network has parallel ties between the same pair of nodes; merge them "
            "into one tie (summing their weights) before computing role measures."
        )
    nodes = list(G)
    index = {v: i for i, v in enumerate(nodes)}
    src: list[int] = []
    dst: list[int] = []
    wts: list[object] = []
    if weight is None:
        for u, v in G.edges():
            if u != v:
                src.append(index[u])
                dst.append(index[v])
        w = np.ones(len(src), dtype=np.float64)
    else:
        for u, v, x in G.edges(data=weight, default=1.0):
            if u != v:
                src.append(index[u])
                dst.append(index[v])
                wts.append(x)
        try:
            w = np.asarray(wts, dtype=np.float64)
        except (TypeError, ValueError):
            bad = next(x for x in wts if not isinstance(x, numbers.Real))
            raise InputError(
                f"tie weights must be positive numbers; found {bad!r} in the "
                f"'{weight}' attribute. Fix or remove that weight."
            ) from None
        if w.size and not (np.all(np.isfinite(w)) and float(w.min()) > 0.0):
            i = int(np.flatnonzero(~(np.isfinite(w) & (w > 0)))[0])
            raise InputError(
                f"tie weights must be positive numbers (bigger = closer tie); the tie "
                f"{nodes[src[i]]!r} - {nodes[dst[i]]!r} has weight {wts[i]!r}. "
                "Give it a positive weight or remove the tie."
            )
    return _Ties(
        nodes=nodes,
        src=np.asarray(src, dtype=np.int64),
        dst=np.asarray(dst, dtype=np.int64),
        w=w,
        directed=G.is_directed(),
    )


def _codes(ties: _Ties, community: Mapping[Any, Hashable]) -> np.ndarray:
    missing = [v for v in ties.nodes if v not in community]
    if missing:
        raise InputError(
            f"{len(missing)} node(s) have no community label (the first is "
            f"{missing[0]!r}); give every node of the network a community."
        )
    label_code: dict[Hashable, int] = {}
    return np.fromiter(
        (label_code.setdefault(community[v], len(label_code)) for v in ties.nodes),
        dtype=np.int64,
        count=ties.n,
    )


def _symmetric(ties: _Ties) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """CSR arrays (indptr, indices, data) of ``W + W.T``, indices sorted in each row.

    Each tie counts for both of its ends, whatever its direction; a reciprocated
    directed pair sums into one entry per row.
    """
    rows = np.concatenate([ties.src, ties.dst])
    cols = np.concatenate([ties.dst, ties.src])
    vals = np.concatenate([ties.w, ties.w])
    order = np.lexsort((cols, rows))
    rows, cols, vals = rows[order], cols[order], vals[order]
    if rows.size:
        first = np.ones(rows.size, dtype=bool)
        first[1:] = (rows[1:] != rows[:-1]) | (cols[1:] != cols[:-1])
        starts = np.flatnonzero(first)
        rows, cols, vals = rows[starts], cols[starts], np.add.reduceat(vals, starts)
    indptr = np.zeros(ties.n + 1, dtype=np.int64)
    np.cumsum(np.bincount(rows, minlength=ties.n), out=indptr[1:])
    return indptr, cols.astype(np.int64), vals


def _by_community(ties: _Ties, codes: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Tie weight between each node and each community it touches.

    Returns ``(node, community, weight)`` arrays, one entry per touched pair, built from
    ``W + W.T`` (for a directed graph: total degree, in + out).
    """
    rows = np.concatenate([ties.src, ties.dst])
    comm = np.concatenate([codes[ties.dst], codes[ties.src]])
    vals = np.concatenate([ties.w, ties.w])
    n_comm = int(codes.max()) + 1 if codes.size else 1
    pair, inverse = np.unique(rows * n_comm + comm, return_inverse=True)
    total = np.bincount(inverse.ravel(), weights=vals, minlength=pair.size)
    return pair // n_comm, pair % n_comm, total
