"""Per-stage time, walk and skip-gram rates and peak memory of the whole report.

For each graph (scale-free and planted-community, about 1k to 100k nodes at an average
degree of 20, so 20k nodes have 200k ties and 100k nodes have 1M ties) this script runs

* every stage on its own, in one process on one core: CSR arrays, walks of each view
  (second-order steps per second per core), skip-gram of each view (gensim tokens per
  second), clustering of each view, role measures, view comparison, Louvain check;
* the whole report as ``roles report`` does it: read the edge list, ``roles.run``
  (both views in two processes), write nodes.csv, summary.json, graph.graphml and the
  HTML/PDF report.

Each graph and each of the two parts runs in a fresh process, so the memory figures of
one do not carry into the next. Memory is resident set size (RSS) read from
``/proc``: ``peak MiB`` is the process's own high-water mark during the stage (VmHWM,
reset before each stage through ``/proc/self/clear_refs``; exact), ``tree MiB`` the
largest sum of RSS over the process and all its children, sampled every 50 ms (the
figure that matters when the two views run in two processes). ``cpu s`` counts every
thread of the process and of its finished children, so on a shared machine it shows
the work done when wall time is inflated by other load.

Run: ``.venv/bin/python benchmarks/bench_pipeline.py [--sizes 1000 10000] [--kinds
planted scalefree] [--parts stages whole] [--no-budget] [--json FILE]``.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import subprocess
import sys
import tempfile
import threading
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import networkx as nx
import numpy as np

KINDS = ("planted", "scalefree")
AVG_DEGREE = 20.0
PARTS = ("stages", "whole")


# --- graphs ---------------------------------------------------------------------------


def _power_law(rng: np.random.Generator, size: int, exponent: float, low: float, high: float):
    """Draws from p(x) ~ x^-exponent on [low, high] by inverting the distribution function."""
    a = 1.0 - exponent
    u = rng.random(size)
    return (low**a + u * (high**a - low**a)) ** (1.0 / a)


def _low_for_mean(exponent: float, mean: float, high: float) -> float:
    """Smallest value of a power law on [low, high] whose mean is ``mean`` (bisection)."""

    def mean_of(low: float) -> float:
        a = exponent
        return (
            (a - 1)
            / (a - 2)
            * (low ** (2 - a) - high ** (2 - a))
            / (low ** (1 - a) - high ** (1 - a))
        )

    lo, hi = 1e-3, mean
    for _ in range(100):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if mean_of(mid) < mean else (lo, mid)
    return 0.5 * (lo + hi)


def _assign(rng: np.random.Generator, need: np.ndarray, size_of: np.ndarray) -> np.ndarray:
    """Community of each node: one with at least ``need[i]`` members and room left,
    chosen at random weighted by room, most demanding nodes first (as LFR places them)."""
    room = size_of.astype(np.float64).copy()
    out = np.empty(len(need), dtype=np.int64)
    by_size = np.argsort(-size_of, kind="stable")
    sorted_sizes = size_of[by_size]
    for i in np.argsort(-need, kind="stable"):
        # Communities big enough form a prefix of the size-sorted list.
        k = max(1, int(np.searchsorted(-sorted_sizes, -need[i], side="right")))
        cand = by_size[:k]
        free = room[cand]
        if free.sum() <= 0:
            cand, free = by_size, room[by_size]
        c = cand[np.searchsorted(np.cumsum(free), rng.random() * free.sum(), side="right")]
        out[i] = c
        room[c] -= 1
    return out


def planted_partition(
    n: int,
    avg_degree: float = 20.0,
    mu: float = 0.2,
    *,
    seed: int = 0,
    degree_exponent: float = 2.5,
    size_exponent: float = 1.5,
    min_community: int = 20,
    max_community: int | None = None,
) -> tuple[nx.Graph, np.ndarray]:
    """A degree-heterogeneous planted partition, in the spirit of LFR but in numpy.

    Communities have power-law sizes (exponent ``size_exponent``, as LFR's tau2); nodes
    have power-law propensities (exponent ``degree_exponent``, LFR's tau1) and ties are
    drawn Chung-Lu style: both ends proportional to propensity, the far end inside the
    near end's community with probability ``1 - mu``, anywhere otherwise. Duplicate ties
    and self-loops are dropped and more are drawn until ``n * avg_degree / 2`` ties exist.
    Unlike networkx's LFR generator (Lancichinetti, Fortunato & Radicchi 2008) it takes
    seconds at 100k nodes; the mixing is met on average rather than per node.

    Returns
    -------
    graph : networkx.Graph
        Nodes ``0 .. n-1``.
    truth : ndarray of int, shape (n,)
        Planted community of each node.
    """
    rng = np.random.default_rng(seed)
    max_community = max_community or max(100, n // 50)
    sizes: list[int] = []
    while sum(sizes) < n:
        sizes.append(int(_power_law(rng, 1, size_exponent, min_community, max_community)[0]))
    sizes[-1] -= sum(sizes) - n
    if sizes[-1] < min_community and len(sizes) > 1:
        # Fold a short last community into the one before (pop first: in
        # ``sizes[-2] += sizes.pop()`` the index is taken before the pop).
        last = sizes.pop()
        sizes[-1] += last
    size_of = np.asarray(sizes)
    # Wanted degrees: power law with its smallest value set so the mean is avg_degree,
    # capped at the largest community as LFR's max_degree <= max_community.
    high = float(min(n - 1, max_community))
    low = _low_for_mean(degree_exponent, avg_degree, high)
    w = _power_law(rng, n, degree_exponent, low, high)
    comm = _assign(rng, w * (1.0 - mu) + 1.0, size_of)
    # Lay nodes out community by community, so a community is one range of ``cum``.
    order = np.argsort(comm, kind="stable")
    w, comm = w[order], comm[order]
    lo = np.concatenate([[0], np.cumsum(size_of)[:-1]])
    cum = np.cumsum(w)
    cum_lo = np.concatenate([[0.0], cum])[lo]
    cum_hi = cum[lo + size_of - 1]
    target = int(round(n * avg_degree / 2))
    quota = {True: int(round(target * (1.0 - mu))), False: target - int(round(target * (1.0 - mu)))}
    keys = {True: np.empty(0, dtype=np.int64), False: np.empty(0, dtype=np.int64)}
    for inner in (True, False):
        # Ties inside a community collide more often; drawing each kind to its own
        # quota keeps the mixing at mu after duplicates are dropped.
        while len(keys[inner]) < quota[inner]:
            k = int((quota[inner] - len(keys[inner])) * 1.1) + 16
            u = np.minimum(np.searchsorted(cum, rng.random(k) * cum[-1], side="right"), n - 1)
            c = comm[u]
            if inner:
                r = cum_lo[c] + rng.random(k) * (cum_hi[c] - cum_lo[c])
            else:
                r = rng.random(k) * cum[-1]
            v = np.minimum(np.searchsorted(cum, r, side="right"), n - 1)
            ok = (u != v) & ((comm[v] == c) == inner)
            u, v = u[ok], v[ok]
            keys[inner] = np.union1d(keys[inner], np.minimum(u, v) * n + np.maximum(u, v))
        keys[inner] = keys[inner][rng.permutation(len(keys[inner]))[: quota[inner]]]
    both = np.concatenate([keys[True], keys[False]])
    edges = np.stack([both // n, both % n], axis=1)
    # A node left without ties gets one inside its community, as an edge list has none.
    lonely = np.setdiff1d(np.arange(n), edges.ravel())
    if lonely.size:
        mate = lo[comm[lonely]] + (lonely - lo[comm[lonely]] + 1) % size_of[comm[lonely]]
        edges = np.vstack([edges, np.stack([lonely, mate], axis=1)])
    names = rng.permutation(n)  # node i gets name names[i]
    graph = nx.Graph()
    graph.add_nodes_from(range(n))
    graph.add_edges_from(names[edges].tolist())
    truth = np.empty(n, dtype=np.int64)
    truth[names] = comm
    return graph, truth


def scale_free(n: int, avg_degree: float = 20.0, *, seed: int = 0) -> nx.Graph:
    """networkx's Barabasi-Albert graph (Barabasi & Albert, Science 1999), m = avg/2."""
    return nx.barabasi_albert_graph(n, max(1, int(round(avg_degree / 2))), seed=seed)


def make_graph(kind: str, n: int, seed: int) -> tuple[nx.Graph, np.ndarray | None]:
    """One benchmark graph: ``planted`` (with its planted communities) or ``scalefree``."""
    if kind == "planted":
        return planted_partition(n, AVG_DEGREE, seed=seed)
    if kind == "scalefree":
        return scale_free(n, AVG_DEGREE, seed=seed), None
    raise ValueError(f"unknown graph kind {kind!r}; choose from {KINDS}")


# --- measuring ------------------------------------------------------------------------


def _rss_kib(pid: int | str = "self") -> int:
    try:
        with open(f"/proc/{pid}/status") as fh:
            for line in fh:
                if line.startswith("VmRSS:"):
                    return int(line.split()[1])
    except (FileNotFoundError, ProcessLookupError, PermissionError):
        pass
    return 0


def _hwm_kib() -> int:
    with open("/proc/self/status") as fh:
        for line in fh:
            if line.startswith("VmHWM:"):
                return int(line.split()[1])
    return 0


def _reset_hwm() -> bool:
    try:
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")
        return True
    except OSError:
        return False


def _descendants(pid: int) -> list[int]:
    out: list[int] = []
    todo = [pid]
    while todo:
        p = todo.pop()
        try:
            tasks = os.listdir(f"/proc/{p}/task")
        except FileNotFoundError:
            continue
        for t in tasks:
            try:
                with open(f"/proc/{p}/task/{t}/children") as fh:
                    kids = [int(x) for x in fh.read().split()]
            except (FileNotFoundError, ProcessLookupError):
                continue
            out.extend(kids)
            todo.extend(kids)
    return out


class _TreeSampler(threading.Thread):
    """Largest RSS sum over this process and its descendants, sampled every 50 ms."""

    def __init__(self) -> None:
        super().__init__(daemon=True)
        self.peak_kib = 0
        self._stop_event = threading.Event()
        self._pid = os.getpid()

    def reset(self) -> None:
        self.peak_kib = 0

    def run(self) -> None:
        while not self._stop_event.is_set():
            total = _rss_kib(self._pid) + sum(_rss_kib(c) for c in _descendants(self._pid))
            self.peak_kib = max(self.peak_kib, total)
            self._stop_event.wait(0.05)

    def stop(self) -> None:
        self._stop_event.set()


class _Meter:
    """Wall time, CPU time and memory of named stages."""

    def __init__(self) -> None:
        self.rows: list[dict[str, Any]] = []
        self.sampler = _TreeSampler()
        self.sampler.start()

    @contextmanager
    def stage(self, name: str, **extra: Any) -> Iterator[dict[str, Any]]:
        row: dict[str, Any] = {"stage": name, **extra}
        exact = _reset_hwm()
        self.sampler.reset()
        t0 = time.perf_counter()
        c0 = os.times()
        yield row
        c1 = os.times()
        row["wall_s"] = round(time.perf_counter() - t0, 3)
        cpu = (c1.user - c0.user) + (c1.system - c0.system)
        cpu += (c1.children_user - c0.children_user) + (c1.children_system - c0.children_system)
        row["cpu_s"] = round(cpu, 3)
        total = _rss_kib() + sum(_rss_kib(c) for c in _descendants(os.getpid()))
        self.sampler.peak_kib = max(self.sampler.peak_kib, total)
        row["peak_mib"] = round(_hwm_kib() / 1024, 1) if exact else None
        row["tree_mib"] = round(max(self.sampler.peak_kib, _hwm_kib()) / 1024, 1)
        self.rows.append(row)


def _community_nmi(truth: np.ndarray | None, labels: np.ndarray) -> float | None:
    if truth is None:
        return None
    from sklearn.metrics import normalized_mutual_info_score

    return round(float(normalized_mutual_info_score(truth, labels)), 3)


#: Overrides from the command line (``--window``, ``--fit-limit``), set in the child.
OVERRIDES: dict[str, Any] = {}


def _config(n: int, m: int, budget: bool) -> tuple[Any, str | None]:
    import dataclasses

    from roles.config import Config

    config = Config()
    if OVERRIDES.get("window"):
        embedding = dataclasses.replace(config.embedding, window=OVERRIDES["window"])
        config = dataclasses.replace(config, embedding=embedding, window_given=True)
    if OVERRIDES.get("fit_limit") is not None:
        clustering = dataclasses.replace(config.cluster, fit_limit=OVERRIDES["fit_limit"])
        config = dataclasses.replace(config, cluster=clustering)
    if not budget:
        return config, None
    from roles.embedding.budget import walk_budget

    return walk_budget(n, m, config)


# --- the two parts --------------------------------------------------------------------


def part_stages(kind: str, n: int, seed: int, budget: bool) -> dict[str, Any]:
    """Every stage on its own, one after the other, on one core."""
    from roles.analysis.compare import compare_views
    from roles.embedding.cluster import cluster
    from roles.embedding.embed import embed_walks
    from roles.embedding.graph import to_csr
    from roles.embedding.walks import generate_walks, walk_lengths
    from roles.seeds import StageSeeds

    meter = _Meter()
    t0 = time.perf_counter()
    graph, truth = make_graph(kind, n, seed)
    graph = nx.relabel_nodes(graph, {v: str(v) for v in graph}, copy=True)
    generated = round(time.perf_counter() - t0, 1)
    config, note = _config(graph.number_of_nodes(), graph.number_of_edges(), budget)
    seeds = StageSeeds.of(config.seed)
    with meter.stage("CSR arrays"):
        csr = to_csr(graph)
    with meter.stage("walk kernel load"):  # numba's disk cache, or a compile
        generate_walks(csr, walks_per_node=1, walk_length=3, p=1.0, q=2.0, seed=0)
    with meter.stage("imports"):  # kept out of the first skip-gram and clustering rows
        import gensim.models  # noqa: F401
        import hdbscan  # noqa: F401
    walks: dict[str, np.ndarray] = {}
    for view, vc in config.views.items():
        with meter.stage(f"walks {view}", p=vc.p, q=vc.q) as row:
            walks[view] = generate_walks(
                csr,
                walks_per_node=config.walks.walks_per_node,
                walk_length=config.walks.walk_length,
                p=vc.p,
                q=vc.q,
                seed=seeds.view_walks[view][0],
            )
        steps = int(np.maximum(walk_lengths(walks[view]) - 1, 0).sum())
        row["steps"] = steps
        row["steps_per_s_per_core"] = round(steps / max(row["wall_s"], 1e-9))
    vectors: dict[str, np.ndarray] = {}
    emb = config.embedding
    for view in config.views:
        with meter.stage(f"skip-gram {view}") as row:
            vectors[view] = embed_walks(
                walks[view],
                csr.n_nodes,
                dimensions=emb.dimensions,
                window=emb.window,
                epochs=emb.epochs,
                negative=emb.negative,
                seed=seeds.view_walks[view][1],
            )
        lengths = walk_lengths(walks[view])
        tokens = int(lengths[lengths >= 2].sum()) * emb.epochs
        row["tokens"] = tokens
        row["tokens_per_s"] = round(tokens / max(row["wall_s"], 1e-9))
    del walks
    groupings = {}
    for view in config.views:
        with meter.stage(f"clustering {view}") as row:
            groupings[view] = cluster(
                vectors[view],
                min_cluster_size=config.cluster.min_cluster_size,
                reduce_to=config.cluster.reduce_to,
                seed=seeds.view_groups[view],
                fit_limit=config.cluster.fit_limit or None,
            )
        g = groupings[view]
        row["groups"] = g.n_groups
        row["noise_share"] = round(g.noise_share, 3)
        row["nmi_planted"] = _community_nmi(truth, g.labels)
    community_of = dict(zip(csr.names, (groupings["far"].labels + 1).tolist(), strict=True))
    try:
        from roles.analysis.measures import role_table
    except ImportError as exc:
        meter.rows.append({"stage": "measures", "skipped": f"roles.analysis.measures: {exc}"})
    else:
        with meter.stage("measures"):
            role_table(graph, community_of, seed=seeds[4])
    with meter.stage("comparison") as row:
        comparison = compare_views(
            vectors["local"], vectors["far"], groupings["local"].labels, groupings["far"].labels
        )
        row["k"] = comparison.k
    with meter.stage("Louvain check"):
        from roles.analysis.modularity import louvain

        louvain(csr, seed=seeds[5])
    meter.sampler.stop()
    return {
        "kind": kind,
        "nodes": graph.number_of_nodes(),
        "edges": graph.number_of_edges(),
        "part": "stages",
        "fit_limit": config.cluster.fit_limit,
        "generate_s": generated,
        "config": config.as_dict(),
        "budget_note": note,
        "rows": meter.rows,
        "maxrss_self_mib": round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1),
    }


def part_whole(kind: str, n: int, seed: int, budget: bool) -> dict[str, Any]:
    """The whole report as ``roles report`` makes it: read, run, write every output."""
    import roles.report.render
    from roles.io.export import write_report_outputs
    from roles.io.load import load_edges
    from roles.pipeline import run

    meter = _Meter()
    t0 = time.perf_counter()
    graph, _ = make_graph(kind, n, seed)
    nodes, edges = graph.number_of_nodes(), graph.number_of_edges()
    generated = round(time.perf_counter() - t0, 1)
    # roles.run applies the walk budget itself; without it, the walks count as given.
    config, _ = _config(nodes, edges, False)
    if not budget:
        import dataclasses

        config = dataclasses.replace(config, walks_given=True, window_given=True)
    with tempfile.TemporaryDirectory(prefix="roles-bench-") as tmp:
        path = Path(tmp) / "edges.csv"
        with open(path, "w", encoding="utf-8") as fh:
            fh.write("source,target\n")
            fh.writelines(f"n{u},n{v}\n" for u, v in graph.edges())
        del graph
        with meter.stage("load edge list"):
            net = load_edges(path)
        with meter.stage("roles.run") as row:
            result = run(net.graph, config=config)
        run_timings = result.summary.get("timings", {})
        note = result.summary.get("walk_budget")
        effective = result.summary["parameters"]
        row["groups"] = result.summary["views"]["groups"]
        del net
        render = roles.report.render.render_report
        seconds: dict[str, float] = {}

        def timed_render(*args: Any, **kwargs: Any) -> None:
            start = time.perf_counter()
            render(*args, **kwargs)
            seconds["render"] = round(time.perf_counter() - start, 3)

        roles.report.render.render_report = timed_render
        out = Path(tmp) / "out"
        out.mkdir()
        with meter.stage("write outputs") as row:
            write_report_outputs(
                result,
                out,
                title="Benchmark",
                kind="general",
                paper="a4",
                min_group_size=5,
                made="benchmark",
            )
        row["render_html_pdf_s"] = seconds.get("render")
        row["files_mib"] = {
            f.name: round(f.stat().st_size / 2**20, 2) for f in sorted(out.iterdir())
        }
    meter.sampler.stop()
    total = sum(r["wall_s"] for r in meter.rows)
    return {
        "kind": kind,
        "nodes": nodes,
        "edges": edges,
        "part": "whole",
        "fit_limit": config.cluster.fit_limit,
        "generate_s": generated,
        "config": effective,
        "budget_note": note,
        "rows": meter.rows,
        "run_timings": run_timings,
        "total_s": round(total, 1),
        "peak_tree_mib": max(r["tree_mib"] for r in meter.rows),
        "maxrss_self_mib": round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1),
        "maxrss_children_mib": round(
            resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024, 1
        ),
    }


# --- reporting ------------------------------------------------------------------------


def machine() -> dict[str, Any]:
    """The machine and the versions the figures come from."""
    from importlib.metadata import version

    cpu = "unknown"
    try:
        with open("/proc/cpuinfo") as fh:
            for line in fh:
                if line.startswith("model name"):
                    cpu = line.split(":", 1)[1].strip()
                    break
    except OSError:
        pass
    ram = os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES") / 2**30
    info: dict[str, Any] = {
        "nproc": os.cpu_count(),
        "cpu": cpu,
        "ram_gib": round(ram, 1),
        "load_average": [round(x, 2) for x in os.getloadavg()],
        "python": platform.python_version(),
    }
    for pkg in ("numpy", "numba", "gensim", "hdbscan", "scikit-learn", "networkx"):
        info[pkg] = version(pkg)
    return info


def _fmt(v: Any) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        return f"{v:,.2f}" if abs(v) < 1000 else f"{v:,.0f}"
    if isinstance(v, int):
        return f"{v:,}"
    return str(v)


def print_case(case: dict[str, Any]) -> None:
    head = (
        f"\n{case['kind']} graph, {case['nodes']:,} nodes, {case['edges']:,} ties - "
        f"{case['part']} (generated in {case['generate_s']} s)"
    )
    print(head)
    walks = case["config"]["walks"]
    print(
        f"walks per node {walks['walks_per_node']}, walk length {walks['walk_length']}, "
        f"window {case['config']['embedding']['window']}, fit_limit {case.get('fit_limit')}"
    )
    if case.get("budget_note"):
        print(f"budget: {case['budget_note']}")
    cols = ["stage", "wall_s", "cpu_s", "peak_mib", "tree_mib", "rate"]
    print(f"{cols[0]:<22}{cols[1]:>9}{cols[2]:>9}{cols[3]:>10}{cols[4]:>10}  rate / detail")
    for r in case["rows"]:
        if "skipped" in r:
            print(f"{r['stage']:<22}  skipped: {r['skipped']}")
            continue
        detail = []
        if "steps_per_s_per_core" in r:
            detail.append(f"{r['steps_per_s_per_core'] / 1e6:.2f} M steps/s/core")
        if "tokens_per_s" in r:
            detail.append(f"{r['tokens_per_s'] / 1e3:.0f} k tokens/s")
        if "groups" in r:
            detail.append(f"groups {r['groups']}")
        if r.get("nmi_planted") is not None:
            detail.append(f"NMI planted {r['nmi_planted']}")
        if r.get("render_html_pdf_s") is not None:
            detail.append(f"of which HTML+PDF {r['render_html_pdf_s']} s")
        print(
            f"{r['stage']:<22}{_fmt(r['wall_s']):>9}{_fmt(r['cpu_s']):>9}"
            f"{_fmt(r['peak_mib']):>10}{_fmt(r['tree_mib']):>10}  {', '.join(detail)}"
        )
    if case["part"] == "whole":
        inner = ", ".join(f"{k} {v}" for k, v in case["run_timings"].items())
        print(f"roles.run stages (s): {inner}")
        print(
            f"whole report {case['total_s']} s, peak memory {case['peak_tree_mib']:,.0f} MiB "
            f"(process and children, sampled)"
        )


# --- driver ---------------------------------------------------------------------------


def _child(kind: str, n: int, part: str, seed: int, budget: bool) -> None:
    fn = part_stages if part == "stages" else part_whole
    print(json.dumps(fn(kind, n, seed, budget)))


def main(argv: list[str] | None = None) -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[1000, 10000, 20000, 100000])
    ap.add_argument("--kinds", nargs="+", choices=KINDS, default=list(KINDS))
    ap.add_argument("--parts", nargs="+", choices=PARTS, default=list(PARTS))
    ap.add_argument("--seed", type=int, default=1, help="seed of the generated graphs")
    ap.add_argument(
        "--no-budget",
        action="store_true",
        help="run at the configured walk settings without roles.embedding.budget.walk_budget",
    )
    ap.add_argument("--window", type=int, help="skip-gram window instead of the default")
    ap.add_argument(
        "--fit-limit",
        type=int,
        help="[cluster] fit_limit instead of the default (0: fit every row)",
    )
    ap.add_argument("--timeout", type=float, default=1800, help="seconds per graph and part")
    ap.add_argument("--json", metavar="FILE", help="also write the figures to FILE")
    ap.add_argument("--one", nargs=3, metavar=("KIND", "N", "PART"), help=argparse.SUPPRESS)
    args = ap.parse_args(argv)
    budget = not args.no_budget
    OVERRIDES.update(window=args.window, fit_limit=args.fit_limit)
    if args.one:
        _child(args.one[0], int(args.one[1]), args.one[2], args.seed, budget)
        return
    info = machine()
    print(
        f"machine: {info['nproc']} cores, {info['cpu']}, {info['ram_gib']} GiB RAM, "
        f"load average {info['load_average']}; Python {info['python']}, numpy {info['numpy']}, "
        f"numba {info['numba']}, gensim {info['gensim']}, hdbscan {info['hdbscan']}"
    )
    cases = []
    for n in args.sizes:
        for kind in args.kinds:
            for part in args.parts:
                cmd = [sys.executable, __file__, "--one", kind, str(n), part]
                cmd += ["--seed", str(args.seed)] + (["--no-budget"] if not budget else [])
                for flag, value in (("--window", args.window), ("--fit-limit", args.fit_limit)):
                    if value is not None:
                        cmd += [flag, str(value)]
                try:
                    done = subprocess.run(
                        cmd, capture_output=True, text=True, timeout=args.timeout, check=False
                    )
                except subprocess.TimeoutExpired:
                    print(f"\n{kind} {n:,} {part}: over {args.timeout:.0f} s, stopped")
                    cases.append({"kind": kind, "nodes": n, "part": part, "timeout": True})
                    continue
                if done.returncode != 0:
                    print(f"\n{kind} {n:,} {part}: failed\n{done.stderr[-3000:]}")
                    cases.append({"kind": kind, "nodes": n, "part": part, "error": done.stderr})
                    continue
                case = json.loads(done.stdout.strip().splitlines()[-1])
                print_case(case)
                cases.append(case)
    out = {"machine": info, "cases": cases}
    print("\nJSON")
    print(json.dumps(out))
    if args.json:
        Path(args.json).write_text(json.dumps(out, indent=1) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
