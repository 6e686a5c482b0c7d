"""Bad inputs through the command line (issue 6): one ``error:`` line on stderr, exit
status 2, no traceback, nothing written, earlier outputs untouched; Ctrl-C stops the run
and leaves the earlier outputs as they were."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import networkx as nx
import pytest
from _cli import ROOT, roles


def snapshot(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


GOOD = "source,target\nAna,Ben\nBen,Cai\n"

# name -> (files to create, extra arguments, a word the message must hold)
CASES = {
    "bad weight": ({"e.csv": "source,target,weight\nAna,Ben,heavy\n"}, [], "line 2"),
    "empty file": ({"e.csv": ""}, [], "empty"),
    "missing columns": ({"e.csv": "from,to\nAna,Ben\n"}, [], "--source-column"),
    "binary": ({"e.csv": b"PK\x03\x04\x00\x00garbage"}, [], "CSV"),
    "broken quoting": ({"e.csv": 'source,target\n"Ana,Ben\n'}, [], "quot"),
    "missing file": ({}, [], "does not exist"),
    "nodes without node column": (
        {"e.csv": GOOD, "n.csv": "name,team\nAna,x\n"},
        ["--nodes", "n.csv"],
        "'node'",
    ),
    "broken toml": ({"e.csv": GOOD, "c.toml": "[walks\n"}, ["--config", "c.toml"], "TOML"),
    "unknown config key": (
        {"e.csv": GOOD, "c.toml": "[walks]\nwalk_lenght = 3\n"},
        ["--config", "c.toml"],
        "walk_lenght",
    ),
    "config out of range": (
        {"e.csv": GOOD, "c.toml": "[views.far]\nq = -1\n"},
        ["--config", "c.toml"],
        "Got -1",
    ),
}


@pytest.mark.parametrize("case", list(CASES))
def test_bad_input_one_error_line_exit_2_nothing_written(tmp_path, case):
    files, extra, word = CASES[case]
    for name, content in files.items():
        path = tmp_path / name
        if isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")
    out = tmp_path / "report"
    out.mkdir()
    (out / "summary.json").write_text("earlier run")
    before = sorted(p.name for p in tmp_path.iterdir())
    done = roles("report", "e.csv", "--out", "report", *extra, cwd=tmp_path)
    assert done.returncode == 2, done.stderr
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1, done.stderr
    assert lines[0].startswith("error: ")
    assert word in lines[0]
    assert "Traceback" not in done.stderr
    assert done.stdout == ""
    assert snapshot(out) == {"summary.json": b"earlier run"}
    assert sorted(p.name for p in tmp_path.iterdir()) == before  # no temporary folder


def test_output_folder_is_the_input_file(tmp_path):
    (tmp_path / "e.csv").write_text(GOOD)
    done = roles("report", "e.csv", "--out", "e.csv", cwd=tmp_path)
    assert done.returncode == 2
    assert done.stderr.startswith("error: ") and len(done.stderr.strip().splitlines()) == 1
    assert (tmp_path / "e.csv").read_text() == GOOD


def test_output_folder_holding_the_input(tmp_path):
    (tmp_path / "e.csv").write_text(GOOD)
    done = roles("report", "e.csv", "--out", ".", cwd=tmp_path)
    assert done.returncode == 2
    assert "holds the input file" in done.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["e.csv"]


def test_debug_shows_the_traceback(tmp_path):
    (tmp_path / "e.csv").write_text("")
    done = roles("report", "e.csv", "--out", "report", "--debug", cwd=tmp_path)
    assert "Traceback" in done.stderr
    assert not (tmp_path / "report").exists()


@pytest.mark.slow
def test_ctrl_c_during_a_report_keeps_earlier_outputs(tmp_path):
    # A graph big enough that the run is still working when Ctrl-C comes: a planted
    # partition graph (Condon & Karp 2001) from networkx, 12 groups of 150.
    g = nx.planted_partition_graph(12, 150, 0.08, 0.002, seed=10)
    lines = ["source,target"] + [f"m{u},m{v}" for u, v in g.edges()]
    (tmp_path / "e.csv").write_text("\n".join(lines) + "\n")
    out = tmp_path / "report"
    out.mkdir()
    (out / "summary.json").write_text("earlier run")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.Popen(
        [sys.executable, "-m", "roles", "report", "e.csv", "--out", "report"],
        cwd=tmp_path,
        env=env,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        start_new_session=True,  # its own process group, as a terminal's foreground job
    )
    # Not a terminal, so no progress bar to wait for: give the run time to get into
    # its stages (imports and loading take about two seconds here).
    time.sleep(4.0)
    if proc.poll() is not None:
        pytest.skip("the run finished before the interrupt could be sent")
    started = time.monotonic()
    os.killpg(proc.pid, signal.SIGINT)  # what Ctrl-C does: the whole foreground group
    _, err = proc.communicate(timeout=60)
    assert time.monotonic() - started < 20  # stops promptly
    assert proc.returncode != 0
    # Not asserted here: the absence of a traceback. An interrupt that lands while a
    # compiled extension is being imported comes back as ImportError (exit 1, with a
    # traceback), which cli.py does not map yet. The output guarantee holds either way:
    assert snapshot(out) == {"summary.json": b"earlier run"}
    assert sorted(p.name for p in tmp_path.iterdir()) == ["e.csv", "report"]
