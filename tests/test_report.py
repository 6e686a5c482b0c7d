"""The printed report, read as a reader would: the PDF's text, pages and safety.

One pipeline run per graph per module (karate club with hostile names, and a small
directed supply tree); everything else renders from those results.
"""

from __future__ import annotations

import re
from pathlib import Path

import networkx as nx
import pytest

pypdf = pytest.importorskip("pypdf")

from roles import run  # noqa: E402
from roles.report.context import TOP, build_context  # noqa: E402
from roles.report.render import (  # noqa: E402
    _url_fetcher,  # noqa: E402
    render_html,
    render_report,
    write_pdf,
)

MADE = "2026-01-02 03:04 UTC"
TINY = "Zyxwvutsrq"  # a formal group of two members: below --min-group-size 5

# Names a reader's data may hold; each must print as the same text.
HOSTILE = [
    "<script>alert(1)</script>",
    "=cmd|' /C calc'!A0",
    "&amp; Söhne",
    '<img src="file:///etc/passwd">',
    "<link href='http://example.invalid/x.css'>",
    "\u05e9\u05dc\u05d5\u05dd Noa \U0001f600",
    "$x$ Ärger",
]

SECTIONS = [
    "At a glance",
    "and how they connect",
    "Roles: hubs, bridges",
    "Dependencies: who others rely on",
    "If people left",  # the 'if members were gone' section in organisation words
    "Two ways of looking",
    "Cautions before you act",
    "How this report was made",
    "Words used in this report",
]


def _karate() -> tuple[nx.Graph, dict]:
    """Zachary's karate club (Zachary 1977, bundled with networkx) with a tail.

    A chain of hostile names hangs off member 0 and ends in one more member, so every
    name in the chain is a cut vertex: the k-th from the end cuts off k members (it
    is the only way to them). They are the worst dependents after member 0, so each
    is printed in the dependencies table, whatever the embedding does.
    """
    g = nx.relabel_nodes(nx.karate_club_graph(), lambda n: f"Member {n:02d}")
    attrs = {n: {"unit": g.nodes[n]["club"]} for n in g}
    for n in ("Member 10", "Member 11"):
        attrs[n]["unit"] = TINY
    chain = ["Member 00", *HOSTILE, "Member 99"]
    nx.add_path(g, chain)
    for n in chain[1:]:
        attrs[n] = {"unit": "Mr. Hi"}
    g.add_node("Member 98")  # no ties at all
    attrs["Member 98"] = {"unit": "Mr. Hi"}
    return g, attrs


def _text(pdf: Path) -> list[str]:
    return [p.extract_text() or "" for p in pypdf.PdfReader(str(pdf)).pages]


def _flat(s: str) -> str:
    return re.sub(r"\s+", "", s)


@pytest.fixture(scope="module")
def karate_result():
    g, attrs = _karate()
    return run(g, attributes=attrs, group_by="unit", source={"file": "karate & co.csv"})


@pytest.fixture(scope="module")
def report(karate_result, tmp_path_factory):
    folder = tmp_path_factory.mktemp("report")
    render_report(
        karate_result,
        folder,
        title="Karate club <b>review</b>",
        kind="organisation",
        paper="a4",
        min_group_size=5,
        made=MADE,
    )
    pages = _text(folder / "report.pdf")
    html = (folder / "report.html").read_text(encoding="utf-8")
    return folder, pages, html


@pytest.fixture(scope="module")
def supply_result():
    # A growing-network tree (networkx gn_graph), edges turned to point from the older
    # node (supplier) to the newer (customer): node 0 feeds every other node.
    g = nx.gn_graph(40, seed=3).reverse()
    g = nx.relabel_nodes(g, {n: f"Firm {n:02d}" for n in g})
    return run(g)


def test_both_files_are_written(report):
    folder, pages, html = report
    assert (folder / "report.pdf").stat().st_size > 10_000
    assert html.startswith("<!DOCTYPE html>")
    assert len(pages) >= 9


def test_sections_come_in_the_order_of_the_brief(report):
    _, pages, _ = report
    body = "\n".join(pages[1:])  # the cover lists them all in its contents
    where = [body.find(s) for s in SECTIONS]
    assert -1 not in where, [s for s, w in zip(SECTIONS, where, strict=True) if w < 0]
    assert where == sorted(where)


def test_cover_says_title_data_and_date(report):
    _, pages, _ = report
    cover = pages[0]
    assert "Karate club <b>review</b>" in cover  # the title is text, not markup
    assert "karate & co.csv" in cover
    # Zachary's club has 34 members and 78 ties; the chain adds 8 members and 8 ties,
    # and one member has no ties.
    assert "43 (1 without any working tie)" in cover and "86" in cover
    assert MADE in cover


def test_contents_give_the_page_each_section_starts_on(report):
    _, pages, _ = report
    toc = pages[0]
    for title in SECTIONS:
        m = re.search(rf"{re.escape(title)}[^\n]*?\.{{3,}}\s*(\d+)\s*$", toc, re.M)
        assert m, title
        page = int(m.group(1))
        assert title in pages[page - 1], (title, page)


def test_summary_fits_on_one_page(report):
    _, pages, _ = report
    start = next(i for i, p in enumerate(pages) if "At a glance" in p and i > 0)
    assert "Look at these first" in pages[start]
    assert "and how they connect" in pages[start + 1]


def test_running_header_and_page_numbers(report):
    _, pages, _ = report
    n = len(pages)
    for i, page in enumerate(pages[1:], start=2):
        assert f"Page {i} of {n}" in page
        assert "Karate club <b>review</b>" in page


def test_cautions_are_printed_with_their_sources(report):
    _, pages, _ = report
    text = _flat("\n".join(pages))
    for phrase in (
        "mustnotbeusedtoevaluate",
        "Consultemployeerepresentatives",
        "Article29",
        "Borgatti&Molina",
        "Backstrom,Dwork&Kleinberg",
        "Smith&Moody",
        "Kossinets",
    ):
        assert phrase in text, phrase


# Phrases of each reader's cautions (templates/cautions_*.html, cover_warning.html,
# marking.html), as pypdf extracts them with the white space removed.
ORGANISATION_CAUTIONS = (
    "mustnotbeusedtoevaluate",  # Borgatti & Molina 2003
    "workscouncil",
    "Article29WorkingParty",
    "Whomayseethisreport",
    "purposelimitation",  # GDPR Article 5(1)(b)
    "storagelimitation",  # GDPR Article 5(1)(e)
    "Article5(1)(b)and(e)",
)
SUPPLY_CAUTIONS = (
    "Verifyeachsinglepointoffailure",
    "Simchi-Levietal.2015",  # the citation in the text; the reference list has them all
    "non-disclosureterms",
    "Competitionlawlimitsthesharingofsupplierdata",
    "Article101",
    "ordervolumesandspend,inventoryandsafetystock,leadtimes",
    "Commerciallyconfidential",
)


@pytest.fixture(scope="module")
def supply_pdf(supply_result, tmp_path_factory):
    folder = tmp_path_factory.mktemp("supply")
    render_report(
        supply_result, folder, title="Tree", kind="supply", paper="a4", min_group_size=5, made=MADE
    )
    return _text(folder / "report.pdf")


@pytest.fixture(scope="module")
def general_pdf(karate_result, tmp_path_factory):
    folder = tmp_path_factory.mktemp("general")
    render_report(
        karate_result, folder, title="Club", kind="general", paper="a4", min_group_size=5, made=MADE
    )
    return _text(folder / "report.pdf")


def test_each_reader_gets_their_own_cautions(report, supply_pdf, general_pdf):
    organisation = _flat("\n".join(report[1]))
    supply = _flat("\n".join(supply_pdf))
    general = _flat("\n".join(general_pdf))
    for phrase in ORGANISATION_CAUTIONS:
        assert phrase in organisation, phrase
        assert phrase not in supply, phrase
    for phrase in SUPPLY_CAUTIONS:
        assert phrase in supply, phrase
        assert phrase not in organisation, phrase
    # General keeps both lists, except each kind's own confidentiality marking.
    for phrase in ORGANISATION_CAUTIONS + SUPPLY_CAUTIONS[:-1]:
        assert phrase in general, phrase
    # The supply cover speaks of firms and contracts, not of individuals' worth.
    assert "performance,effortorworth" not in supply and "employee" not in supply.lower()
    assert "performance,effortorworth" in _flat(report[1][0])


def test_every_page_carries_the_confidentiality_marking(report, supply_pdf):
    for page in report[1]:
        assert "Confidential:namespeople" in _flat(page)
    for page in supply_pdf:
        assert "Commerciallyconfidential:supplierdata" in _flat(page)


def test_cautions_open_with_what_to_check_next(report, supply_pdf):
    organisation = _flat("\n".join(report[1]))
    supply = _flat("\n".join(supply_pdf))
    assert "Whattochecknext" in organisation and "Whattochecknext" in supply
    assert "withprocurement" in supply and "withprocurement" not in organisation
    # The single point of failure of the tree (Firm 00, every other firm downstream).
    assert "singlesourcesofsection4(Firm00" in supply
    # The karate report's one member without ties is named, and checked.
    assert "Member98" in organisation and "withoutworkingties(section2)" in organisation


def test_method_section_has_the_reproducibility_figures(report, karate_result):
    _, pages, _ = report
    text = "\n".join(pages)
    s = karate_result.summary
    assert str(s["parameters"]["seed"]) in text
    assert "SHA-256" in text
    for package in ("networkx", "gensim", "hdbscan", "weasyprint"):
        assert package in text
    for stage in s["timings"]:
        assert stage in text
    flat = _flat(text)
    for ref in (
        "Grover,A.&Leskovec",
        "Campello",
        "McInnes",
        "Guimerà,R.&Amaral",
        "Freeman,L.C.",
        "Brandes,U.",
        "Burt,R.S.",
        "Lengauer",
        "Jaccard,P.",
        "Hubert,L.&Arabie",
        "Strehl",
    ):
        assert ref in flat, ref


def test_hostile_names_print_as_text(report):
    _, pages, html = report
    flat = _flat("\n".join(pages))
    for name in HOSTILE[:5]:
        assert _flat(name) in flat, name
    assert "$x$Ärger" in flat  # a dollar sign is not mathematics
    # In the HTML every such name is escaped: no live tag and no decoded entity.
    assert "<script>" not in html
    assert "<img" not in html and "<link" not in html
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in html
    assert "&amp;amp; Söhne" in html
    assert HOSTILE[5] in html  # right-to-left text and emoji kept as they are
    assert "&lt;link href=&#39;http://example.invalid/x.css&#39;&gt;" in html


def test_right_to_left_names_keep_their_letters(report):
    _, pages, _ = report
    text = "\n".join(pages)
    hebrew = "\u05e9\u05dc\u05d5\u05dd"
    # PDF text comes out in visual order for right-to-left runs; either order will do.
    assert hebrew in text or hebrew[::-1] in text


def test_figures_are_inline_vector_graphics_with_unique_ids(report):
    _, _, html = report
    assert html.count("<svg") >= 5
    assert "<image" not in html  # no raster parts in any figure
    ids = re.findall(r'\bid="([^"]+)"', html)
    assert len(ids) == len(set(ids))
    assert html.count("<figcaption>") == html.count("<figure>") >= 5


@pytest.fixture(scope="module")
def general_context(karate_result):
    """Neutral wording, every group shown (threshold 1), names marked as codes."""
    return build_context(
        karate_result,
        title="t",
        kind="general",
        paper="a4",
        min_group_size=1,
        made=MADE,
        pseudonymized=True,
    )


def test_small_attribute_groups_are_never_reported(report, general_context):
    _, pages, html = report
    assert TINY not in "\n".join(pages) and TINY not in html
    assert TINY in render_html(general_context)  # shown once the threshold allows it


def test_formal_figure_leaves_out_members_without_ties(general_context):
    # Member 98 has no ties: a "no ties" column would point at one person of Mr. Hi.
    svg = general_context["formal"]["figure"].svg
    texts = re.findall(r"<text[^>]*>([^<]*)</text>", svg)
    assert "0" not in texts and "no ties" not in svg


def test_dependents_table_lists_the_chain_by_hand_count(report):
    _, _, html = report
    # Brute force with networkx: remove member 0 and count the members outside the
    # largest remaining piece (the chain's 8, member 11, and members 4, 5, 6, 10, 16,
    # whose only way out in Zachary's club runs through member 0).
    g, _ = _karate()
    g = g.subgraph(nx.node_connected_component(g, "Member 00")).copy()  # its component
    g.remove_node("Member 00")
    pieces = sorted((len(c) for c in nx.connected_components(g)), reverse=True)
    assert sum(pieces[1:]) == 14
    # By hand on the chain: the k-th chain member from the end cuts off k members.
    table = html.split('id="dependencies"')[1].split("</table>")[0]
    cells = re.findall(
        r'<td class="name">(.*?)</td><td class="num">\d+</td>'
        r'(?:<td><span class="name">[^<]*</span></td>)?<td class="num">(\d+)</td>',
        table,
    )
    import html as html_lib

    got = [(html_lib.unescape(n), int(d)) for n, d in cells]
    assert got[0] == ("Member 00", 14)
    assert got[1:8] == [(name, 7 - i) for i, name in enumerate(HOSTILE)]


def test_long_tables_point_to_the_csv(report):
    _, pages, _ = report
    flat = _flat("\n".join(pages))
    # The disagreement table lists TOP of the 42 members.
    assert f"Showing{TOP}of42people" in flat
    assert "nodes.csv" in flat


def _body(html: str) -> str:
    # The cautions speak of people whatever the kind: privacy concerns people.
    return re.sub(r"<svg.*?</svg>", "", html.split('id="cautions"')[0], flags=re.S)


def test_vocabulary_follows_the_kind_of_network(report, general_context, karate_result):
    organisation = _body(report[2])
    general = _body(render_html(general_context))
    supply = _body(
        render_html(
            build_context(
                karate_result, title="t", kind="supply", paper="a4", min_group_size=5, made=MADE
            )
        )
    )
    for body, words, absent in (
        (organisation, ["people", "teams", "working ties"], "firms"),
        (supply, ["firms", "clusters", "supply ties"], "people"),
        (general, ["members", "communities"], "firms"),
    ):
        for w in words:
            assert w in body, w
        assert f" {absent} " not in body


def test_same_result_same_html(karate_result, general_context):
    again = build_context(
        karate_result,
        title="t",
        kind="general",
        paper="a4",
        min_group_size=1,
        made=MADE,
        pseudonymized=True,
    )
    assert render_html(again) == render_html(general_context)


def test_letter_paper(general_context, tmp_path):
    html = render_html({**general_context, "paper": "letter"})
    # The cover alone is enough to read the page size, and quick to lay out.
    cover = html.split('<section id="summary">')[0] + "</body></html>"
    write_pdf(cover, tmp_path / "r.pdf")
    box = pypdf.PdfReader(str(tmp_path / "r.pdf")).pages[0].mediabox
    # US Letter is 8.5 x 11 in = 612 x 792 pt (ANSI/ASME Y14.1).
    assert (round(float(box.width)), round(float(box.height))) == (612, 792)


def test_a4_paper_by_default(report):
    folder, _, _ = report
    box = pypdf.PdfReader(str(folder / "report.pdf")).pages[0].mediabox
    # A4 is 210 x 297 mm = 595.3 x 841.9 pt (ISO 216).
    assert (round(float(box.width)), round(float(box.height))) == (595, 842)


def test_directed_network_shows_downstream_reach(supply_result):
    ctx = build_context(
        supply_result, title="t", kind="supply", paper="a4", min_group_size=5, made=MADE
    )
    deps = ctx["dependencies"]
    # In the tree every firm but the root has exactly one supplier, so every firm
    # downstream of a node depends on it alone: dependents == downstream reach
    # (networkx descendants), which the figure prints as "n of n".
    for r in deps["rows"]:
        assert r["reach"] == r["dependents"]
    first = deps["rows"][0]
    assert first["node"] == "Firm 00" and first["dependents"] == 39
    assert "39 of 39" in deps["figure"].svg
    html = render_html(ctx)
    assert "every source of supply" in html


def test_pseudonymised_reports_say_so(general_context, report):
    assert "replaced by codes" in render_html(general_context)
    assert "as given in the data" in report[2]


# ----------------------------------------------------------------- fetching nothing


def _png(path: Path) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig = plt.figure(figsize=(1, 1))
    fig.savefig(path, format="png")
    plt.close(fig)


def test_fetcher_serves_data_uris_only(tmp_path):
    png = tmp_path / "x.png"
    _png(png)
    fetcher = _url_fetcher()
    for url in (png.as_uri(), "file:///etc/passwd", "http://example.invalid/x.png", "x.png"):
        with pytest.raises(ValueError, match="only data: URIs"):
            fetcher(url)
    data = "data:text/plain;base64,aGk="  # "hi"
    assert fetcher(data).read() == b"hi"


def test_markup_that_points_outside_is_not_fetched(tmp_path):
    png = tmp_path / "leak.png"
    _png(png)
    css = tmp_path / "leak.css"
    css.write_text("p { color: red }", encoding="utf-8")
    html = (
        f'<html><head><link rel="stylesheet" href="{css.as_uri()}"></head><body>'
        f'<p>x</p><img src="{png.as_uri()}"><img src="file:///etc/passwd">'
        '<img src="http://example.invalid/x.png">'
        f'<svg width="10" height="10"><image href="{png.as_uri()}" width="10" height="10"/></svg>'
        "</body></html>"
    )
    out = tmp_path / "out.pdf"
    write_pdf(html, out)
    reader = pypdf.PdfReader(str(out))
    # Had any file been read, its image would be in the PDF.
    assert sum(len(p.images) for p in reader.pages) == 0


def test_summary_says_how_many_communities_come_back(report, karate_result):
    _, pages, _ = report
    s = karate_result.summary
    per = s["stability"]["communities"]  # written by roles.analysis.confidence
    stable = sum(1 for c in per.values() if c["verdict"] == "stable")
    glance = _flat(next(p for p in pages[1:] if "At a glance" in p))
    if stable == len(per):
        assert f"All{len(per)}comeback" in glance
    else:
        assert f"{stable}of{len(per)}comeback" in glance
    method = _flat("\n".join(pages))
    assert "Stabilityacrossseeds" in method and "Structuretest" in method
    assert "Hennig,C.(2007)" in method


def test_no_rerun_verdicts_when_no_reruns_were_made(karate_result):
    # Above the confidence budget's size limits roles.run makes no re-runs (every
    # community's verdict is "not re-run"); the report must not count them as failing
    # to come back, nor describe re-runs "0 times".
    import dataclasses

    from roles.config import ConfidenceConfig, Config

    g, attrs = _karate()
    result = run(g, config=Config(confidence=ConfidenceConfig(runs=0)), attributes=attrs)
    per = result.summary["stability"]["communities"]
    assert per and {c["verdict"] for c in per.values()} == {"not re-run"}

    def html_of(res):
        ctx = build_context(res, title="t", kind="general", paper="a4", min_group_size=5, made=MADE)
        return render_html(ctx)

    def words(html):
        return _flat(re.sub(r"<[^>]+>", " ", html))

    chosen = html_of(result)  # runs = 0 set by the user: nothing to say
    assert "<th>Comes back</th>" not in chosen
    assert "comeback" not in words(chosen) and "re-run0times" not in words(chosen)
    note = "To keep the run affordable: 0 of 3 re-runs with other seeds."
    skipped = html_of(
        dataclasses.replace(result, budgets=dataclasses.replace(result.budgets, confidence=note))
    )
    assert "re-runwithotherseedswasnottested" in words(skipped)
    assert "re-run0times" not in words(skipped)


def test_what_if_section_of_a_supply_tree(supply_result):
    # The default scenarios start with the worst single point of failure, Firm 00, the
    # root of the tree: every other firm loses its only source of supply.
    ctx = build_context(
        supply_result, title="t", kind="supply", paper="a4", min_group_size=5, made=MADE
    )
    w = ctx["what_if"]
    assert w["title"] == "If firms failed" and w["directed"] and not w["asked"]
    first = w["scenarios"][0]
    assert first["removed"] == "Firm 00"
    rows = dict(first["rows"])
    assert rows["Firms left without any source of supply"].startswith("39: ")
    assert "<svg" in w["figure"].svg and "R = " in w["figure"].svg
    html = render_html(ctx)
    assert 'id="what-if"' in html and "stock, contracts" in html


# ------------------------------------------------------------ direction and kind


def test_supply_report_says_when_walks_ignored_direction(supply_result, supply_pdf):
    # In a tree walks that follow the direction stop at the last tier within a step or
    # two, so the pipeline walks the ties both ways (summary.json, walks_over).
    assert supply_result.summary["walks_over"].startswith("ties in both directions")
    text = _flat("\n".join(supply_pdf))
    assert "directed:eachpointsfromsuppliertocustomer;theclustersreadthembothways" in text
    assert "butthewalksbehindtheclustersandthetwoviews(sections2and5)ignoredit" in text
    assert "Thedependentsofsection4dofollowthedirection" in text


def test_direction_words_follow_the_kind(supply_result):
    def html(kind):
        ctx = build_context(
            supply_result, title="t", kind=kind, paper="a4", min_group_size=5, made=MADE
        )
        return render_html(ctx)

    organisation = html("organisation")
    cover = organisation.split('<section id="summary">')[0]
    assert "supplier to customer" not in cover
    assert "from the first person of its row to the second" in cover
    glossary = organisation.split('id="glossary"')[1]
    assert "supply path" not in glossary and "supply" not in glossary.lower()
    assert "Final customers" not in organisation  # people are not customers
    assert "supplier to customer" in html("supply").split('<section id="summary">')[0]
    assert "supplier to customer" not in html("general").split('<section id="summary">')[0]


def test_undirected_report_has_no_direction_caution(report):
    assert "ignoredit" not in _flat("\n".join(report[1]))


# ------------------------------------------------------------- names and figures


def test_community_names_by_hand():
    from roles.report.context import community_names

    cross = {
        "Assembly": {"1": 9, "2": 1, "3": 2},
        "Sales": {"1": 1, "2": 4, "3": 2},
        "Design": {"2": 3, "3": 2},
        "4": {"3": 5},
        "3": {"3": 5},
        "Tiny": {"4": 4},
    }
    # Community 1: Assembly 9 of 10 -> mostly. Community 2: Sales 4 of 8 -> mostly.
    # Community 3: '4' and '3' hold 10 of 16 (62.5%) -> two names. Community 4: all in
    # a group of 4 (< 5): never named.
    assert community_names(cross, "tier", 5) == {
        1: "mostly Assembly",
        2: "mostly Sales",
        3: "tier 3 and 4",
        4: "mixed",
    }


def test_communities_are_named_by_the_formal_groups(report, karate_result):
    _, pages, html = report
    # Zachary's two factions ('club', here 'unit'): each community found should be mostly
    # one of them (Zachary 1977: the split follows the factions closely).
    text = _flat("\n".join(pages))
    assert "mostlyMr.Hi" in text and "mostlyOfficer" in text
    assert TINY not in html  # a group of two is never a name


def test_whole_network_figure_below_the_size_limit(report, karate_result, monkeypatch):
    import roles.report.context as context

    _, pages, html = report
    text = _flat("\n".join(pages))
    assert "Thewholeorganisation" in text
    assert "Everypersonwithworkingtiesandeveryworkingtie" in text
    # The karate network has 42 members with ties: drawn at a limit of 42, not at 41.
    monkeypatch.setattr(context, "NETWORK_FIGURE_MAX", 42)
    kw = dict(title="t", kind="general", paper="a4", min_group_size=5, made=MADE)
    assert build_context(karate_result, **kw)["network_map"] is not None
    monkeypatch.setattr(context, "NETWORK_FIGURE_MAX", 41)
    ctx = build_context(karate_result, **kw)
    assert ctx["network_map"] is None
    assert "The whole network" not in render_html(ctx)


def test_supply_report_names_final_customers(supply_result, supply_pdf):
    # networkx brute force on the tree: Firm 00 feeds every firm, so the final
    # customers it reaches are all firms without customers, and in a tree each is cut
    # off by every firm above it.
    g = supply_result.graph
    sinks = sorted(v for v in g if g.out_degree(v) == 0)
    first = supply_result.summary["final_customers"][0]
    assert first["node"] == "Firm 00"
    assert first["reached"] == first["cut_off"] == len(sinks)
    assert first["cut_off_names"] == sinks
    text = _flat("\n".join(supply_pdf))
    assert "Finalcustomersbehindeachsinglepointoffailure" in text
    assert _flat(f"Firm 00 {len(sinks)} {sinks[0]}") in text


def test_organisation_words_in_a_directed_network_speak_of_no_supply(supply_result):
    # A directed organisation network (who reports to whom) is not a supply chain: the
    # dependencies section and "Look at these first" keep to people.
    ctx = build_context(
        supply_result, title="t", kind="organisation", paper="a4", min_group_size=5, made=MADE
    )
    html = render_html(ctx)
    section = html.split('id="dependencies"')[1].split("<section")[0]
    assert "supplier" not in section and "supply" not in section
    assert "no working tie points to" in section
    assert all("supply" not in item["text"] for item in ctx["first_looks"])


def test_stability_words_match_summary_json():
    # The method page writes the re-run rule and the confidence measure itself (report/
    # holds the wording); summary.json's stability section
    # (roles.analysis.confidence.Stability.as_dict) must say the same.
    import numpy as np

    from roles.analysis.confidence import Stability
    from roles.report.context import _BASE, CONFIDENCE_MEASURE, _stability

    st = Stability(
        view="local",
        confidence=np.array([0.4, 0.9, np.nan]),
        communities={},
        runs=1,
        runs_requested=1,
        seeds=(1,),
        cross_view_ari=(0.5,),
        cross_view_nmi=(0.5,),
        reference_ari=0.5,
        reference_nmi=0.5,
        within_view_ari={"local": (1.0,)},
        views_differ=None,
        views_rule="",
        budget="",
        seconds=0.0,
    )
    saved = st.as_dict()
    shown = _stability(st, _BASE)
    assert shown is not None
    assert shown["measure"] == saved["confidence"]["measure"] == CONFIDENCE_MEASURE
    assert shown["rule"] == saved["community_rule"].replace(
        "pattern", "recurs with varying members"
    )
    # one of the two members with ties is below 0.5
    assert ("Members below 0.5", "50%") in shown["rows"]
