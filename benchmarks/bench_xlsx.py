"""Time nodes.xlsx against nodes.csv and print a table.

Usage: python benchmarks/bench_xlsx.py [--nodes N ...] [--ties-per-member K] [--seed S]

Data: the synthetic graph and node table of ``bench_export.make_data`` (the columns
``roles.pipeline.run`` gives, a few NaN cells). Each size writes nodes.csv
(``roles.io.output.write_csv`` over ``roles.io.export._csv_rows``), then nodes.xlsx
(``roles.io.spreadsheet.write_nodes_xlsx``: members sheet and communities sheet, the latter
built by ``community_rows``, which walks every tie once). Wall and CPU seconds; on a
shared machine the wall time also measures the neighbours.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path
from types import SimpleNamespace
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench_export import make_data  # noqa: E402

from roles.io.export import _csv_rows  # noqa: E402
from roles.io.output import write_csv  # noqa: E402
from roles.io.spreadsheet import community_rows, write_nodes_xlsx  # noqa: E402


def _timed(fn, *args) -> tuple[float, float]:  # type: ignore[no-untyped-def]
    wall, cpu = time.perf_counter(), time.process_time()
    fn(*args)
    return time.perf_counter() - wall, time.process_time() - cpu


def _write_xlsx(path: Path, result: Any) -> None:
    table = result.nodes
    write_nodes_xlsx(path, list(table.columns), _csv_rows(table), community_rows(result))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nodes", type=int, nargs="*", default=[1000, 20000])
    ap.add_argument("--ties-per-member", type=int, default=10)
    ap.add_argument("--seed", type=int, default=0)
    args = ap.parse_args()
    print("| members | ties | nodes.csv wall / CPU s | nodes.xlsx wall / CPU s | xlsx MB |")
    print("| ---: | ---: | ---: | ---: | ---: |")
    for n in args.nodes:
        graph, table = make_data(n, n * args.ties_per_member, args.seed)
        hubs = list(table["node"][:5])
        # The fields of roles.results.Result that community_rows reads.
        result = SimpleNamespace(
            nodes=table,
            graph=graph,
            findings=SimpleNamespace(hubs=hubs, bridges=hubs[:2], single_points=[]),
        )
        header = list(table.columns)
        with tempfile.TemporaryDirectory(prefix="roles-bench-xlsx-") as tmp:
            folder = Path(tmp)
            csv_t = _timed(write_csv, folder / "nodes.csv", header, _csv_rows(table))
            xlsx_t = _timed(_write_xlsx, folder / "nodes.xlsx", result)
            size = (folder / "nodes.xlsx").stat().st_size / 1e6
        print(
            f"| {n:,} | {graph.number_of_edges():,} | {csv_t[0]:.2f} / {csv_t[1]:.2f} "
            f"| {xlsx_t[0]:.2f} / {xlsx_t[1]:.2f} | {size:.1f} |"
        )


if __name__ == "__main__":
    main()
