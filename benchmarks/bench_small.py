"""Walk and window settings on a small real network: Zachary's karate club.

The LFR tables of ``bench_defaults.py`` favour narrower windows and shorter walks; this
script checks settings on the one small network with known groups bundled with
networkx (Zachary 1977, 34 members; the faction each member joined after the split is
the ``club`` attribute). For each walks/length/window setting and each seed, the whole
pipeline runs (``roles.run``, confidence checks off, settings kept as given) and the
script prints the members in the majority faction of their community (out of 34;
``tests/test_pipeline.py`` asks for 85 %, i.e. 29) and whether members 0 and 33, the two
faction leaders, lead the hub list.

Run: ``.venv/bin/python benchmarks/bench_small.py [--settings 10/40/5 10/40/2 10/40/5/16]
[--seeds 0 1 2]`` (an optional fourth figure sets the vector dimensions; without it,
the default's).
"""

from __future__ import annotations

import argparse
import dataclasses
from collections import Counter

import networkx as nx

from roles import run
from roles.config import DEFAULT_SEED, ConfidenceConfig, Config, EmbeddingConfig, WalkConfig


def _agreement(graph: nx.Graph, nodes) -> int:
    faction = {str(v): graph.nodes[v]["club"] for v in graph}
    return sum(
        Counter(faction[v] for v in part.node).most_common(1)[0][1]
        for _, part in nodes.groupby("community")
    )


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--settings", nargs="+", default=["10/40/5", "10/30/5", "10/40/2", "10/30/3"])
    ap.add_argument("--seeds", type=int, nargs="+", default=[DEFAULT_SEED, *range(8)])
    args = ap.parse_args()
    graph = nx.karate_club_graph()
    print(
        "| walks/length/window[/dimensions] | faction agreement per seed (of 34) "
        "| hubs 0 and 33 first |"
    )
    print("|---|---|---|")
    for setting in args.settings:
        walks, length, window, *dims = (int(x) for x in setting.split("/"))
        vector = {"dimensions": dims[0]} if dims else {}
        agree, hubs = [], 0
        for seed in args.seeds:
            config = Config(
                seed=seed,
                walks=WalkConfig(walks, length),
                embedding=EmbeddingConfig(window=window, **vector),
                confidence=ConfidenceConfig(runs=0, randomisations=0),
            )
            config = dataclasses.replace(config, walks_given=True, window_given=True)
            result = run(graph, config=config)
            agree.append(_agreement(graph, result.nodes))
            hubs += set(result.summary["hubs"][:2]) == {"0", "33"}
        print(
            f"| {setting} | {', '.join(map(str, agree))} | {hubs} of {len(args.seeds)} |",
            flush=True,
        )


if __name__ == "__main__":
    main()
