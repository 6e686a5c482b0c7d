"""Whole-report time with one very long member name against the same network with short
names; prints a table with the ratio.

The network: 300 members in 6 planted groups (networkx's planted partition generator,
p_in 0.2, p_out 0.01, seed 2), plus ties from member 0 to every third member, so the
long-named member has about 120 ties and appears in the report's tables. Member 0 is
named "N" * length. Node-link JSON input: CSV refuses fields over 131,072 characters.

    python benchmarks/bench_long_names.py --lengths 20000 1000000 --repeats 1
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import networkx as nx

ROOT = Path(__file__).resolve().parent.parent


def network(length: int) -> dict:
    g = nx.planted_partition_graph(6, 50, 0.2, 0.01, seed=2)
    ties = set(g.edges()) | {(0, v) for v in range(1, 300, 3)}
    long = "N" * length

    def name(u: int) -> str:
        return long if u == 0 else f"m{u}"

    h = nx.Graph()
    h.add_edges_from((name(u), name(v)) for u, v in ties if u != v)
    return nx.node_link_data(h, edges="links")


def run_once(path: Path, out: Path) -> float:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    start = time.perf_counter()
    subprocess.run(
        [sys.executable, "-m", "roles", "report", str(path), "--out", str(out), "--quiet"],
        env=env,
        check=True,
    )
    return time.perf_counter() - start


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--lengths", type=int, nargs="+", default=[20000, 1000000])
    ap.add_argument("--repeats", type=int, default=1, help="runs per case (the best is kept)")
    args = ap.parse_args()
    with tempfile.TemporaryDirectory(prefix="roles-bench-names-") as tmp:
        folder = Path(tmp)
        rows = []
        for length in [2, *args.lengths]:
            path = folder / f"n{length}.json"
            path.write_text(json.dumps(network(length)))
            best = min(run_once(path, folder / f"out{length}") for _ in range(args.repeats))
            rows.append((length, path.stat().st_size, best))
        base = rows[0][2]
        print(f"{'longest name':>14} {'input bytes':>13} {'report s':>9} {'ratio':>6}")
        for length, size, seconds in rows:
            print(f"{length:>14,} {size:>13,} {seconds:>9.1f} {seconds / base:>6.2f}")


if __name__ == "__main__":
    main()
