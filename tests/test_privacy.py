"""--pseudonymize keeps its promises: no real name or name-bearing file name in any
output, codes that follow no order of the names, a key file for the owner only, and no
attribute group under --min-group-size anywhere.

All people and file names here are invented for the test.
"""

from __future__ import annotations

import csv
import itertools
import json
import os
import random
import stat
import zipfile
from pathlib import Path

import networkx as nx
import numpy as np
import pytest
from _cli import roles

from roles.io.privacy import PseudonymKey, codes_for, suppress_small_groups

FIRST = ["Brandolf", "Quiselle", "Tormund", "Yvarra", "Osgrim", "Peldora", "Zanthe", "Korvell"]
LAST = ["Quistov", "Marrowind", "Telvaris", "Ostrager", "Vundahl", "Ebbecroft"]


def _names(n: int, seed: int = 0) -> list[str]:
    pairs = list(itertools.product(FIRST, LAST))
    random.Random(seed).shuffle(pairs)
    return [f"{a} {b}" for a, b in pairs[:n]]


def _scenario(tmp_path: Path) -> tuple[Path, Path, list[str], list[str]]:
    """Three departments of 13, one of 3 (under the default minimum of 5), a manager
    column naming members and one person outside the network."""
    names = _names(42)
    g = nx.random_partition_graph([13, 13, 13, 3], 0.5, 0.03, seed=4)
    depts = ["Moulding"] * 13 + ["Glazing"] * 13 + ["Kilns"] * 13 + ["Tinyteam"] * 3
    edges = tmp_path / "ties_of_Wilhelmina_Strackbury.csv"
    with open(edges, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["source", "target"])
        w.writerows((names[u], names[v]) for u, v in g.edges())
    outsider = "Hendrika Voolmark"  # a manager who is not in the network
    nodes = tmp_path / "staff_of_Cornelius_Abbotsleigh.csv"
    with open(nodes, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["node", "department", "manager"])
        for i, name in enumerate(names):
            boss = outsider if i % 13 == 0 else names[(i // 13) * 13]
            w.writerow([name, depts[i], boss])
    secrets = [*names, outsider]
    files = ["Wilhelmina", "Strackbury", "Cornelius", "Abbotsleigh"]
    return edges, nodes, secrets, files


def _texts(folder: Path) -> dict[str, str]:
    """Every file under ``folder`` as text: PDF text, the XML inside zip files, the rest."""
    from pypdf import PdfReader

    out = {}
    for path in sorted(p for p in folder.rglob("*") if p.is_file()):
        if path.suffix == ".pdf":
            text = " ".join(page.extract_text() or "" for page in PdfReader(path).pages)
        elif zipfile.is_zipfile(path):
            with zipfile.ZipFile(path) as z:
                text = " ".join(z.read(n).decode("utf-8", "replace") for n in z.namelist())
        else:
            text = path.read_bytes().decode("utf-8", "replace")
        out[str(path.relative_to(folder))] = " ".join(text.split())
    return out


def _leaks(texts: dict[str, str], secrets: list[str]) -> list[tuple[str, str]]:
    words = {w for s in secrets for w in s.split()}
    return [(f, w) for f, t in texts.items() for w in sorted(words) if w in t]


def test_no_name_and_no_small_group_in_any_output(tmp_path):
    edges, nodes, secrets, files = _scenario(tmp_path)
    out, key = tmp_path / "out", tmp_path / "keys" / "key.csv"
    key.parent.mkdir()
    proc = roles(
        "report", str(edges), "--nodes", str(nodes), "--group-by", "department",
        "--kind", "organisation", "--pseudonymize", "--key-file", str(key),
        "--out", str(out), "--quiet", "--seed", "3",
    )  # fmt: skip
    assert proc.returncode == 0, proc.stderr
    texts = _texts(out)
    assert {"report.pdf", "report.html", "nodes.csv", "summary.json", "graph.graphml"} <= set(texts)
    assert _leaks(texts, secrets + files) == []
    # the department of 3 is under --min-group-size (default 5) everywhere but per member
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert "Tinyteam" not in summary["formal"]["crosstab"]
    assert "Tinyteam" not in summary["formal"]["ei_index"]
    assert summary["formal"]["small_groups"]["count"] == 1
    for name in ("report.html", "report.pdf", "summary.json"):
        assert "Tinyteam" not in texts[name], name
    # the manager column holds codes of the same kind as the members'
    with open(out / "nodes.csv", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    codes = {r["node"] for r in rows}
    assert all(r["manager"] in codes or r["manager"].startswith("P-") for r in rows)
    assert sum(r["manager"] in codes for r in rows) >= 36  # all but the outsider's rows
    # the key: owner-only, and it maps the codes back to the real names
    assert stat.S_IMODE(key.stat().st_mode) == 0o600
    with open(key, encoding="utf-8") as fh:
        back = {r["code"]: r["name"] for r in csv.DictReader(fh)}
    assert {back[c] for c in codes} == set(secrets[:-1])


def test_the_same_key_file_gives_the_same_codes(tmp_path):
    edges, nodes, _, _ = _scenario(tmp_path)
    key = tmp_path / "key.csv"
    tables = []
    for run in ("a", "b"):
        proc = roles(
            "report", str(edges), "--pseudonymize", "--key-file", str(key),
            "--out", str(tmp_path / run), "--quiet",
        )  # fmt: skip
        assert proc.returncode == 0, proc.stderr
        tables.append(sorted((tmp_path / run / "nodes.csv").read_text().splitlines()[1:]))
    assert tables[0] == tables[1]
    # without a key file, each run draws a new key: other codes
    proc = roles("report", str(edges), "--pseudonymize", "--out", str(tmp_path / "c"), "--quiet")
    assert proc.returncode == 0, proc.stderr
    first = {line.split(",")[0] for line in tables[0]}
    other = {
        line.split(",")[0] for line in (tmp_path / "c" / "nodes.csv").read_text().splitlines()[1:]
    }
    assert not first & other


def test_codes_follow_no_order_of_the_names():
    # 1,000 invented names. Under independence Spearman's rho over n pairs has standard
    # deviation 1/sqrt(n - 1) (Kendall & Stuart); 3 sigma = 0.095 for n = 1000.
    rng = random.Random(11)
    syll = ["ka", "lo", "mi", "ren", "tu", "sa", "vel", "dor", "bri", "na", "xo", "fe"]
    names = set()
    while len(names) < 1000:
        names.add("".join(rng.choice(syll) for _ in range(4)).capitalize())
    ordered = sorted(names)
    for seed in range(5):
        key = PseudonymKey(bytes(np.random.default_rng(seed).integers(0, 256, 32).tolist()), {})
        codes = codes_for(ordered, key, "P")
        assert len(set(codes.values())) == 1000
        code_rank = {c: i for i, c in enumerate(sorted(codes.values()))}
        ranks = np.array([code_rank[codes[n]] for n in ordered], dtype=float)
        rho = np.corrcoef(np.arange(1000.0), ranks)[0, 1]  # Pearson on ranks = Spearman
        assert abs(rho) < 3 / np.sqrt(999), (seed, rho)


def test_codes_survive_collisions_and_stay_stable():
    key = PseudonymKey(bytes(32), {})
    names = [f"n{i}" for i in range(20000)]  # 20,000 codes of 6 hex digits: collisions likely
    codes = codes_for(names, key, "M")
    assert len(set(codes.values())) == len(names)
    again = codes_for(list(reversed(names)), key, "M")
    assert again == codes


def test_small_groups_merge_into_other_when_large_enough():
    formal = {
        "crosstab": {"A": {"1": 9}, "B": {"1": 2, "2": 1}, "C": {"2": 3}},
        "ei_index": {"A": -1.0, "B": 0.3, "C": 0.1},
    }
    s = suppress_small_groups(formal, 5)
    assert s["crosstab"] == {"A": {"1": 9}, "other": {"1": 2, "2": 4}}
    assert s["ei_index"] == {"A": -1.0}
    assert s["small_groups"]["count"] == 2


@pytest.mark.parametrize("case", ["folder", "no_parent", "hard_link", "not_a_key", "config"])
def test_key_file_problems_stop_before_any_work(tmp_path, case):
    edges = tmp_path / "e.csv"
    edges.write_text("source,target\na,b\nb,c\nc,a\n", encoding="utf-8")
    config = tmp_path / "c.toml"
    config.write_text("seed = 3\n", encoding="utf-8")
    extra: list[str] = []
    if case == "folder":
        key = tmp_path / "somewhere"
        key.mkdir()
    elif case == "no_parent":
        key = tmp_path / "missing" / "key.csv"
    elif case == "hard_link":
        key = tmp_path / "link.csv"
        os.link(edges, key)
    elif case == "not_a_key":
        key = tmp_path / "notes.txt"
        key.write_text("my own notes\n", encoding="utf-8")
    else:
        key = config
        extra = ["--config", str(config)]
    before = key.read_bytes() if key.is_file() else None
    out = tmp_path / "out"
    proc = roles(
        "report", str(edges), "--pseudonymize", "--key-file", str(key), "--out", str(out), *extra
    )
    assert proc.returncode == 2, proc.stderr
    assert proc.stderr.startswith("error: --key-file"), proc.stderr
    assert len(proc.stderr.strip().splitlines()) == 1
    assert not out.exists()
    if before is not None:
        assert key.read_bytes() == before


def test_embed_pseudonymizes_too(tmp_path):
    edges, _, secrets, files = _scenario(tmp_path)
    out = tmp_path / "emb"
    proc = roles(
        "embed", str(edges), "--pseudonymize", "--keep-walks", "--out", str(out), "--quiet"
    )
    assert proc.returncode == 0, proc.stderr
    texts = _texts(out)
    assert {"local.csv", "far.csv", "summary.json"} <= set(texts)
    assert _leaks(texts, secrets + files[:2]) == []
