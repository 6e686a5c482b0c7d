"""Time roles.io.load.load_edges on large invented edge lists and print a table.

Usage: python benchmarks/bench_load.py [--names=ascii|nfc|nfd] [ROWS ...]
(default: ascii names, 100000 1000000 rows)

Wall and CPU seconds are both shown (on a shared machine the wall time also measures the
neighbours); networkx's own ``read_edgelist`` on the same file is timed for scale.

Each file has a header, random ties between ROWS // 5 made-up node names and a weight
column; one row in ten repeats an earlier tie, reversed, so that it is merged.
``--names=nfc`` starts every name with a composed ``ë`` (U+00EB), ``--names=nfd`` with the
decomposed ``e`` + U+0308, which the loader must bring to NFC (the slowest case).
"""

from __future__ import annotations

import random
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

import networkx as nx

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from roles.io.load import load_edges  # noqa: E402

_PREFIX = {"ascii": "member", "nfc": "Zo\u00eb", "nfd": "Zoe\u0308"}


def make_file(folder: Path, rows: int, seed: int = 7, names: str = "ascii") -> Path:
    rng = random.Random(seed)
    prefix = _PREFIX[names]
    n = max(2, rows // 5)
    path = folder / f"edges_{rows}.csv"
    with open(path, "w", encoding="utf-8", newline="") as fh:
        fh.write("source,target,weight\n")
        earlier: list[tuple[int, int]] = []
        for i in range(rows):
            if i % 10 == 9:
                b, a = earlier[rng.randrange(len(earlier))]
            else:
                a, b = rng.randrange(n), rng.randrange(n)
                earlier.append((a, b))
            fh.write(f"{prefix}-{a:07d},{prefix}-{b:07d},{rng.randint(1, 9)}\n")
    return path


def _timed(fn, *args, **kwargs):
    wall, cpu = time.perf_counter(), time.process_time()
    result = fn(*args, **kwargs)
    return result, time.perf_counter() - wall, time.process_time() - cpu


def main(sizes: list[int], names: str = "ascii") -> None:
    print(
        f"{'rows':>10} {'MB':>6} {'wall s':>7} {'cpu s':>6} {'rows/cpu s':>10} "
        f"{'peak MB':>8} {'nx cpu s':>8} {'nodes':>8} {'edges':>8} {'merged':>7}"
    )
    with tempfile.TemporaryDirectory() as tmp:
        for rows in sizes:
            path = make_file(Path(tmp), rows, names=names)
            net, wall, cpu = _timed(load_edges, path)
            _, _, nx_cpu = _timed(
                nx.read_edgelist,
                path,
                delimiter=",",
                comments="source",
                data=[("weight", float)],
            )
            tracemalloc.start()
            load_edges(path)
            peak = tracemalloc.get_traced_memory()[1] / 1e6
            tracemalloc.stop()
            c = net.counts
            print(
                f"{rows:>10} {path.stat().st_size / 1e6:>6.1f} {wall:>7.2f} {cpu:>6.2f} "
                f"{rows / cpu:>10.0f} {peak:>8.0f} {nx_cpu:>8.2f} {c['nodes']:>8} "
                f"{c['edges']:>8} {c['duplicate_edges_merged']:>7}"
            )


if __name__ == "__main__":
    kinds = [a.split("=", 1)[1] for a in sys.argv[1:] if a.startswith("--names=")]
    sizes = [int(a) for a in sys.argv[1:] if not a.startswith("--")]
    main(sizes or [100_000, 1_000_000], names=kinds[0] if kinds else "ascii")
