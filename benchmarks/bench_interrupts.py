"""How long `roles report` takes to stop after SIGINT or SIGTERM, sent at several moments
of a run; prints a table.

The network: 8,000 members in 40 planted groups (networkx's planted partition
generator, p_in 0.04, p_out 0.0005, seed 1), large enough for the two views to run in
worker processes. For each delay the command is started afresh, signalled, and every
process of its tree (read from /proc before the signal) is checked half a second after
it exits. Linux only.

    python benchmarks/bench_interrupts.py --delays 10 30 60 90 --signal SIGINT
"""

from __future__ import annotations

import argparse
import contextlib
import os
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import networkx as nx

ROOT = Path(__file__).resolve().parent.parent


def _tree(pid: int) -> list[int]:
    found = [pid]
    with contextlib.suppress(OSError):
        for task in os.listdir(f"/proc/{pid}/task"):
            with contextlib.suppress(OSError):
                for child in Path(f"/proc/{pid}/task/{task}/children").read_text().split():
                    found += _tree(int(child))
    return found


def _alive(pid: int) -> bool:
    try:
        return Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0] != "Z"
    except OSError:
        return False


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--delays", type=float, nargs="+", default=[10, 30, 60, 90])
    ap.add_argument("--signal", default="SIGINT", choices=["SIGINT", "SIGTERM"])
    args = ap.parse_args()
    sig = getattr(signal, args.signal)
    with tempfile.TemporaryDirectory(prefix="roles-bench-stop-") as tmp:
        folder = Path(tmp)
        g = nx.planted_partition_graph(40, 200, 0.04, 0.0005, seed=1)
        edges = folder / "e.csv"
        edges.write_text("source,target\n" + "\n".join(f"m{u},m{v}" for u, v in g.edges()))
        env = dict(os.environ, PYTHONPATH=str(ROOT))
        print(f"{'sent after s':>12} {'processes':>9} {'exit':>5} {'stopped in s':>12} {'left':>5}")
        for delay in args.delays:
            proc = subprocess.Popen(
                [sys.executable, "-m", "roles", "report", str(edges), "--out", str(folder / "o")],
                env=env,
                stderr=subprocess.DEVNULL,
                start_new_session=True,
            )
            time.sleep(delay)
            if proc.poll() is not None:
                print(f"{delay:>12.0f} the run had finished")
                continue
            tree = _tree(proc.pid)
            start = time.monotonic()
            if sig == signal.SIGINT:
                os.killpg(proc.pid, sig)  # Ctrl-C: the whole foreground group
            else:
                proc.send_signal(sig)
            proc.wait()
            stopped = time.monotonic() - start
            time.sleep(0.5)
            left = sum(_alive(p) for p in tree)
            print(f"{delay:>12.0f} {len(tree):>9} {proc.returncode:>5} {stopped:>12.2f} {left:>5}")


if __name__ == "__main__":
    main()
