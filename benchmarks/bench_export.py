"""Time the node-table writers of ``roles report`` (graph.graphml, nodes.csv) and print a table.

Usage: python benchmarks/bench_export.py [--nodes N] [--edges M] [--seed S] [--only NAME ...]

Data: a synthetic Result-like pair, built the same way in every run: an undirected
networkx graph of N nodes with made-up names and M random ties (numpy generator, float
weights as ``roles.io.load`` makes them), and a node table with the columns
``roles.pipeline.run`` gives a network of that size (no ``confidence`` column: the
confidence checks stop at 10,000 members), a few NaN cells included.

Variants, each in a fresh subprocess so that memory peaks do not mix:

- ``graphml old``: the writer up to commit 2e17776 (copy the graph, set every table column
  as node attributes, ``networkx.write_graphml``, which builds the XML tree);
- ``graphml new``: ``roles.io.export._write_graphml`` (streams the document);
- ``csv old``: rows through ``itertuples`` and ``json_ready`` per cell, then
  ``roles.io.output.write_csv``;
- ``csv new``: ``roles.io.export._csv_rows`` (a column at a time), then ``write_csv``.

Columns: wall and CPU seconds of the write (on a shared machine the wall time also
measures the neighbours); RSS once the data is built; the process's peak RSS
during the write (VmHWM from /proc/self/status, reset through /proc/self/clear_refs once
the data is built) and that peak less the data's RSS; the file's size and sha256 prefix
(old and new of a kind must agree).
"""

from __future__ import annotations

import argparse
import hashlib
import json
import math
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import networkx as nx
import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from roles.io.export import _csv_rows, _write_graphml, json_ready  # noqa: E402
from roles.io.output import write_csv  # noqa: E402

VARIANTS = ("graphml old", "graphml new", "csv old", "csv new")


def make_data(n: int, m: int, seed: int) -> tuple[nx.Graph, pd.DataFrame]:
    rng = np.random.default_rng(seed)
    names = [f"member-{i:06d}" for i in range(n)]
    g = nx.Graph()
    g.add_nodes_from(names)
    pairs = rng.integers(0, n, size=(int(m * 1.05) + 10, 2))
    pairs = pairs[pairs[:, 0] != pairs[:, 1]]
    pairs = np.unique(np.sort(pairs, axis=1), axis=0)
    pairs = pairs[rng.permutation(len(pairs))[:m]]
    weights = rng.integers(1, 10, size=len(pairs)).astype(float).tolist()
    g.add_weighted_edges_from(
        (names[a], names[b], w) for (a, b), w in zip(pairs.tolist(), weights, strict=True)
    )
    degree = np.array([d for _, d in g.degree()], dtype=np.int64)
    communities = rng.integers(1, 60, size=n)
    nodes = pd.DataFrame({"node": names})
    nodes["community"] = communities
    nodes["local_group"] = rng.integers(0, 95, size=n)
    nodes["far_group"] = rng.integers(0, 87, size=n)
    nodes["membership"] = np.round(rng.random(n), 4)
    nodes["role"] = rng.choice(
        ["peripheral", "connector", "provincial hub", "connector hub", "no ties"], size=n
    )
    for col in ("betweenness", "participation", "within_z", "constraint", "effective_size"):
        nodes[col] = rng.normal(size=n) if col == "within_z" else rng.random(n) * 10
    nodes.loc[degree == 0, ["within_z", "constraint"]] = np.nan
    nodes.loc[rng.random(n) < 0.01, "within_z"] = np.nan  # a community of one: z undefined
    nodes["dependents"] = rng.poisson(0.3, size=n)
    nodes["region"] = rng.choice(["core", "edge", "between"], size=n)
    nodes["view_agreement"] = np.round(rng.random(n), 4)
    nodes["degree"] = degree
    return g, nodes


def old_graphml(graph: nx.Graph, nodes: pd.DataFrame, path: Path) -> None:
    """roles.io.export._graphml as of commit 2e17776."""
    g = graph.copy()
    table = nodes.set_index("node")
    for col in table.columns:
        values = {}
        for node, v in table[col].items():
            if isinstance(v, np.generic):
                v = v.item()
            if isinstance(v, float) and not math.isfinite(v):
                continue
            values[node] = v if isinstance(v, (int, float, str, bool)) else str(v)
        nx.set_node_attributes(g, values, name=col)
    nx.write_graphml(g, path, encoding="utf-8")


def old_csv(nodes: pd.DataFrame, path: Path) -> None:
    """nodes.csv as written up to commit 2e17776."""
    rows = [[json_ready(v) for v in row] for row in nodes.itertuples(index=False)]
    write_csv(path, list(nodes.columns), rows)


def _status_mib(field: str) -> float:
    with open("/proc/self/status") as fh:
        for line in fh:
            if line.startswith(field + ":"):
                return int(line.split()[1]) / 1024
    return math.nan


def run_variant(variant: str, n: int, m: int, seed: int, folder: Path) -> dict:
    graph, nodes = make_data(n, m, seed)
    before = _status_mib("VmRSS")
    with open("/proc/self/clear_refs", "w") as fh:
        fh.write("5")  # reset VmHWM to the current RSS
    kind = variant.split()[0]
    path = folder / ("graph.graphml" if kind == "graphml" else "nodes.csv")
    start, cpu = time.perf_counter(), time.process_time()
    if variant == "graphml old":
        old_graphml(graph, nodes, path)
    elif variant == "graphml new":
        _write_graphml(graph, nodes, path)
    elif variant == "csv old":
        old_csv(nodes, path)
    else:
        write_csv(path, list(nodes.columns), _csv_rows(nodes))
    seconds, cpu = time.perf_counter() - start, time.process_time() - cpu
    peak = _status_mib("VmHWM")
    digest = hashlib.sha256(path.read_bytes()).hexdigest()
    return {
        "variant": variant,
        "seconds": seconds,
        "cpu": cpu,
        "rss_data": before,
        "peak": peak,
        "above": peak - before,
        "mib": path.stat().st_size / 2**20,
        "sha": digest[:12],
    }


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nodes", type=int, default=100_000)
    ap.add_argument("--edges", type=int, default=1_000_000)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--only", nargs="*", choices=VARIANTS, default=list(VARIANTS))
    ap.add_argument("--variant", help=argparse.SUPPRESS)
    ap.add_argument("--folder", help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.variant:
        out = run_variant(args.variant, args.nodes, args.edges, args.seed, Path(args.folder))
        print(json.dumps(out))
        return
    load = Path("/proc/loadavg").read_text().split()[0]
    print(f"{args.nodes:,} nodes, {args.edges:,} ties, seed {args.seed}; load average {load}")
    header = (
        f"{'variant':<12} {'write s':>8} {'cpu s':>6} {'data RSS MiB':>13} {'peak MiB':>9} "
        f"{'above data':>11} {'file MiB':>9} {'sha256':>13}"
    )
    print(header)
    print("-" * len(header))
    with tempfile.TemporaryDirectory() as tmp:
        for variant in args.only:
            folder = Path(tmp) / variant.replace(" ", "_")
            folder.mkdir()
            cmd = [sys.executable, __file__, "--variant", variant, "--folder", str(folder)]
            cmd += ["--nodes", str(args.nodes), "--edges", str(args.edges)]
            cmd += ["--seed", str(args.seed)]
            done = subprocess.run(cmd, capture_output=True, text=True, check=True)
            r = json.loads(done.stdout.strip().splitlines()[-1])
            print(
                f"{r['variant']:<12} {r['seconds']:>8.2f} {r['cpu']:>6.2f} "
                f"{r['rss_data']:>13.0f} {r['peak']:>9.0f} {r['above']:>11.0f} {r['mib']:>9.1f} "
                f"{r['sha']:>13}",
                flush=True,
            )
            for p in folder.iterdir():
                p.unlink()


if __name__ == "__main__":
    main()
