"""Role findings a reader can trust: bridge-like, withheld roles, who is cut off, E-I.

Every test calls the measure functions with given communities or groups, so no result
here depends on how the embedding and clustering happen to group a network.
"""

from __future__ import annotations

import networkx as nx
import numpy as np
import pandas as pd
import pytest

from roles.analysis.confidence import structure_test
from roles.analysis.findings import Withheld, roles_withheld, single_points
from roles.analysis.formal import EI_MIN_GAP, ei_expected, ei_index, ei_test
from roles.analysis.measures import (
    BRIDGE_SHARE,
    high_betweenness,
    rank_bridges,
    rank_hubs,
    rank_traffic,
    role_table,
)
from roles.analysis.whatif import cut_off_each
from roles.report.notes import withheld_explanation

# ------------------------------------------------------------------ bridge-like


def _connecting(G: nx.Graph, comm: dict) -> set:
    return {v for u, w in G.edges() if comm[u] != comm[w] for v in (u, w)}


@pytest.mark.parametrize("cliques,size", [(3, 4), (4, 5), (6, 6), (8, 6), (5, 8), (10, 4)])
def test_ring_of_cliques_every_connecting_member_is_bridge_like(cliques, size):
    # networkx ring_of_cliques: each clique tied to the next by one tie between two
    # members; those members carry all traffic between cliques, every analyst names them
    # the bridges, and by symmetry they all have the same, highest betweenness.
    G = nx.ring_of_cliques(cliques, size)
    comm = {v: v // size for v in G}
    table = role_table(G, comm)
    connecting = _connecting(G, comm)
    bridges = rank_bridges(table)
    assert set(bridges) == connecting
    assert set(table.index[table.role == "bridge-like"]) == connecting  # nobody else
    # They lead the traffic list too, which ignores the communities.
    traffic = rank_traffic(table)
    assert set(traffic[: len(connecting)]) == connecting
    # Their participation is (size-1)/size inside, 1/size outside: under the published
    # 0.30 connector boundary for size >= 6, which is why participation alone missed them.
    p = 1 - ((size - 1) / size) ** 2 - (1 / size) ** 2
    assert table.loc[sorted(connecting), "participation"].to_numpy() == pytest.approx(p)


def test_ring_of_cliques_keeps_equal_scores_together():
    # 12 connecting members of 36 (a third) all share the highest betweenness (networkx
    # agrees they are equal): the top-10% cut (4 members) must not split them.
    G = nx.ring_of_cliques(6, 6)
    nxb = nx.betweenness_centrality(G)
    conn = _connecting(G, {v: v // 6 for v in G})
    assert max(nxb[v] for v in conn) == pytest.approx(min(nxb[v] for v in conn))
    assert sum(high_betweenness(nxb, BRIDGE_SHARE).values()) == 12


def test_central_member_without_outside_ties_is_not_bridge_like():
    # A star inside one community, tied to another community only through a leaf: the
    # centre has the highest betweenness but no tie outside its community.
    G = nx.star_graph(6)
    G.add_edges_from([(6, 7), (7, 8), (8, 9), (9, 7)])
    comm = {v: 0 if v <= 6 else 1 for v in G}
    # Pairs through 0: 10 among its leaves + 5 x 4 to the far side = 30; through 6:
    # 6 x 3 = 18; through 7: 7 x 2 = 14 (counted by hand; networkx agrees on the order).
    table = role_table(G, comm, bridge_share=0.3)
    assert rank_traffic(table, 0.3) == [0, 6, 7]
    assert table.loc[0, "role"] == "member"  # central, but no tie outside its community
    assert rank_bridges(table) == [6, 7]


# ----------------------------------------------------------- Krackhardt's kite


def _nodes(G: nx.Graph, comm: dict) -> pd.DataFrame:
    t = role_table(G, comm)
    return pd.DataFrame({"node": [str(v) for v in t.index], "dependents": t.dependents.values})


def test_kite_traffic_and_who_is_cut_off():
    # Krackhardt (1990), networkx krackhardt_kite_graph: node 7 ("Heather") has the
    # highest betweenness (networkx 0.389); removing 7 leaves 8 and 9 beyond it, and
    # removing 8 leaves 9.
    G = nx.krackhardt_kite_graph()
    nxb = nx.betweenness_centrality(G)
    assert max(nxb, key=nxb.get) == 7
    table = role_table(G, dict.fromkeys(G, 0))
    assert rank_traffic(table)[0] == 7
    G = nx.relabel_nodes(G, str)
    spof = single_points(G, _nodes(G, dict.fromkeys(G, 0)))
    by_node = {e.node: e for e in spof}
    assert by_node["7"].cut_off == ("8", "9") and by_node["7"].dependents == 2
    assert by_node["8"].cut_off == ("9",)
    assert by_node["8"].one_tie_each is True  # 9 has one tie (to 8)
    assert by_node["7"].one_tie_each is False  # 8 has two
    assert [e.node for e in spof] == ["7", "8"]


@pytest.mark.parametrize(
    "G",
    [
        nx.karate_club_graph(),  # Zachary 1977, bundled with networkx
        nx.florentine_families_graph(),  # Padgett & Ansell 1993, bundled with networkx
        nx.les_miserables_graph(),  # Knuth 1993, bundled with networkx
        nx.random_labeled_tree(60, seed=3),
    ],
)
def test_cut_off_names_match_networkx_components(G):
    # Against networkx: remove the member; everyone outside the largest remaining piece
    # of its component is cut off (no ties of equal size in these graphs' pieces).
    G = nx.relabel_nodes(G, str)
    nodes = _nodes(G, dict.fromkeys(G, 0))
    for e in single_points(G, nodes):
        H = G.copy()
        H.remove_node(e.node)
        pieces = sorted(nx.connected_components(H), key=len, reverse=True)
        expected = sorted(v for p in pieces[1:] for v in p)
        assert list(e.cut_off) == expected and len(expected) == e.dependents


def test_directed_cut_off_is_the_dominated_set():
    # A supplier chain s -> a -> {b, c}, c also from s2 (an independent source): a's
    # loss cuts off b only; networkx.immediate_dominators agrees.
    G = nx.DiGraph([("s", "a"), ("a", "b"), ("a", "c"), ("s2", "c")])
    assert cut_off_each(G, ["a", "s"]) == {"a": ("b",), "s": ("a", "b")}


# ------------------------------------------------------------ withheld roles


@pytest.mark.parametrize("seed", range(3))
def test_random_graph_withholds_hubs_and_bridges(seed):
    # Erdos-Renyi G(n, p) (networkx gnp_random_graph): no structure beyond chance; the
    # structure test (Guimera, Sales-Pardo & Amaral 2004) says not clear.
    G = nx.gnp_random_graph(80, 0.15, seed=seed)
    labels = {v: 1 + v % 4 for v in G}
    test = structure_test(G, labels, randomisations=10, seed=seed)
    assert test.tested and not test.clear
    withheld = roles_withheld(True, test)
    assert withheld is not None and withheld.reason == "structure not clear"
    assert f"(z = {test.z:.2f})" in withheld_explanation(withheld.reason, withheld.z)


def test_no_groups_withholds_and_clear_structure_does_not():
    assert roles_withheld(False, None).reason == "no groups"
    G = nx.ring_of_cliques(6, 6)
    test = structure_test(G, {v: v // 6 for v in G}, randomisations=10, seed=0)
    assert test.clear  # six cliques on a ring: as clear as structure gets
    assert roles_withheld(True, test) is None
    assert roles_withheld(True, None) is None  # not tested: the labels stand


def test_pipeline_on_a_random_graph_gives_empty_hubs_and_bridges():
    from roles import run

    G = nx.gnp_random_graph(60, 0.2, seed=1)
    result = run(G)
    s = result.summary
    assert s["structure"]["tested"] and not s["structure"]["clear"]
    assert s["hubs"] == [] and s["bridges"] == []
    assert s["roles_withheld"]["reason"] in ("no groups", "structure not clear")
    assert not result.nodes.role.isin(["hub-like", "bridge-like", "connector hub"]).any()
    # What does not depend on the groups still stands.
    b = result.nodes.set_index("node").betweenness
    assert s["traffic"][0] == b.idxmax()


# ------------------------------------------------------------------ E-I index


def test_expected_ei_follows_the_group_size_formula():
    # FIELD.md "Group-size effects": with ties at random and counted once, a group with
    # share s expects (2 - 3s) / (2 - s); the finite-population form tends to it.
    groups = {i: "a" if i < 600 else "b" for i in range(2000)}
    exp = ei_expected(groups)
    for g, s in (("a", 0.3), ("b", 0.7)):
        assert exp[g] == pytest.approx((2 - 3 * s) / (2 - s), abs=1e-3)


@pytest.mark.parametrize("seed", range(10))
def test_sizes_alone_are_not_headlined(seed):
    # Random ties (networkx gnp_random_graph) with one group of 90% of the members: its
    # E-I is strongly negative by size alone ((2 - 2.7) / 1.1 = -0.64) but no different
    # from what its size predicts.
    G = nx.gnp_random_graph(120, 0.08, seed=seed)
    groups = {v: "big" if v < 108 else "small" for v in G}
    t = ei_test(G, groups, permutations=199, seed=seed)
    assert t.loc["big", "ei"] < -0.5
    assert set(t.verdict) == {"as sizes predict"}


@pytest.mark.parametrize("seed", range(10))
def test_more_inward_than_sizes_predict_is_headlined(seed):
    # Planted partition (networkx random_partition_graph): two equal groups, ties four
    # times likelier inside. Sizes predict E-I = 1/3 for each; observed near -0.6.
    G = nx.random_partition_graph([40, 40], 0.2, 0.05, seed=seed)
    groups = {v: "a" if v < 40 else "b" for v in G}
    t = ei_test(G, groups, permutations=199, seed=seed)
    assert t.expected.to_numpy() == pytest.approx(
        [(2 * 40 - 39) / (2 * 40 + 39)] * 2
    )  # finite form of (2 - 3s) / (2 - s) at s = 1/2
    assert set(t.verdict) == {"more inward"}
    assert (t.expected - t.ei >= EI_MIN_GAP).all()


def test_ei_permuted_mean_near_expectation_and_observed_kept():
    G = nx.gnp_random_graph(200, 0.05, seed=4)
    groups = {v: ("x", "y", "z")[v % 3] if v < 150 else "w" for v in G}
    t = ei_test(G, groups, permutations=299, seed=0)
    obs = ei_index(G, groups)
    assert t.ei.to_dict() == pytest.approx(obs)
    # Krackhardt & Stern's permutation baseline and the size formula agree on random ties.
    assert np.abs(t.permuted - t.expected).max() < 0.05


def test_tiers_with_ties_only_between_them_are_not_outward_looking():
    # A layered supply web: every tie runs from one tier to the next, none inside a tier.
    G = nx.DiGraph()
    rng = np.random.default_rng(0)
    tiers = [[f"t{t}-{i}" for i in range(8)] for t in range(4)]
    for up, down in zip(tiers, tiers[1:], strict=False):
        for v in down:
            for u in rng.choice(up, size=2, replace=False):
                G.add_edge(str(u), v)
    groups = {v: v.split("-")[0] for tier in tiers for v in tier}
    t = ei_test(G, groups, permutations=99)
    assert (t.ei == 1.0).all()
    assert set(t.verdict) == {"no inside ties"}


def test_group_hubs_ranked_by_z_unchanged():
    # Hubs keep the published rule (z >= 2.5, Guimera & Amaral 2005): a star's centre.
    G = nx.disjoint_union(nx.star_graph(10), nx.complete_graph(4))
    G.add_edge(0, 11)
    comm = {v: 0 if v <= 10 else 1 for v in G}
    assert rank_hubs(role_table(G, comm)) == [0]


# ------------------------------------------------------------ first-page wording


def _ctx(deps, *, formal=None, withheld=None, traffic=(), bridges=(), hubs=()):
    return {
        "dependencies": {"rows": deps},
        "directed": False,
        "roles": {
            "bridges": list(bridges),
            "hubs": list(hubs),
            "traffic": list(traffic),
            "withheld": withheld,
        },
        "formal": formal,
        "no_groups": False,
    }


def _dep(node, n, thin):
    return {"node": node, "dependents": n, "cut_off": "x", "one_tie_each": thin}


def test_single_tie_case_never_stands_alone_first():
    from roles.report.context import VOCABULARY, _first_looks

    v = VOCABULARY["organisation"]
    alone = _first_looks(_ctx([_dep("A", 1, True)]), v, True)
    assert alone == []
    hub = {"node": "H", "community": 1, "degree": 30}
    with_hub = _first_looks(_ctx([_dep("A", 1, True)], hubs=[hub]), v, True)
    assert [i["who"] for i in with_hub] == ["H", "A"]
    assert "single recorded working tie" in with_hub[1]["text"]
    solid = _first_looks(_ctx([_dep("A", 1, True), _dep("B", 4, False)]), v, True)
    assert [i["who"] for i in solid] == ["B", "A"]  # the solid case first


def test_first_page_names_traffic_only_when_large_and_people_are_not_it():
    from roles.report.context import TRAFFIC_FLOOR, VOCABULARY, _first_looks

    v = VOCABULARY["organisation"]
    why = {"reason": "structure not clear"}
    small = {"node": "T", "b": TRAFFIC_FLOOR / 20, "betweenness": "0.002"}
    assert _first_looks(_ctx([], withheld=why, traffic=[small]), v, False)[0]["who"] == ""
    big = {"node": "T", "b": 0.3, "betweenness": "0.300"}
    items = _first_looks(_ctx([], withheld=why, traffic=[big]), v, False)
    assert items[0]["who"] == "T" and "through them" in items[0]["text"]
    assert not any(" it " in i["text"] for i in items)


def test_e_i_headline_only_for_groups_that_differ_from_their_size():
    from roles.report.context import VOCABULARY, _first_looks

    v = VOCABULARY["organisation"]
    formal = {"attribute": "department", "inward": None, "all_inward": False}
    assert _first_looks(_ctx([], formal=formal), v, True) == []
    g = {"label": "Design", "ei": "-0.73", "expected": "0.81"}
    items = _first_looks(_ctx([], formal={**formal, "inward": g}), v, True)
    assert items[0]["who"] == "Design" and "0.81" in items[0]["text"]


def test_snapshot_changes_skip_withheld_roles():
    from types import SimpleNamespace

    from roles.analysis.snapshots import _role_changes

    nodes = pd.DataFrame({"node": ["a", "b"], "within_z": [3.0, 0.0], "betweenness": [0.5, 0]})

    def result(hubs: list[str], withheld: Withheld | None = None) -> SimpleNamespace:
        # The fields of roles.results.Result that _role_changes reads.
        found = SimpleNamespace(hubs=hubs, bridges=hubs, roles_withheld=withheld, single_points=[])
        return SimpleNamespace(nodes=nodes, findings=found)

    clear = result(["a"])
    withheld = result([], Withheld("no groups"))
    assert {c.role for c in _role_changes(clear, clear)} == set()
    assert _role_changes(clear, withheld) == ()  # not "stopped being hub-like"
    gone = result([])
    assert {(c.role, c.change) for c in _role_changes(clear, gone)} == {
        ("hub-like", "stopped"),
        ("bridge-like", "stopped"),
    }
