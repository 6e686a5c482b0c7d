"""Final customers behind each single point of failure, against networkx brute force."""

from __future__ import annotations

import networkx as nx
import pytest

from roles._resources import data_dir
from roles.analysis.customers import final_customers
from roles.analysis.measures import dependents
from roles.io.load import load_edges


def _brute_force(g: nx.DiGraph, s: str) -> tuple[set[str], set[str]]:
    """Final customers reached from ``s`` and those left without supply without it.

    Reached: sinks among ``nx.descendants(g, s)``. Cut off: of those, the ones no
    other source reaches once ``s`` is removed (one search per removal, no dominators).
    Valid for networks without cycles, where the sources are the nodes with no
    suppliers.
    """
    sinks = {v for v in g if g.out_degree(v) == 0}
    reached = nx.descendants(g, s) & sinks
    h = g.copy()
    h.remove_node(s)
    still: set[str] = set()
    for src in (v for v in h if g.in_degree(v) == 0):
        still |= {src} | nx.descendants(h, src)
    return reached, reached - still


@pytest.fixture(scope="module")
def supplier_demo() -> nx.DiGraph:
    # The bundled invented supplier network, read as `roles demo --scenario suppliers` does.
    path = data_dir("roles.scenarios", "examples") / "suppliers_edges.csv"
    return load_edges(path, directed=True).graph


def test_supplier_demo_matches_brute_force(supplier_demo):
    g = supplier_demo
    assert nx.is_directed_acyclic_graph(g)  # the brute force above needs it
    dep = dependents(g)
    spof = sorted((v for v in g if dep[v] > 0), key=lambda v: (-dep[v], v))
    assert len(spof) == 4  # Varnholt Castings, Quessa Polymers, Ilmarin Drives, Varve Castings
    # Every firm, not only the four: the same answer as removing it and searching again.
    got = final_customers(g, spof + sorted(set(g) - set(spof)))
    total_reached = cut_any = 0
    for f in got:
        reached, cut = _brute_force(g, f.node)
        assert set(f.reached) == reached, f.node
        assert set(f.cut_off) == cut, f.node
        assert len(f.cut_off) <= dep[f.node]  # cut-off final customers are dependents
        total_reached += len(reached)
        cut_any += len(cut)
    # The check compared something: 996 final customers reached in all (brute force).
    # No single firm of the demo cuts off a final customer (each has a second route);
    # the random networks below have cut-off ones.
    assert total_reached > 0 and cut_any == 0


@pytest.mark.parametrize("seed", range(10))
def test_random_supply_networks_match_brute_force(seed):
    # A growing tree (networkx gn_graph) turned supplier -> customer, plus second
    # suppliers for some firms: some dependents keep another route, some do not.
    g = nx.gn_graph(60, seed=seed).reverse()
    rng = __import__("random").Random(seed)
    order = list(nx.topological_sort(g))
    for _ in range(25):
        i, j = sorted(rng.sample(range(len(order)), 2))
        g.add_edge(order[i], order[j])
    g = nx.relabel_nodes(g, {v: f"F{v:02d}" for v in g})
    assert nx.is_directed_acyclic_graph(g)
    got = {f.node: f for f in final_customers(g, list(g))}
    cut_any = 0
    for s in g:
        reached, cut = _brute_force(g, s)
        assert set(got[s].reached) == reached, (seed, s)
        assert set(got[s].cut_off) == cut, (seed, s)
        cut_any += len(cut)
    assert cut_any > 0


def test_a_cycle_with_no_outside_supplier_feeds_itself():
    # a <-> b supply each other (no source); b feeds c, c feeds d. By hand: nothing
    # in the cycle is anyone's single point inside it, c cuts off d, and b cuts off d
    # too (every path to d runs through b) though not a (a is its own origin).
    g = nx.DiGraph([("a", "b"), ("b", "a"), ("b", "c"), ("c", "d")])
    got = {f.node: (f.reached, f.cut_off) for f in final_customers(g, ["a", "b", "c"])}
    assert got == {"a": (("d",), ()), "b": (("d",), ("d",)), "c": (("d",), ("d",))}


def test_summary_lists_final_customers_of_each_single_point_of_failure():
    from roles import run

    g = nx.gn_graph(30, seed=2).reverse()
    g = nx.relabel_nodes(g, {v: f"Firm {v:02d}" for v in g})
    s = run(g).summary
    spof = [d["node"] for d in s["single_points_of_failure"]]
    assert [f["node"] for f in s["final_customers"]] == spof
    for f in s["final_customers"]:
        reached, cut = _brute_force(g, f["node"])
        assert (f["reached"], f["cut_off"]) == (len(reached), len(cut))
        assert f["cut_off_names"] == sorted(cut)[:50]
