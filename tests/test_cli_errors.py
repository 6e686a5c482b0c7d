"""Bad inputs through the command line (issue 6): one ``error:`` line on stderr, exit
status 2, no traceback, nothing written, earlier outputs untouched; Ctrl-C stops the run
and leaves the earlier outputs as they were."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import networkx as nx
import pytest
from _cli import ROOT, roles

from roles.io.manifest import MANIFEST
from roles.io.output import OutputFolder


def snapshot(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def earlier_run(out: Path, files: dict[str, str] | None = None) -> None:
    """An output folder as an earlier run of the tool left it (manifest included)."""
    with OutputFolder(out) as tmp:
        for name, text in (files or {"summary.json": "earlier run"}).items():
            (tmp / name).write_text(text)


def one_error_line(done: subprocess.CompletedProcess) -> str:
    assert done.returncode == 2, done.stderr
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1, done.stderr
    assert lines[0].startswith("error: ") and "Traceback" not in done.stderr
    assert done.stdout == ""
    return lines[0]


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
    "deeply nested toml": (
        {"e.csv": GOOD, "c.toml": "x = " + "[" * 100_000 + "]" * 100_000},
        ["--config", "c.toml"],
        "nested too deeply",
    ),
    "weight past float32": ({"e.csv": "source,target,weight\nAna,Ben,1e39\n"}, [], "line 2"),
    "weight that becomes 0": (
        {"e.csv": "source,target,weight\nAna,Ben,1\nBen,Cai,1e-46\n"},
        [],
        "e.csv, line 3: the 'weight' value '1e-46' is smaller than 1.2e-38",
    ),
    "name too long": (
        {"e.csv": "source,target\nAna,Ben\n" + "x" * 131_073 + ",Ana\n"},
        [],
        "e.csv, line 3: a name or value is longer than 131,072 characters",
    ),
    "group-by without nodes": ({"e.csv": GOOD}, ["--group-by", "team"], "--nodes"),
    "group-by column missing": (
        {"e.csv": GOOD, "n.csv": "node,team\nAna,x\n"},
        ["--nodes", "n.csv", "--group-by", "teams"],
        "no column 'teams' to group by; its columns are 'team'. Did you mean 'team'?",
    ),
    "group-by column blank": (
        {"e.csv": GOOD, "n.csv": "node,team,site\nAna, ,x\nBen,,y\nCai,,z\n"},
        ["--nodes", "n.csv", "--group-by", "team"],
        "n.csv: the column 'team' is blank for every member",
    ),
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
    earlier_run(out)
    before_out = snapshot(out)
    before = sorted(p.name for p in tmp_path.iterdir())
    done = roles("report", "e.csv", "--out", "report", *extra, cwd=tmp_path)
    assert word in one_error_line(done)
    assert snapshot(out) == before_out
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
    earlier_run(out)
    before_out = snapshot(out)
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
    assert snapshot(out) == before_out
    assert sorted(p.name for p in tmp_path.iterdir()) == ["e.csv", "report"]


# ------------------------------------------------------------------ checks before the work


def _read_only(out: Path) -> None:
    earlier_run(out)
    out.chmod(0o555)  # refused by its permission bits, even for the superuser


def _folder_for_nodes_csv(out: Path) -> None:
    earlier_run(out, {"nodes.csv": "earlier", "summary.json": "earlier"})
    (out / "nodes.csv").unlink()
    (out / "nodes.csv").mkdir()
    (out / "nodes.csv" / "mine.txt").write_text("the user's file")


def _config_linked_in(out: Path) -> None:
    earlier_run(out)
    (out / "summary.json").unlink()
    os.link(out.parent / "c.toml", out / "summary.json")  # the config, under an output name


def _older_version(out: Path) -> None:
    _folder_for_nodes_csv(out)
    (out / MANIFEST).unlink()


# name -> (prepare the output folder, --out, extra arguments, words of the message)
EARLY = {
    "group-by blank": (None, "report", ["--group-by", "team"], "'team' is blank for every"),
    "group-by missing": (None, "report", ["--group-by", "dept"], "no column 'dept'"),
    "read-only folder": (_read_only, "report", [], "is read-only"),
    "proc": (None, "/proc/x/report", [], "/proc"),
    "folder in place of nodes.csv": (_folder_for_nodes_csv, "report", [], "'nodes.csv'"),
    "older version's outputs": (_older_version, "report", [], "no earlier run"),
    "config hard-linked in": (_config_linked_in, "report", [], "the input file 'c.toml' itself"),
    "name of 256 bytes": (None, "r" * 256, [], "name of 256 bytes"),
    "path over 4096 bytes": (None, "/".join(["d" * 250] * 17), [], "full path is"),
}


@pytest.mark.parametrize("case", list(EARLY))
def test_output_and_group_checks_come_before_the_analysis(tmp_path, monkeypatch, capsys, case):
    import roles.cli
    import roles.pipeline

    prepare, out, extra, words = EARLY[case]
    (tmp_path / "e.csv").write_text(GOOD)
    (tmp_path / "n.csv").write_text("node,team\nAna,\nBen, \nCai,\n")
    (tmp_path / "c.toml").write_text("seed = 3\n")
    target = tmp_path / "report"
    if prepare is not None:
        prepare(target)
    before = {p: snapshot(p) if p.is_dir() else p.read_bytes() for p in tmp_path.rglob("*")}

    def analysis(*args, **kwargs):
        raise AssertionError("the analysis started before the check")

    monkeypatch.setattr(roles.pipeline, "run", analysis)
    monkeypatch.chdir(tmp_path)
    args = ["report", "e.csv", "--out", out, "--nodes", "n.csv", "--config", "c.toml", *extra]
    try:
        code = roles.cli.main([*args, "--quiet"])
    finally:
        if target.exists():
            target.chmod(0o755)
    err = capsys.readouterr().err
    assert code == 2, err
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), err
    assert words in lines[0]
    after = {p: snapshot(p) if p.is_dir() else p.read_bytes() for p in tmp_path.rglob("*")}
    assert after == before  # nothing written, nothing removed, no staging folder


@pytest.mark.slow
def test_report_then_embed_leaves_one_commands_files(tmp_path):
    # Zachary's karate club, as bundled with networkx.
    g = nx.karate_club_graph()
    (tmp_path / "e.csv").write_text(
        "source,target\n" + "".join(f"m{u},m{v}\n" for u, v in g.edges())
    )
    assert roles("report", "e.csv", "--out", "out", "--quiet", cwd=tmp_path).returncode == 0
    (tmp_path / "out" / "notes.txt").write_text("the user's own file")
    done = roles("embed", "e.csv", "--out", "out", "--quiet", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    names = sorted(p.name for p in (tmp_path / "out").iterdir())
    assert names == [MANIFEST, "far.csv", "local.csv", "notes.txt", "summary.json"]
    assert "views" in json.loads((tmp_path / "out" / "summary.json").read_text())
    assert sorted(p.name for p in tmp_path.iterdir()) == ["e.csv", "out"]


@pytest.mark.slow
def test_lookalike_and_decomposed_names_reported(tmp_path):
    # Zachary's karate club (networkx) with member 0 named "Zoë" written decomposed
    # (e + U+0308) in the edge list and composed (U+00EB) in the nodes file, and one
    # extra member whose name differs from "m1" by a zero-width space (U+200B).
    def name(i: int) -> str:
        return "Zoe\u0308" if i == 0 else f"m{i}"

    g = nx.karate_club_graph()
    rows = "".join(f"{name(u)},{name(v)}\n" for u, v in g.edges()) + "m1\u200b,m2\n"
    (tmp_path / "e.csv").write_text("source,target\n" + rows, encoding="utf-8")
    composed = {0: "Zo\u00eb"}
    people = "".join(f"{composed.get(i, f'm{i}')},{g.nodes[i]['club']}\n" for i in g)
    (tmp_path / "n.csv").write_text("node,club\n" + people, encoding="utf-8")
    done = roles("report", "e.csv", "--nodes", "n.csv", "--out", "out", "--quiet", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    summary = json.loads((tmp_path / "out" / "summary.json").read_text(encoding="utf-8"))
    source = summary["input"]
    assert summary["nodes"] == 35  # 34 members and the look-alike; no phantom "Zoë"
    assert source["nodes_only_in_nodes_file"] == 0
    assert source["counts"]["names_normalised"] == 1
    assert source["counts"]["lookalike_names"] == 2
    assert source["lookalike_example"] == ["'m1'", "'m1<U+200B>'"]
    html = (tmp_path / "out" / "report.html").read_text(encoding="utf-8")
    assert "for example &#39;m1&#39; and &#39;m1&lt;U+200B&gt;&#39;" in html
