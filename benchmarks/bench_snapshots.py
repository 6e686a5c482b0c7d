"""Comparing two snapshots: the matching threshold's evidence and the comparison's cost.

Part ``threshold``: for snapshot pairs whose community events are known, the Jaccard
overlaps (over members present in both) of the community pairs the events join, and the
largest overlap of any pair they do not join. A threshold between the two separates
them. Pairs:

* ``same``: one network analysed with seeds s and s + 1 (every community continues);
  the invented company (examples/) and planted partitions of 2,000 members;
* ``year``: the invented company and the same company a year on
  (examples/make_company_year.py);
* ``rings``: the constructed ring-of-cliques pair of tests/test_snapshots.py, as the
  tool groups it.

Part ``speed``: two planted-partition snapshots of N members (the second with 5% of
members replaced and 5% of ties rewired): wall seconds of the two analyses and of the
comparison itself (``compare_results`` plus the change report's context and figure).

Run: ``.venv/bin/python benchmarks/bench_snapshots.py [--parts threshold speed]
[--seeds 0 1 2 3 4] [--size 20000]``.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import networkx as nx
import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tests"))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_pipeline import planted_partition  # noqa: E402

from roles.analysis.snapshots import _members, _overlaps, compare_results  # noqa: E402
from roles.config import Config  # noqa: E402
from roles.io.load import load_edges  # noqa: E402
from roles.pipeline import run  # noqa: E402


def _overlap_split(a, b) -> tuple[float, float]:
    """(smallest overlap of a pair the events join, largest of a pair they do not)."""
    old = {str(k): int(v) for k, v in zip(a.nodes["node"], a.nodes["community"], strict=True)}
    new = {str(k): int(v) for k, v in zip(b.nodes["node"], b.nodes["community"], strict=True)}
    jac = _overlaps(_members(old), _members(new), set(old) & set(new))
    joined = compare_results(a, b)
    pairs = {(c, d) for e in joined.events for c in e.old for d in e.new}
    inside = [jac[p] for p in pairs if p in jac]
    outside = [j for p, j in jac.items() if p not in pairs]
    return (min(inside) if inside else float("nan"), max(outside) if outside else 0.0)


def part_threshold(seeds: list[int]) -> None:
    from test_snapshots import snapshot_pair

    company = load_edges(ROOT / "examples" / "company_edges.csv").graph
    year = load_edges(ROOT / "examples" / "company_year_edges.csv").graph
    planted, _ = planted_partition(2000, 20.0, seed=3)
    planted = nx.relabel_nodes(planted, str)
    rings_old, rings_new, _, _ = snapshot_pair()
    print("pair              seed  events                                 joined>=  others<=")
    for s in seeds:
        cfg = Config().with_seed(s)
        nxt = Config().with_seed(s + 1)
        runs = {
            "same company": (run(company, config=cfg), run(company, config=nxt)),
            "same planted 2k": (run(planted, config=cfg), run(planted, config=nxt)),
            "year company": (run(company, config=cfg), run(year, config=cfg)),
            "rings": (run(rings_old, config=cfg), run(rings_new, config=cfg)),
        }
        for name, (a, b) in runs.items():
            ch = compare_results(a, b)
            kinds = sorted({e.event for e in ch.events})
            lo, hi = _overlap_split(a, b)
            print(f"{name:17s} {s:4d}  {','.join(kinds)[:38]:38s} {lo:8.3f}  {hi:8.3f}")


def _rewired(g: nx.Graph, share: float, seed: int) -> nx.Graph:
    rng = np.random.default_rng(seed)
    h = g.copy()
    nodes = list(h.nodes())
    gone = rng.choice(len(nodes), int(share * len(nodes)), replace=False)
    h.remove_nodes_from([nodes[i] for i in gone])
    edges = list(h.edges())
    drop = rng.choice(len(edges), int(share * len(edges)), replace=False)
    h.remove_edges_from([edges[i] for i in drop])
    keep = list(h.nodes())
    for i in range(len(gone)):
        for t in rng.choice(len(keep), 10, replace=False):
            h.add_edge(f"new{i}", keep[t])
    for _ in range(len(drop)):
        u, v = rng.choice(len(keep), 2, replace=False)
        h.add_edge(keep[u], keep[v])
    return h


def part_speed(size: int) -> None:
    from roles.report.changes import build_change_context

    g, _ = planted_partition(size, 20.0, seed=5)
    g = nx.relabel_nodes(g, str)
    h = _rewired(g, 0.05, seed=6)
    cfg = Config().with_seed(1)
    t = time.perf_counter()
    a = run(g, config=cfg)
    t_a = time.perf_counter() - t
    t = time.perf_counter()
    b = run(h, config=cfg)
    t_b = time.perf_counter() - t
    t = time.perf_counter()
    ch = compare_results(a, b)
    t_cmp = time.perf_counter() - t
    t = time.perf_counter()
    build_change_context(
        ch, a, b, title="x", kind="general", paper="a4", min_group_size=5, made="now"
    )
    t_ctx = time.perf_counter() - t
    print("members  ties      first run s  second run s  compare s  context+figure s  events")
    print(
        f"{size:7d}  {g.number_of_edges():8d}  {t_a:11.1f}  {t_b:12.1f}  {t_cmp:9.2f}  "
        f"{t_ctx:16.2f}  {len(ch.events)}"
    )


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--parts", nargs="+", default=["threshold", "speed"])
    ap.add_argument("--seeds", nargs="+", type=int, default=[0, 1, 2, 3, 4])
    ap.add_argument("--size", type=int, default=20000)
    args = ap.parse_args()
    if "threshold" in args.parts:
        part_threshold(args.seeds)
    if "speed" in args.parts:
        part_speed(args.size)


if __name__ == "__main__":
    main()
