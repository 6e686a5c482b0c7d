"""Defaults by evidence: community recovery (NMI) against cost for the walk and skip-gram
settings. Prints tables and JSON.

LFR benchmark graphs (Lancichinetti, Fortunato & Radicchi 2008; networkx's generator, the
parameters of ``bench_views.py``: n=1000, tau1 2.5, tau2 1.5, average degree 10, degree
at most 50, communities of 20 to 100) at mixing 0.1 and 0.3, several seeds. One setting
at a time is moved away from the configured defaults (walks per node, walk length,
window, dimensions, epochs, negative samples, and the clustering's PCA dimensions);
every other setting stays at its default. Each row embeds both views, clusters them as
the pipeline does and scores each view's groups against the planted communities with
scikit-learn's NMI.

Cost is the skip-gram work: walk tokens per view times epochs (the walks themselves cost
the same number of steps), and the CPU seconds the row took (walks, skip-gram and
clustering of both views, per graph). CPU seconds rather than wall seconds, because the
machine is shared.

The report's communities come from the view whose groups have the higher modularity
on each network (``roles.pipeline.choose_community_view``); the ``community`` score is
the NMI of that view, graph by graph. The tables move one setting at a time and show, per
setting, the cheapest value whose mean community NMI (over mixing levels and seeds) is
within 0.01 of that setting's best. Such choices interact, so walks per node, walk
length and window are then searched together (cost: skip-gram pairs, tokens times
window + 1); the candidates within 0.01 of the joint best are checked, cheapest first,
on new graphs against the defaults, and the first within 0.01 of the defaults there is
recommended. Local and far are compared under it on those new graphs.

Run: ``.venv/bin/python benchmarks/bench_defaults.py [--seeds 3] [--final-seeds 8]
[--only walks_per_node walk_length] [--no-joint] [--json FILE]``.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import os
import sys
import time
from pathlib import Path
from typing import Any

import networkx as nx
import numpy as np
from sklearn.metrics import normalized_mutual_info_score

from roles.config import Config
from roles.embedding.cluster import cluster
from roles.embedding.embed import embed_views
from roles.embedding.graph import to_csr
from roles.pipeline import choose_community_view
from roles.seeds import StageSeeds

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_views import lfr  # noqa: E402  (the same LFR graphs as bench_views.py)

DEFAULT = Config()
MIXING = (0.1, 0.3)
TOLERANCE = 0.01

#: Values tried per setting; the default is always among them.
GRID: dict[str, list[int]] = {
    "walks_per_node": [2, 4, 6, 10, 15],
    "walk_length": [10, 20, 30, 40, 80],
    "window": [2, 3, 5, 8],
    "dimensions": [16, 32, 64, 128],
    "epochs": [1, 2, 3],
    "negative": [2, 3, 5, 8],
    "reduce_to": [4, 8, 16, 32],
}
_SECTION = {
    "walks_per_node": "walks",
    "walk_length": "walks",
    "window": "embedding",
    "dimensions": "embedding",
    "epochs": "embedding",
    "negative": "embedding",
    "reduce_to": "cluster",
}


def with_setting(config: Config, name: str, value: int) -> Config:
    section = _SECTION[name]
    part = getattr(config, section)
    return dataclasses.replace(config, **{section: dataclasses.replace(part, **{name: value})})


#: Joint search of the settings that set the skip-gram work.
JOINT: dict[str, list[int]] = {
    "walks_per_node": [4, 6, 10],
    "walk_length": [20, 30, 40],
    "window": [2, 3, 5],
}


def pairs(config: Config, n: int) -> int:
    """Skip-gram (centre, context) pairs per view, about tokens * (window + 1): gensim
    draws each token's window uniformly from 1..window on each side (word2vec's
    reduced window), so a token has window + 1 context words on average."""
    return cost(config, n) * (config.embedding.window + 1)


def cost(config: Config, n: int) -> int:
    """Skip-gram tokens per view: n * walks_per_node * walk_length * epochs."""
    w = config.walks
    return n * w.walks_per_node * w.walk_length * config.embedding.epochs


def evaluate(config: Config, graphs: list[tuple[float, int, nx.Graph, np.ndarray]]) -> dict:
    """NMI against the planted communities per view and for the view the pipeline would
    choose (higher modularity), per mixing level; CPU seconds per graph."""
    names = ("community", "local", "far")
    scores: dict[str, dict[float, list[float]]] = {v: {mu: [] for mu in MIXING} for v in names}
    groups: dict[str, list[int]] = {v: [] for v in names}
    chosen_far = 0
    cpu = 0.0
    for mu, seed, graph, truth in graphs:
        run_config = dataclasses.replace(config, seed=seed)
        c0 = time.process_time()
        views = embed_views(to_csr(graph), run_config, processes=1)
        seeds = StageSeeds.of(run_config.seed).view_groups
        labels, modularity = {}, {}
        for view in ("local", "far"):
            grouping = cluster(
                np.asarray(views[view].vectors),
                min_cluster_size=config.cluster.min_cluster_size,
                reduce_to=config.cluster.reduce_to,
                seed=seeds[view],
            )
            labels[view] = grouping.labels
            groups[view].append(grouping.n_groups)
        cpu += time.process_time() - c0
        nodes = list(graph)
        for view in ("local", "far"):
            parts: dict[int, set] = {}
            for node, lab in zip(nodes, labels[view].tolist(), strict=True):
                parts.setdefault(lab, set()).add(node)
            modularity[view] = float(nx.community.modularity(graph, parts.values()))
        pick = choose_community_view(modularity)
        chosen_far += pick == "far"
        labels["community"] = labels[pick]
        groups["community"].append(int(labels[pick].max()) + 1)
        for view in names:
            scores[view][mu].append(float(normalized_mutual_info_score(truth, labels[view])))
    out: dict[str, Any] = {
        "cpu_s_per_graph": round(cpu / len(graphs), 2),
        "far_chosen": f"{chosen_far}/{len(graphs)}",
    }
    for view in names:
        every = [x for mu in MIXING for x in scores[view][mu]]
        out[view] = {
            "by_mixing": {str(mu): round(float(np.mean(scores[view][mu])), 4) for mu in MIXING},
            "mean": round(float(np.mean(every)), 4),
            "se": round(float(np.std(every, ddof=1) / np.sqrt(len(every))), 4),
            "groups": round(float(np.mean(groups[view])), 1),
        }
    return out


def _row(label: str, value: Any, config: Config, n: int, res: dict) -> dict:
    return {"setting": label, "value": value, "tokens_per_view": cost(config, n), **res}


def print_rows(rows: list[dict], title: str) -> None:
    print(f"\n{title}")
    mus = " ".join(f"{'mu ' + str(m):>7}" for m in MIXING)
    print(
        f"{'setting':<16}{'value':>6}{'tokens':>11}{'cpu s':>7}  community: {mus} "
        f"{'mean':>6} {'+-se':>6}  {'local':>6} {'far':>6} {'far picked':>10} {'groups':>7}"
    )
    for r in rows:
        per = " ".join(f"{r['community']['by_mixing'][str(m)]:>7.3f}" for m in MIXING)
        print(
            f"{r['setting']:<16}{str(r['value']):>6}{r['tokens_per_view']:>11,}"
            f"{r['cpu_s_per_graph']:>7.2f}             {per} {r['community']['mean']:>6.3f}"
            f" {r['community']['se']:>6.3f}  {r['local']['mean']:>6.3f} {r['far']['mean']:>6.3f}"
            f" {r['far_chosen']:>10} {r['community']['groups']:>7}"
        )


def choose(rows: list[dict], view: str) -> tuple[int, float]:
    """Cheapest value within TOLERANCE of the best mean NMI; rows are sorted by cost."""
    best = max(r[view]["mean"] for r in rows)
    for r in rows:
        if r[view]["mean"] >= best - TOLERANCE:
            return r["value"], best
    raise AssertionError("unreachable")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--n", type=int, default=1000)
    ap.add_argument("--seeds", type=int, default=3, help="LFR graphs per mixing level")
    ap.add_argument(
        "--final-seeds",
        type=int,
        default=8,
        help="graphs per mixing level "
        "for the local-versus-far comparison under the chosen settings",
    )
    ap.add_argument(
        "--only",
        nargs="*",
        choices=list(GRID),
        help="settings to vary one at a time (none: go straight to the joint search)",
    )
    ap.add_argument("--checks", type=int, default=4, help="candidates checked on new graphs")
    ap.add_argument("--no-joint", action="store_true", help="stop after the one-at-a-time tables")
    ap.add_argument("--json", metavar="FILE", help="also write the figures to FILE")
    args = ap.parse_args()
    view = "community"
    t_start = time.perf_counter()
    graphs = []
    for mu in MIXING:
        for s in range(args.seeds):
            g, truth = lfr(args.n, mu, seed=s + 1)
            graphs.append((mu, s + 1, g, truth))
    print(
        f"LFR n={args.n}, mixing {MIXING}, {args.seeds} graphs per mixing level; "
        f"communities from the view of higher modularity; load average {os.getloadavg()[0]:.1f} on "
        f"{os.cpu_count()} cores"
    )
    tables: dict[str, list[dict]] = {}
    chosen: dict[str, int] = {}
    cache: dict[tuple, dict] = {}
    for name in list(GRID) if args.only is None else args.only:
        rows = []
        for value in GRID[name]:
            config = with_setting(DEFAULT, name, value)
            key = (config.walks, config.embedding, config.cluster)
            if key not in cache:
                cache[key] = evaluate(config, graphs)
            rows.append(_row(name, value, config, args.n, cache[key]))
        # Cheaper first: walk settings and epochs by tokens, the others by CPU time
        # (dimensions and window do not change the token count).
        rows.sort(key=lambda r: (r["tokens_per_view"], r["cpu_s_per_graph"], r["value"]))
        if name in ("dimensions", "window", "negative", "reduce_to"):
            rows.sort(key=lambda r: r["value"])
        tables[name] = rows
        chosen[name], best = choose(rows, view)
        default_value = getattr(getattr(DEFAULT, _SECTION[name]), name)
        print_rows(
            rows,
            f"{name} (default {default_value}); best {view} mean {best:.3f}, "
            f"cheapest within {TOLERANCE}: {chosen[name]}",
        )
    if args.no_joint:
        if args.json:
            out = {"n": args.n, "mixing": MIXING, "seeds": args.seeds, "tables": tables}
            Path(args.json).write_text(json.dumps(out, indent=1) + "\n", encoding="utf-8")
        return
    # One-at-a-time choices interact (fewer walks, shorter walks and a narrower window
    # each cut the skip-gram pairs), so the walk and window settings are searched
    # jointly, then the cheapest candidates are checked on new graphs.
    joint = []
    for r in JOINT["walks_per_node"]:
        for length in JOINT["walk_length"]:
            for window in JOINT["window"]:
                config = with_setting(
                    with_setting(with_setting(DEFAULT, "walks_per_node", r), "walk_length", length),
                    "window",
                    window,
                )
                key = (config.walks, config.embedding, config.cluster)
                if key not in cache:
                    cache[key] = evaluate(config, graphs)
                row = _row("joint", f"{r}/{length}/{window}", config, args.n, cache[key])
                row["pairs_per_view"] = pairs(config, args.n)
                row["config"] = config
                joint.append(row)
    joint.sort(key=lambda r: (r["pairs_per_view"], r["cpu_s_per_graph"]))
    best = max(r[view]["mean"] for r in joint)
    print_rows(
        joint,
        f"walks per node / walk length / window together; best {view} mean {best:.3f}; "
        "sorted by skip-gram pairs",
    )
    final_graphs = []
    for mu in MIXING:
        for s in range(args.final_seeds):
            g, truth = lfr(args.n, mu, seed=100 + s)
            final_graphs.append((mu, 100 + s, g, truth))
    base_final = evaluate(DEFAULT, final_graphs)
    checks = [_row("defaults", "-", DEFAULT, args.n, base_final)]
    recommended, final = DEFAULT, base_final
    for row in [r for r in joint if r[view]["mean"] >= best - TOLERANCE][: args.checks]:
        res = evaluate(row["config"], final_graphs)
        checks.append(_row("check", row["value"], row["config"], args.n, res))
        if res[view]["mean"] >= base_final[view]["mean"] - TOLERANCE:
            recommended, final = row["config"], res
            break
    print_rows(
        checks,
        f"cheapest candidates on {args.final_seeds} new graphs per mixing level; the first "
        f"within {TOLERANCE} of the defaults is recommended",
    )
    w, e = recommended.walks, recommended.embedding
    print(
        f"recommended: walks_per_node {w.walks_per_node}, walk_length {w.walk_length}, "
        f"window {e.window}, dimensions {e.dimensions}, epochs {e.epochs}"
    )
    print(f"\nlocal versus far under the recommended settings, {args.final_seeds} new graphs")
    print(f"far view picked on {final['far_chosen']} graphs (higher modularity)")
    for v in ("community", "local", "far"):
        per = ", ".join(f"mixing {m}: {final[v]['by_mixing'][str(m)]:.3f}" for m in MIXING)
        print(
            f"{v:<10} {per}; mean {final[v]['mean']:.3f} +- {final[v]['se']:.3f}; "
            f"groups {final[v]['groups']}"
        )
    for row in joint:
        row.pop("config")
    out = {
        "n": args.n,
        "mixing": MIXING,
        "seeds": args.seeds,
        "score": "community (view of higher modularity)",
        "tables": tables,
        "chosen_one_at_a_time": chosen,
        "joint": joint,
        "checks": checks,
        "final": {"seeds": args.final_seeds, **final},
        "recommended": recommended.as_dict(),
        "wall_s": round(time.perf_counter() - t_start, 1),
    }
    print("\nJSON")
    print(json.dumps(out))
    if args.json:
        Path(args.json).write_text(json.dumps(out, indent=1) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
