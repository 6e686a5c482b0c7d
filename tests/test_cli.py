"""The command line end to end: the demo scenarios and the documented outputs."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import networkx as nx
import pytest
from _cli import ROOT, roles


@pytest.fixture(scope="module")
def company(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("company") / "report"
    done = roles("demo", "--out", str(out), "--quiet")
    assert done.returncode == 0, done.stderr
    return out


@pytest.fixture(scope="module")
def suppliers(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("suppliers") / "report"
    done = roles("demo", "--scenario", "suppliers", "--out", str(out), "--quiet")
    assert done.returncode == 0, done.stderr
    return out


def _rows(folder: Path) -> dict[str, dict[str, str]]:
    with open(folder / "nodes.csv", encoding="utf-8", newline="") as fh:
        return {r["node"]: r for r in csv.DictReader(fh)}


def test_demo_writes_every_output(company):
    for name in ("report.pdf", "report.html", "nodes.csv", "summary.json", "graph.graphml"):
        assert (company / name).stat().st_size > 0, name
    assert (company / "report.pdf").read_bytes().startswith(b"%PDF")
    summary = json.loads((company / "summary.json").read_text(encoding="utf-8"))
    for key in (
        "nodes",
        "edges",
        "directed",
        "communities",
        "bridges",
        "hubs",
        "views",
        "parameters",
        "input",
        "versions",
        "timings",
    ):
        assert key in summary, key
    assert summary["nodes"] == 198 and summary["directed"] is False
    assert set(summary["views"]) >= {"ari", "nmi"}
    assert len(summary["input"]["sha256"]) == 64
    assert set(summary["parameters"]) >= {"seed", "walks", "embedding", "views", "directed"}


def test_company_demo_finds_the_planted_features(company):
    # Planted by examples/make_company.py (our own invented scenario).
    summary = json.loads((company / "summary.json").read_text(encoding="utf-8"))
    rows = _rows(company)
    assert {"Dorvel Kasimo", "Renna Xolatu"} <= set(summary["hubs"][:4])
    planted_bridges = {"Tulo Brimesk", "Sava Quintel", "Mika Lorendai"}
    assert len(planted_bridges & set(summary["bridges"][:6])) >= 2
    assert int(rows["Fen Ostravik"]["dependents"]) == 6
    spof = [d["node"] for d in summary["single_points_of_failure"]]
    assert spof[0] == "Fen Ostravik"
    # The person listed only in the nodes file is kept, with no ties.
    loners = [n for n, r in rows.items() if r["role"] == "no ties"]
    assert len(loners) == 1


def test_supplier_demo_finds_the_planted_chokepoints(suppliers):
    # Planted by examples/make_suppliers.py: dependents counted by hand from the
    # generator (Varnholt 4 sole customers + 1 downstream, Quessa 3 + 1, Ilmarin 2),
    # cross-checked with networkx.immediate_dominators.
    rows = _rows(suppliers)
    assert int(rows["Varnholt Castings"]["dependents"]) == 5
    assert int(rows["Quessa Polymers"]["dependents"]) == 4
    assert int(rows["Ilmarin Drives"]["dependents"]) == 2
    summary = json.loads((suppliers / "summary.json").read_text(encoding="utf-8"))
    assert summary["directed"] is True
    # Supply walks stop at the plants after a few tiers; the views then walk both ways
    # and do find groups (a directed-only walk left every firm as noise).
    assert summary["walks_over"].startswith("ties in both directions")
    assert summary["grouped"] is True
    top = [d["node"] for d in summary["single_points_of_failure"][:3]]
    assert top == ["Varnholt Castings", "Quessa Polymers", "Ilmarin Drives"]


def test_graphml_carries_the_findings(company):
    g = nx.read_graphml(company / "graph.graphml")
    assert g.number_of_nodes() == 198
    attrs = g.nodes["Fen Ostravik"]
    assert int(attrs["dependents"]) == 6 and "community" in attrs and "role" in attrs


def test_embed_writes_vectors_and_walks(tmp_path):
    out = tmp_path / "vectors"
    edges = ROOT / "examples" / "company_edges.csv"
    done = roles("embed", str(edges), "--out", str(out), "--keep-walks", "--seed", "3", "--quiet")
    assert done.returncode == 0, done.stderr
    for view in ("local", "far"):
        with open(out / f"{view}.csv", encoding="utf-8", newline="") as fh:
            rows = list(csv.reader(fh))
        assert rows[0][0] == "node" and len(rows) == 198  # header + 197 members with ties
        walks = (out / f"{view}.walks.tsv").read_text(encoding="utf-8").splitlines()
        assert all("\t" in w for w in walks[:50])
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert summary["parameters"]["seed"] == 3
    assert (
        summary["parameters"]["views"]["local"]["q"]
        > 1
        > summary["parameters"]["views"]["far"]["q"]
    )


def test_help_explains_every_command():
    for cmd in ("report", "embed", "demo"):
        done = roles(cmd, "--help")
        assert done.returncode == 0 and "--out" in done.stdout
