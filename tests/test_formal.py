"""Formal groups against the network: worked examples and outside references.

Sources: brokerage definitions of Gould & Fernandez (Sociological Methodology 19,
1989); E-I index of Krackhardt & Stern (Social Psychology Quarterly 51, 1988); NMI of
scikit-learn (``normalized_mutual_info_score``).
"""

from __future__ import annotations

import itertools
import math

import networkx as nx
import numpy as np
import pytest
from sklearn.metrics import normalized_mutual_info_score

from roles.analysis.formal import BROKERAGE_ROLES, brokerage, crosstab, ei_index, formal_nmi
from roles.errors import InputError

# ---------------------------------------------------------------------- brokerage


def test_brokerage_directed_worked_by_hand():
    # Groups: x, y, z, v in A; w, u in B; t in C.
    # Ties: x->v, w->v, v->y, v->u, v->t, v->z, x->y, u->w.
    # Paths a -> v -> b with a != b and no tie a -> b (Gould & Fernandez 1989):
    #   through v (A): pred {x, w}, succ {y, u, t, z}
    #     x(A) v y(A): x->y exists, not counted
    #     x(A) v u(B): representative     x(A) v t(C): representative
    #     x(A) v z(A): coordinator
    #     w(B) v y(A): gatekeeper         w(B) v z(A): gatekeeper
    #     w(B) v u(B): itinerant (no tie w->u; u->w points the other way)
    #     w(B) v t(C): liaison
    #   through u (B): v(A) u w(B), no tie v->w: gatekeeper
    #   through w (B): u(B) w v(A), no tie u->v: representative
    #   x, w have no suppliers... x has none; y, t, z have no customers: nothing.
    G = nx.DiGraph(
        [("x", "v"), ("w", "v"), ("v", "y"), ("v", "u"), ("v", "t"), ("v", "z")]
        + [("x", "y"), ("u", "w")]
    )
    groups = {"x": "A", "y": "A", "z": "A", "v": "A", "w": "B", "u": "B", "t": "C"}
    table = brokerage(G, groups)
    assert list(table.columns) == list(BROKERAGE_ROLES)
    #                                 coord itin repr gate liaison
    assert table.loc["v"].tolist() == [1, 1, 2, 2, 1]
    assert table.loc["u"].tolist() == [0, 0, 0, 1, 0]
    assert table.loc["w"].tolist() == [0, 0, 1, 0, 0]
    for quiet in ("x", "y", "z", "t"):
        assert table.loc[quiet].tolist() == [0, 0, 0, 0, 0]


def test_brokerage_undirected_worked_by_hand():
    # v (A) is tied to p, q (A), r, r2 (B) and s (C); p and q are also tied.
    # Each tie counts both ways, so v brokers every ordered pair of distinct
    # neighbours not tied to each other: 5 * 4 - 2 (p,q and q,p) = 18 paths.
    #   a in {p, q}, b in {r, r2, s}: representative, 2 * 3 = 6
    #   a in {r, r2, s}, b in {p, q}: gatekeeper, 6
    #   (r, r2), (r2, r): itinerant, 2
    #   (r, s), (r2, s), (s, r), (s, r2): liaison, 4
    # p: paths v-p-q and q-p-v have the tie v-q, so nothing; leaves broker nothing.
    G = nx.Graph([("v", x) for x in ("p", "q", "r", "r2", "s")] + [("p", "q")])
    groups = {"v": "A", "p": "A", "q": "A", "r": "B", "r2": "B", "s": "C"}
    table = brokerage(G, groups)
    assert table.loc["v"].tolist() == [0, 2, 6, 6, 4]
    assert table.drop(index="v").to_numpy().sum() == 0


def _brute_brokerage(G, groups):
    directed = G.is_directed()
    out = {v: dict.fromkeys(BROKERAGE_ROLES, 0) for v in G}
    for v in G:
        preds = G.pred[v] if directed else G.adj[v]
        succs = G.succ[v] if directed else G.adj[v]
        for a, b in itertools.product(preds, succs):
            if len({a, v, b}) < 3 or G.has_edge(a, b):
                continue
            if not all(x in groups for x in (a, v, b)):
                continue
            ga, gv, gb = groups[a], groups[v], groups[b]
            if ga == gv == gb:
                role = "coordinator"
            elif ga == gb:
                role = "itinerant"
            elif ga == gv:
                role = "representative"
            elif gv == gb:
                role = "gatekeeper"
            else:
                role = "liaison"
            out[v][role] += 1
    return out


@pytest.mark.parametrize("seed", [0, 1, 2, 3])
@pytest.mark.parametrize("directed", [True, False])
def test_brokerage_matches_triple_loop_on_random_graphs(seed, directed):
    # Reference: the definition applied literally, every (a, b) pair of every node.
    G = nx.gnm_random_graph(40, 160, directed=directed, seed=seed)
    G.add_edge(3, 3)
    rng = np.random.default_rng(seed)
    groups = {v: f"g{rng.integers(0, 3)}" for v in G if v != 7}  # node 7 has no group
    table = brokerage(G, groups)
    expected = _brute_brokerage(G, groups)
    for v in G:
        assert table.loc[v].tolist() == [expected[v][r] for r in BROKERAGE_ROLES]


# ----------------------------------------------------------------------- E-I index


def test_ei_index_hand_count():
    # Groups A = {1, 2, 3}, B = {4, 5}, C = {6} (no ties).
    # Ties: 1-2, 2-3 (internal A), 4-5 (internal B), 3-4 and 1-5 (A-B).
    # A: E = 2, I = 2 -> 0.  B: E = 2, I = 1 -> 1/3.  C: no ties -> undefined.
    G = nx.Graph([(1, 2), (2, 3), (4, 5), (3, 4), (1, 5)])
    G.add_node(6)
    groups = {1: "A", 2: "A", 3: "A", 4: "B", 5: "B", 6: "C"}
    ei = ei_index(G, groups)
    assert ei["A"] == 0.0
    assert ei["B"] == pytest.approx(1 / 3)
    assert math.isnan(ei["C"])
    # Directed, with 2 <-> 3 and 4 <-> 5 reciprocated: each tie still counts once.
    D = nx.DiGraph([(1, 2), (2, 3), (3, 2), (4, 5), (5, 4), (4, 3), (1, 5)])
    D.add_node(6)
    assert ei_index(D, groups) == pytest.approx(ei, nan_ok=True)


def test_ei_index_all_inside_and_all_outside():
    # Krackhardt & Stern (1988): -1 when every tie is internal, +1 when every tie is
    # external. Ties to nodes without a group are left out.
    G = nx.Graph([("a", "b"), ("c", "d"), ("a", "zz")])
    ei = ei_index(G, {"a": "in", "b": "in", "c": "out1", "d": "out2"})
    assert ei == {"in": -1.0, "out1": 1.0, "out2": 1.0}


# ----------------------------------------------------------------- crosstab and NMI


def test_crosstab_counts_members():
    groups = {"a": "sales", "b": "sales", "c": "ops", "d": "ops", "e": "ops", "f": "ops"}
    communities = {"a": 0, "b": 1, "c": 1, "d": 1, "e": 1}  # f has no community
    table = crosstab(groups, communities)
    # Hand count: sales -> {0: 1, 1: 1}; ops -> {0: 0, 1: 3}.
    assert table.loc["sales"].tolist() == [1, 1]
    assert table.loc["ops"].tolist() == [0, 3]
    assert table.to_numpy().sum() == 5


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_formal_nmi_matches_scikit_learn(seed):
    rng = np.random.default_rng(seed)
    nodes = [f"n{i}" for i in range(200)]
    groups = {v: f"dept{rng.integers(0, 4)}" for v in nodes}
    communities = {v: int(rng.integers(0, 6)) for v in nodes[:180]}
    common = nodes[:180]
    expected = normalized_mutual_info_score(
        [groups[v] for v in common], [communities[v] for v in common]
    )
    assert formal_nmi(groups, communities) == pytest.approx(expected, abs=1e-12)


def test_formal_nmi_extremes_and_refusal():
    # From the definition: identical partitions under other labels give 1; a group
    # split evenly over the same two communities as the other group gives 0.
    assert formal_nmi({1: "a", 2: "a", 3: "b"}, {1: 9, 2: 9, 3: 4}) == pytest.approx(1.0)
    assert formal_nmi({1: "a", 2: "a", 3: "b", 4: "b"}, {1: 0, 2: 1, 3: 0, 4: 1}) == 0.0
    with pytest.raises(InputError):
        formal_nmi({1: "a"}, {2: 0})
