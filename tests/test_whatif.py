"""Removal scenarios and robustness curves (roles/whatif.py, issue 21).

Every expected value comes from networkx applied by brute force (remove the members,
recompute from scratch), from networkx.global_efficiency, from a hand count named beside
it, or from the published behaviour of Albert, Jeong & Barabasi (2000).
"""

from __future__ import annotations

import random

import networkx as nx
import numpy as np
import pytest

from roles.analysis.measures import dependents
from roles.analysis.whatif import assess, check_members, robustness, what_if, what_if_many
from roles.errors import InputError

SEEDS = range(10)


# ------------------------------------------------------------- brute force


def brute_cut_off_undirected(g: nx.Graph, removed: set) -> set:
    """Members of the removed members' components outside the largest remaining piece
    (equal pieces: the one holding the first name stays), by networkx from scratch."""
    cut: set = set()
    for comp in nx.connected_components(g):
        if not comp & removed:
            continue
        rest = g.subgraph(comp - removed)
        pieces = sorted(
            nx.connected_components(rest), key=lambda p: (-len(p), min(str(v) for v in p))
        )
        for piece in pieces[1:]:
            cut |= piece
    return cut


def brute_cut_off_directed(g: nx.DiGraph, removed: set) -> set:
    """Reached from a source (no suppliers) before and from no remaining source after."""
    sources = [v for v in g if g.in_degree(v) == 0]
    before = set(sources).union(*(nx.descendants(g, s) for s in sources))
    h = g.subgraph(set(g) - removed)
    left = [s for s in sources if s not in removed]
    after = set(left).union(*(nx.descendants(h, s) for s in left))
    return before - after - removed


def removal_sets(g: nx.Graph, rng: random.Random) -> list[set]:
    nodes = sorted(g, key=str)
    sets = [{v} for v in nodes]
    sets += [set(rng.sample(nodes, 2)) for _ in range(15)]
    sets += [set(rng.sample(nodes, 3)) for _ in range(15)]
    return sets


def names(g: nx.Graph) -> nx.Graph:
    return nx.relabel_nodes(g, {v: f"m{v:02d}" for v in g})


# ---------------------------------------------------------------- cut_off


@pytest.mark.parametrize("seed", SEEDS)
def test_cut_off_matches_brute_force_undirected(seed):
    # Sparse G(n, p) graphs: several components, many cut vertices, equal pieces too.
    g = names(nx.gnp_random_graph(40, 0.06, seed=seed))
    rng = random.Random(seed)
    sets = removal_sets(g, rng)
    results = what_if_many(g, [sorted(s) for s in sets])
    dep = dependents(g)
    for removed, r in zip(sets, results, strict=True):
        assert set(r.cut_off) == brute_cut_off_undirected(g, removed), removed
        assert list(r.cut_off) == sorted(r.cut_off)
        assert r.removed == tuple(sorted(removed))
        if len(removed) == 1:  # one member: exactly its dependents (measures.dependents)
            assert len(r.cut_off) == dep[next(iter(removed))]


@pytest.mark.parametrize("seed", SEEDS)
def test_cut_off_matches_brute_force_directed(seed):
    g = names(nx.gnp_random_graph(40, 0.05, seed=seed, directed=True))
    rng = random.Random(seed)
    sets = removal_sets(g, rng)
    results = what_if_many(g, [sorted(s) for s in sets])
    sinks = {v for v in g if g.out_degree(v) == 0}
    for removed, r in zip(sets, results, strict=True):
        expected = brute_cut_off_directed(g, removed)
        assert set(r.cut_off) == expected, removed
        assert set(r.final_customers_cut_off) == expected & sinks


@pytest.mark.parametrize(
    "graph",
    [
        nx.karate_club_graph(),  # Zachary (1977), bundled with networkx
        nx.florentine_families_graph(),  # Padgett & Ansell (1993), bundled with networkx
        nx.les_miserables_graph(),  # Knuth (1993), bundled with networkx
        nx.barabasi_albert_graph(300, 1, seed=0),  # a tree: every inner member cuts
    ],
    ids=["karate", "florentine", "les-miserables", "ba-tree"],
)
def test_cut_off_matches_brute_force_on_named_graphs(graph):
    g = nx.relabel_nodes(graph, str)
    sets = removal_sets(g, random.Random(0))
    for removed, r in zip(sets, what_if_many(g, [sorted(x) for x in sets]), strict=True):
        assert set(r.cut_off) == brute_cut_off_undirected(g, removed), removed


def test_cut_off_directed_chain_by_hand():
    # s -> a -> b -> c, s -> d: removing a cuts off b and c; c is a final customer.
    g = nx.DiGraph([("s", "a"), ("a", "b"), ("b", "c"), ("s", "d")])
    r = what_if(g, ["a"])
    assert r.cut_off == ("b", "c")
    assert r.final_customers_cut_off == ("c",)
    # A second supplier of b (from source t) keeps b and c supplied.
    g.add_edge("t", "b")
    assert what_if(g, ["a"]).cut_off == ()


# ------------------------------------------------------------ ties, communities


def test_ties_and_communities_by_hand():
    # Two triangles (communities 1 and 2) joined by the ties c-d and c-e; removing c
    # loses its 4 ties (a-c, b-c, c-d, c-e), 2 of them between communities; the pair
    # (1, 2) falls from 2 ties to 0. Community 1 (a, b, c) keeps a-b: not split.
    g = nx.Graph([("a", "b"), ("b", "c"), ("a", "c"), ("d", "e"), ("e", "f"), ("d", "f")])
    g.add_edges_from([("c", "d"), ("c", "e")])
    comm = {"a": 1, "b": 1, "c": 1, "d": 2, "e": 2, "f": 2}
    r = what_if(g, ["c"], communities=comm)
    assert r.ties_lost == 4
    assert r.ties_lost_between_communities == 2
    assert [(t.communities, t.before, t.after) for t in r.community_ties] == [((1, 2), 2, 0)]
    assert r.communities_split == ()
    assert set(r.cut_off) == {"a", "b"}  # the smaller piece of the component
    # A path community 1: x - y - z; removing y splits it into two pieces.
    p = nx.Graph([("x", "y"), ("y", "z"), ("x", "w"), ("w", "z")])
    r = what_if(p, ["y"], communities={"x": 1, "y": 1, "z": 1, "w": 2})
    assert r.communities_split == (1,)
    assert r.cut_off == ()  # x and z still meet through w
    # A fall by exactly half is not reported: 2 ties -> 1.
    q = nx.Graph([("a", "x"), ("b", "y"), ("a", "b"), ("x", "y")])
    r = what_if(q, ["a"], communities={"a": 1, "b": 1, "x": 2, "y": 2})
    assert r.community_ties == ()


# ---------------------------------------------------------------- efficiency


@pytest.mark.parametrize("seed", SEEDS)
def test_efficiency_matches_networkx(seed):
    g = names(nx.gnp_random_graph(30, 0.1, seed=seed))
    rng = random.Random(seed)
    for removed in removal_sets(g, rng)[::7]:
        r = what_if(g, sorted(removed))
        # networkx.global_efficiency (Latora & Marchiori 2001) of the graph and of what
        # remains after the removal.
        assert r.efficiency_before == pytest.approx(nx.global_efficiency(g), rel=1e-12)
        rest = g.subgraph(set(g) - removed)
        assert r.efficiency_after == pytest.approx(nx.global_efficiency(rest), rel=1e-12)
        assert r.efficiency_sources == 30
        assert r.efficiency_error == 0.0 and r.efficiency_exact


def directed_efficiency(g: nx.DiGraph) -> float:
    """Latora & Marchiori (2001) over ordered pairs, following ties in their direction."""
    n = len(g)
    total = sum(
        1 / d
        for _, lengths in nx.all_pairs_shortest_path_length(g)
        for d in lengths.values()
        if d > 0
    )
    return total / (n * (n - 1))


@pytest.mark.parametrize("seed", SEEDS)
def test_directed_efficiency_by_formula(seed):
    g = names(nx.gnp_random_graph(30, 0.08, seed=seed, directed=True))
    removed = set(random.Random(seed).sample(sorted(g), 2))
    r = what_if(g, sorted(removed))
    assert r.efficiency_before == pytest.approx(directed_efficiency(g), rel=1e-12)
    rest = g.subgraph(set(g) - removed)
    assert r.efficiency_after == pytest.approx(directed_efficiency(rest), rel=1e-12)


def test_sampled_efficiency_within_its_error():
    # Barabasi-Albert graphs of 600 members with a small work budget: 100 sampled
    # sources. The estimated drop lies within 4 standard errors of the exact drop
    # (networkx.global_efficiency) on every seed.
    for seed in SEEDS:
        g = nx.barabasi_albert_graph(600, 2, seed=seed)
        hub = max(g, key=g.degree)
        r = what_if(g, [hub], seed=seed, efficiency_work=1)
        assert r.efficiency_sources == 100 and not r.efficiency_exact
        exact_drop = nx.global_efficiency(g.subgraph(set(g) - {hub})) - nx.global_efficiency(g)
        drop = r.efficiency_after - r.efficiency_before
        assert 0 < r.efficiency_error < 0.01
        assert abs(drop - exact_drop) < 4 * r.efficiency_error + 1e-9, seed


# ---------------------------------------------------------------- robustness


def direct_curve(g: nx.Graph, order: list) -> list[int]:
    """Largest connected piece after removing order[:t], recomputed from scratch."""
    out = []
    for t in range(len(order) + 1):
        h = g.subgraph(set(g) - set(order[:t]))
        out.append(max((len(c) for c in nx.connected_components(h)), default=0))
    return out


@pytest.mark.parametrize("seed", SEEDS)
def test_union_find_curve_equals_direct_recomputation(seed):
    g = nx.gnp_random_graph(30, 0.08, seed=seed)
    bc = nx.betweenness_centrality(g)
    r = robustness(g, bc, points=1000)
    order = sorted(g, key=lambda v: (-bc[v], str(v)))
    expected = np.array(direct_curve(g, order)) / 30
    np.testing.assert_allclose(r.betweenness_order.largest, expected)
    np.testing.assert_allclose(r.betweenness_order.removed, np.arange(31) / 30)
    # Schneider et al. (2011): R = (1/N) sum_{Q=1..N} s(Q).
    assert pytest.approx(expected[1:].sum() / 30) == r.betweenness_order.R


@pytest.mark.parametrize("seed", range(5))
def test_random_order_holds_up_better_than_betweenness_order(seed):
    # Albert, Jeong & Barabasi (2000): scale-free networks tolerate random failures but
    # break quickly when the most central members go.
    g = nx.barabasi_albert_graph(400, 2, seed=seed)
    r = robustness(g, nx.betweenness_centrality(g), seed=seed)
    rand, attack = r.random_order, r.betweenness_order
    assert rand.R > attack.R + 0.1
    # Above it all the way, up to pieces of two members at the very start and end
    # (random removals may cut off a stray leaf; the last few members of the attack
    # order may still hold a tie), and strictly above over the bulk of the removals.
    assert np.all(rand.largest >= attack.largest - 2 / 400)
    bulk = (rand.removed >= 0.02) & (rand.removed <= 0.6)
    assert np.all(rand.largest[bulk] > attack.largest[bulk])
    assert len(rand.largest) >= 50 and len(attack.largest) >= 50


@pytest.mark.parametrize("seed", SEEDS)
def test_curves_start_at_largest_component_and_end_at_zero(seed):
    g = nx.gnp_random_graph(200, 0.008, seed=seed)  # several components
    largest = max(len(c) for c in nx.connected_components(g)) / 200
    r = robustness(g, nx.betweenness_centrality(g), seed=seed)
    for c in (r.betweenness_order, r.random_order):
        assert c.largest[0] == pytest.approx(largest)
        assert c.largest[-1] == 0.0
        assert c.removed[0] == 0.0 and c.removed[-1] == 1.0
        assert len(c.largest) == 101


def test_random_order_is_seeded():
    g = nx.barabasi_albert_graph(100, 2, seed=0)
    bc = nx.betweenness_centrality(g)
    a = robustness(g, bc, seed=3).random_order.largest
    b = robustness(g, bc, seed=3).random_order.largest
    c = robustness(g, bc, seed=4).random_order.largest
    np.testing.assert_array_equal(a, b)
    assert not np.array_equal(a, c)


# ------------------------------------------------------------ default scenarios


def test_default_scenarios_and_pair():
    # Two stars joined through m. Dependents by hand: a cuts off its 5 leaves, m the
    # 5 members of the smaller side (b and its 4 leaves), b its 4 leaves.
    g = nx.Graph()
    g.add_edges_from(("a", f"a{i}") for i in range(5))
    g.add_edges_from(("b", f"b{i}") for i in range(4))
    g.add_edges_from([("a", "m"), ("m", "b")])
    dep = dependents(g)
    bc = nx.betweenness_centrality(g)
    w = assess(g, communities=None, betweenness=bc, dependents=dep, bridges=["m"])
    whys = [(s.removed, s.why) for s in w.scenarios]
    assert whys[:4] == [
        (("a",), "single point of failure"),
        (("m",), "single point of failure, bridge-like"),
        (("b",), "single point of failure"),
        (("a", "b"), "pair"),
    ]
    pair = w.scenarios[-1]
    # Pool a, b, m: 3 pairs. Removing a and b leaves a0-a4, b0-b3 alone and m: the
    # largest remaining piece has one member, so 9 of the 10 others are cut off.
    assert pair.pairs_tried == 3
    assert len(pair.cut_off) == 9
    assert not w.asked


def test_asked_scenario_only():
    g = nx.path_graph(["a", "b", "c"])
    w = assess(g, communities=None, betweenness={}, dependents={}, bridges=[], remove=["b", "a"])
    assert [s.removed for s in w.scenarios] == [("a", "b")]
    assert w.asked


# ---------------------------------------------------------------- unknown names


def test_unknown_name_names_the_closest():
    g = nx.Graph([("Anna Berg", "Ben Cole"), ("Ben Cole", "Cai Dunn")])
    assert check_members(g, ["Ben Cole", "Anna Berg", "Ben Cole"]) == ["Ben Cole", "Anna Berg"]
    with pytest.raises(InputError) as exc:
        what_if(g, ["Anna Burg"])
    assert "'Anna Burg'" in str(exc.value) and "'Anna Berg'" in str(exc.value)
    with pytest.raises(InputError, match="No name in the network is close"):
        check_members(g, ["zzz"])


# ---------------------------------------------------------------- command line

EDGES = (
    "source,target\nAnna Berg,Ben Cole\nBen Cole,Cai Dunn\nCai Dunn,Dora Eck\nDora Eck,Anna Berg\n"
)


@pytest.mark.parametrize(
    "extra, unknown",
    [
        (["--remove", "Anna Burg"], "'Anna Burg'"),
        (["--remove", "Ben Cole", "--remove-file", "gone.txt"], "'Cia Dunn'"),
    ],
)
def test_unknown_name_error_exit_2_nothing_written(tmp_path, extra, unknown):
    from _cli import roles

    (tmp_path / "e.csv").write_text(EDGES)
    (tmp_path / "gone.txt").write_text("Cia Dunn\n")
    p = roles("report", "e.csv", "--out", "out", *extra, cwd=tmp_path)
    assert p.returncode == 2
    lines = p.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error:")
    assert unknown in lines[0]
    assert "'Anna Berg'" in lines[0] or "'Cai Dunn'" in lines[0]  # the closest known name
    assert not (tmp_path / "out").exists()


def test_remove_file_reading_rules(tmp_path):
    from roles.io.namelist import read_names

    f = tmp_path / "gone.txt"
    # UTF-8 with a byte-order mark, blank lines, spaces, a quoted name with a comma.
    f.write_bytes('\ufeffAnna Berg \r\n\r\n"Cole, Ben"\n'.encode())
    assert read_names(f) == ["Anna Berg", "Cole, Ben"]
    f.write_text("Anna\tBen\n")
    with pytest.raises(InputError, match="line 1"):
        read_names(f)
    f.write_text("\n\n")
    with pytest.raises(InputError, match="no names"):
        read_names(f)
    with pytest.raises(InputError, match="does not exist"):
        read_names(tmp_path / "missing.txt")


def test_remove_runs_one_scenario_into_summary_and_report(tmp_path):
    import json

    from _cli import roles

    # Two squares joined through Eva: removing Eva and Ana leaves two pieces of three,
    # (Ben, Cai, Dan) and (Fay, Gus, Hal); the piece holding the first name stays.
    (tmp_path / "e.csv").write_text(
        "source,target\nAna,Ben\nBen,Cai\nCai,Dan\nDan,Ana\nDan,Eva\nEva,Fay\nFay,Gus\n"
        "Gus,Hal\nHal,Eva\n"
    )
    (tmp_path / "gone.txt").write_text("Ana\n")
    p = roles(
        "report",
        "e.csv",
        "--out",
        "out",
        "--quiet",
        "--remove",
        "Eva",
        "--remove-file",
        "gone.txt",
        cwd=tmp_path,
    )
    assert p.returncode == 0, p.stderr
    s = json.loads((tmp_path / "out" / "summary.json").read_text())
    assert [w["removed"] for w in s["what_if"]] == [["Ana", "Eva"]]
    assert s["what_if"][0]["cut_off"] == ["Fay", "Gus", "Hal"]
    assert s["what_if"][0]["ties_lost"] == 5  # Ana-Ben, Dan-Ana, Dan-Eva, Eva-Fay, Hal-Eva
    for order in ("betweenness_order", "random_order"):
        assert len(s["robustness"][order]["curve"]) == 9  # all 9 steps of 8 members
        assert s["robustness"][order]["curve"][0] == 1.0
        assert s["robustness"][order]["curve"][-1] == 0.0
    html = (tmp_path / "out" / "report.html").read_text()
    assert "If members were gone" in html and 'id="what-if"' in html
