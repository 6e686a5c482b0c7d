"""Changes between two snapshots: members, ties, community events, moves.

The snapshot pairs are built here from rings of cliques with known events, after the
event types of Palla, Barabási & Vicsek (Nature 2007) and Greene, Doyle & Cunningham
(ASONAM 2010): every expected count below follows from the construction.
"""

from __future__ import annotations

import itertools

import networkx as nx
import pytest

from roles.analysis.snapshots import (
    community_events,
    compare_graphs,
    member_changes,
    moved_members,
    tie_changes,
)

SIZE = 12  # members per clique
HALF = SIZE // 2


def pairs(k: int) -> int:
    return k * (k - 1) // 2


def _clique(g: nx.Graph, names: list[str]) -> None:
    g.add_edges_from(itertools.combinations(names, 2))


def _members(i: int, js: range = range(SIZE)) -> list[str]:
    return [f"p{i}_{j}" for j in js]


def snapshot_pair() -> tuple[nx.Graph, nx.Graph, dict[str, int], dict[str, int]]:
    """Old: eight 12-cliques c0..c7 in a ring (one tie between neighbours).

    New: c0 and c1 fused into one clique (merging), c2 cut into two halves of 6
    (splitting), c3 gone with its members (death), a new clique c8 (birth), c4 grown by
    four new members (growth), c5 shrunk by four who left (contraction), c6 and c7 as
    they were (continuation).
    """
    old = nx.Graph()
    for i in range(8):
        _clique(old, _members(i))
    for i in range(8):
        old.add_edge(f"p{i}_0", f"p{(i + 1) % 8}_1")
    truth_old = {name: i + 1 for i in range(8) for name in _members(i)}

    new = old.copy()
    # merging: every c0 member tied to every c1 member (one such tie existed: p0_0-p1_1)
    new.add_edges_from(itertools.product(_members(0), _members(1)))
    # splitting: c2's halves lose the HALF**2 ties between them; the second half is
    # tied on to c4
    new.remove_edges_from(
        itertools.product(_members(2, range(HALF)), _members(2, range(HALF, SIZE)))
    )
    new.add_edge(f"p2_{HALF}", "p4_2")
    # death: c3's members leave (pairs(SIZE) ties inside, 2 ring ties)
    new.remove_nodes_from(_members(3))
    # birth: c8, tied to c4 once
    _clique(new, _members(8))
    new.add_edge("p8_0", "p4_3")
    # growth: four newcomers in c4, tied to everyone there
    _clique(new, _members(4, range(SIZE + 4)))
    # contraction: four of c5 leave
    new.remove_nodes_from(_members(5, range(SIZE - 4, SIZE)))

    truth_new = {name: 1 for name in _members(0) + _members(1)}
    truth_new.update({n: 2 for n in _members(2, range(HALF))})
    truth_new.update({n: 3 for n in _members(2, range(HALF, SIZE))})
    truth_new.update({n: 4 for n in _members(4, range(SIZE + 4))})
    truth_new.update({n: 5 for n in _members(5, range(SIZE - 4))})
    truth_new.update({n: 6 for n in _members(6)})
    truth_new.update({n: 7 for n in _members(7)})
    truth_new.update({n: 8 for n in _members(8)})
    return old, new, truth_old, truth_new


def _events(events) -> set[tuple[str, tuple[int, ...], tuple[int, ...]]]:
    return {(e.event, e.old, e.new) for e in events}


def test_member_and_tie_counts_follow_the_construction():
    old, new, _, truth_new = snapshot_pair()
    m = member_changes(old.nodes, new.nodes)
    # joined: c8's SIZE and c4's 4 newcomers; left: c3's SIZE and c5's 4 (construction)
    assert len(m.joined) == SIZE + 4 and len(m.left) == SIZE + 4
    assert m.stayed == 8 * SIZE - SIZE - 4
    assert set(m.joined) == set(_members(8)) | set(_members(4, range(SIZE, SIZE + 4)))
    t = tie_changes(old, new, truth_new)
    added = (
        SIZE * SIZE
        - 1  # fusing c0 and c1
        + 1  # the second half of c2 to c4 (p2_HALF-p4_2)
        + pairs(SIZE)
        + 1  # c8 and its tie to c4
        + pairs(SIZE + 4)
        - pairs(SIZE)  # c4's newcomers
    )
    removed_with_leavers = (pairs(SIZE) + 2) + (pairs(SIZE) - pairs(SIZE - 4))  # c3, c5
    assert t.added == added
    assert t.removed == HALF * HALF + removed_with_leavers
    assert t.kept == old.number_of_edges() - t.removed
    assert t.lost_with_leavers == removed_with_leavers
    lost = {(p.a, p.b): p.lost for p in t.pairs if p.lost}
    assert lost == {(2, 3): HALF * HALF}  # the split: the only loss between those who stayed


def test_every_planted_event_is_found_with_its_type():
    _, _, truth_old, truth_new = snapshot_pair()
    events = community_events(truth_old, truth_new)
    assert _events(events) == {
        ("merging", (1, 2), (1,)),
        ("splitting", (3,), (2, 3)),
        ("death", (4,), ()),
        ("birth", (), (8,)),
        ("growth", (5,), (4,)),
        ("contraction", (6,), (5,)),
        ("continuation", (7,), (6,)),
        ("continuation", (8,), (7,)),
    }
    growth = next(e for e in events if e.event == "growth")
    assert (growth.joined, growth.left) == (4, 0)
    shrink = next(e for e in events if e.event == "contraction")
    assert (shrink.joined, shrink.left) == (0, 4)


def test_same_partition_relabelled_is_only_continuation():
    _, _, truth_old, _ = snapshot_pair()
    relabelled = {k: 9 - v for k, v in truth_old.items()}
    events = community_events(truth_old, relabelled)
    assert {e.event for e in events} == {"continuation"}
    assert len(events) == 8


def test_moves_need_confidence_in_both_runs():
    old = {f"a{i}": 1 for i in range(6)} | {f"b{i}": 2 for i in range(6)}
    new = dict(old, a0=2)
    events = community_events(old, new)
    sure = dict.fromkeys(old, 0.9)
    moves = moved_members(old, new, events, old_confidence=sure, new_confidence=sure)
    assert [(m.member, m.old, m.new) for m in moves] == [("a0", 1, 2)]
    unsure = dict(sure, a0=0.5)  # below Hennig's (2007) 0.75 "stable" bound in one run
    assert moved_members(old, new, events, old_confidence=sure, new_confidence=unsure) == ()
    assert moved_members(old, new, events) == ()


@pytest.mark.parametrize("seed", range(10))
def test_the_tool_finds_the_planted_events(seed):
    old, new, _, _ = snapshot_pair()
    from roles.config import Config

    config = Config().with_seed(seed)
    _, _, changes = compare_graphs(old, new, config=config)
    kinds = sorted(e.event for e in changes.events)
    assert kinds == sorted(
        ["merging", "splitting", "death", "birth", "growth", "contraction"] + ["continuation"] * 2
    )
    truth = tie_changes(old, new, {})
    assert (changes.ties.added, changes.ties.removed) == (truth.added, truth.removed)


def test_two_seeds_on_one_snapshot_show_no_change():
    old, _, _, _ = snapshot_pair()
    from roles.config import Config
    from roles.pipeline import run

    a = run(old, config=Config().with_seed(1))
    b = run(old, config=Config().with_seed(2))
    from roles.analysis.snapshots import compare_results

    changes = compare_results(a, b)
    assert {e.event for e in changes.events} == {"continuation"}
    assert changes.moved == ()
    assert changes.ties.added == changes.ties.removed == 0


def test_company_year_demo_finds_its_planted_changes(tmp_path):
    # examples/make_company_year.py plants: Design split in two, the Sales-Logistics
    # bridge Sava Quintel left, eight hires in Assembly, four leavers in Quality.
    import json

    from _cli import roles

    out = tmp_path / "year"
    proc = roles("demo", "--scenario", "company-year", "--out", str(out), "--quiet")
    assert proc.returncode == 0, proc.stderr
    for name in ("report.pdf", "report.html", "changes.json"):
        assert (out / name).is_file()
    for sub in ("old", "new"):
        assert (out / sub / "summary.json").is_file() and (out / sub / "report.pdf").is_file()
    ch = json.loads((out / "changes.json").read_text(encoding="utf-8"))
    assert len(ch["members"]["joined"]) == 8
    assert "Sava Quintel" in ch["members"]["left"] and len(ch["members"]["left"]) == 5
    events = {e["event"] for e in ch["communities"]}
    assert {"splitting", "growth", "contraction"} <= events
    assert events <= {"splitting", "growth", "contraction", "continuation"}
    split = next(e for e in ch["communities"] if e["event"] == "splitting")
    old = json.loads((out / "old" / "summary.json").read_text(encoding="utf-8"))
    # the split community is the one that was mostly Design in the first snapshot
    assert old["formal"]["crosstab"]["Design"][str(split["old"][0])] >= 30
    stopped = {(r["member"], r["role"]) for r in ch["roles"] if r["change"] == "stopped"}
    assert ("Sava Quintel", "bridge-like") in stopped
    assert ch["moved"] == []


def test_compare_refuses_three_nodes_files(tmp_path):
    from _cli import roles

    edges = tmp_path / "e.csv"
    edges.write_text("source,target\na,b\nb,c\n", encoding="utf-8")
    out = tmp_path / "out"
    proc = roles(
        "compare", str(edges), str(edges), "--out", str(out),
        "--nodes", str(edges), "--nodes", str(edges), "--nodes", str(edges),
    )  # fmt: skip
    assert proc.returncode == 2
    assert proc.stderr.startswith("error: --nodes takes one file for both snapshots")
    assert not out.exists()


def test_compare_checks_removed_names_against_both_snapshots(tmp_path):
    from _cli import roles

    old = tmp_path / "old.csv"
    new = tmp_path / "new.csv"
    old.write_text("source,target\nanna,bert\nbert,carl\n", encoding="utf-8")
    new.write_text("source,target\nbert,carl\ncarl,dora\n", encoding="utf-8")
    out = tmp_path / "out"
    proc = roles("compare", str(old), str(new), "--out", str(out), "--remove", "dorra")
    assert proc.returncode == 2
    assert "dorra" in proc.stderr and "dora" in proc.stderr  # the closest known name
    assert not out.exists()
