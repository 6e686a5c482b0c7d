"""Report figures: valid, deterministic SVG that prints names as text and shows the data."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import numpy as np
import pytest

from roles.report import figures as F

SVG = "{http://www.w3.org/2000/svg}"
HOSTILE = [
    "<script>alert(1)</script>",
    "=cmd|' /C calc'!A0",
    "&amp; Söhne",
    "$x^2$ price",
    "\u05e9\u05dc\u05d5\u05dd \U0001f600",
    '<img src="file:///etc/passwd">',
]


def _texts(fig: F.Figure) -> list[str]:
    root = ET.fromstring(fig.svg)
    return ["".join(t.itertext()) for t in root.iter(f"{SVG}text")]


def _ids(fig: F.Figure) -> set[str]:
    root = ET.fromstring(fig.svg)
    return {el.get("id") for el in root.iter() if el.get("id")}


@pytest.fixture(scope="module")
def all_figures() -> dict[str, F.Figure]:
    rng = np.random.default_rng(3)
    sizes = [30, 20, 12, 6]
    ties = np.array([[0, 9, 2, 0], [9, 0, 4, 1], [2, 4, 0, 0], [0, 1, 0, 0]])
    n = 60
    z = rng.normal(size=n)
    z[0] = 3.0
    p = rng.uniform(size=n)
    roles = rng.choice(["hub-like", "bridge-like", "peripheral", "ordinary"], n)
    names = [f"m{i}" for i in range(n)]
    names[: len(HOSTILE)] = HOSTILE
    comm = np.repeat([1, 2, 3, 4], [25, 15, 12, 8])
    return {
        "map": F.community_map(sizes, ties, ["1", "2", "3", "4"]),
        "roles": F.role_map(z, p, roles, names=names, annotate=range(len(HOSTILE))),
        "deps": F.dependents_chart(HOSTILE, [9, 7, 5, 3, 2, 1], reach=[12, 7, 9, 3, 4, 1]),
        "robust": F.robustness_chart(
            np.linspace(0, 1, 51), np.linspace(1, 0, 51) ** 3, np.linspace(1, 0, 51), R=(0.2, 0.5)
        ),
        "cont": F.contingency_heatmap(
            np.array([[3, 0], [1, 4]]),
            row_labels=["a", "b"],
            col_labels=["x", "y"],
            row_title="local",
            col_title="far",
        ),
        "proj": F.projections(
            {"local": rng.normal(size=(n, 8)), "far": rng.normal(size=(n, 8))}, comm
        ),
        "net": F.network_map(
            n,
            [(i, (i * 7 + 3) % n) for i in range(n)],
            comm,
            names=names,
            annotate=range(len(HOSTILE)),
            community_names={1: "mostly Assembly"},
            seed=5,
        ),
    }


def test_every_figure_is_one_svg_element_with_a_caption(all_figures):
    for fig in all_figures.values():
        assert fig.svg.startswith("<svg") and fig.svg.endswith("</svg>")
        assert "<?xml" not in fig.svg and "DOCTYPE" not in fig.svg
        ET.fromstring(fig.svg)  # well-formed XML
        assert len(fig.caption) > 80


def test_text_stays_text_not_glyph_paths(all_figures):
    # svg.fonttype 'none': labels are <text> elements, so the PDF text can be searched.
    fig = all_figures["map"]
    assert any(t.startswith("1") for t in _texts(fig))
    assert "DejaVuSans-" not in fig.svg  # no glyph outlines defined


def test_hostile_names_are_escaped_and_printed_literally(all_figures):
    for key in ("roles", "deps", "net"):
        fig = all_figures[key]
        assert "<script>" not in fig.svg and "<img" not in fig.svg
        texts = _texts(fig)
        # Names are cut to the figure's label width; the first 20 characters survive.
        for name in HOSTILE[:4]:
            assert any(name[:20] in t for t in texts), name
        # '$' is not read as mathematics: the dollar signs are printed.
        assert any("$x^2$" in t for t in texts)
        assert any("&amp; Söhne" in t for t in texts)  # the entity is printed, not decoded


def test_same_input_same_bytes():
    rng = np.random.default_rng(0)
    v = {"local": rng.normal(size=(40, 6)), "far": rng.normal(size=(40, 6))}
    comm = np.repeat([1, 2], 20)
    assert F.projections(v, comm).svg == F.projections(v, comm).svg
    a = F.community_map([5, 4, 3], np.ones((3, 3)), ["1", "2", "3"])
    b = F.community_map([5, 4, 3], np.ones((3, 3)), ["1", "2", "3"])
    assert a.svg == b.svg
    x = np.linspace(0, 1, 11)
    c = F.robustness_chart(x, 1 - x, 1 - x**2, R=(0.4, 0.6))
    assert c.svg == F.robustness_chart(x, 1 - x, 1 - x**2, R=(0.4, 0.6)).svg


def test_ids_do_not_collide_between_figures_on_one_page(all_figures):
    seen: set[str] = set()
    for fig in all_figures.values():
        ids = _ids(fig)
        assert not (ids & seen)
        seen |= ids
    a = F.contingency_heatmap(
        np.eye(2), row_labels="ab", col_labels="xy", row_title="r", col_title="c", key="one"
    )
    b = F.contingency_heatmap(
        np.eye(2), row_labels="ab", col_labels="xy", row_title="r", col_title="c", key="two"
    )
    assert not (_ids(a) & _ids(b))


def test_contingency_prints_each_nonzero_count(all_figures):
    texts = _texts(all_figures["cont"])
    for count in ("3", "1", "4"):
        assert count in texts
    assert "0" not in texts  # empty cells stay blank


def test_contingency_lumps_small_rows_and_keeps_the_total():
    table = np.arange(1, 21).reshape(20, 1) * np.ones((1, 3), dtype=int)
    lumped, labels = F._lump(table, [str(i) for i in range(20)], 0, 5)
    assert lumped.shape == (5, 3)
    assert lumped.sum() == table.sum()
    assert labels[-1] == "16 others"
    # The four largest rows (19, 18, 17, 16 by index) are kept, in their original order.
    assert labels[:4] == ["16", "17", "18", "19"]


def test_dependents_chart_prints_dependents_of_reach(all_figures):
    texts = _texts(all_figures["deps"])
    assert "9 of 12" in texts and "5 of 9" in texts


def test_community_map_circles_do_not_overlap_and_areas_follow_size():
    sizes = np.array([50, 30, 30, 10, 4, 2], dtype=float)
    ties = np.random.default_rng(1).integers(0, 9, (6, 6))
    ties = ties + ties.T
    radii = np.sqrt(sizes / np.pi)
    xy = F._layout(sizes, ties.astype(float), radii, seed=0)
    for i in range(6):
        for j in range(i + 1, 6):
            assert np.hypot(*(xy[i] - xy[j])) >= radii[i] + radii[j] - 1e-6
    # Area proportional to members: pi r^2 = size.
    np.testing.assert_allclose(np.pi * radii**2, sizes)


def test_community_map_draws_only_the_strongest_links():
    ties = np.ones((12, 12))
    fig = F.community_map([3] * 12, ties, [str(i) for i in range(12)], max_lines=10)
    assert "10 strongest of 66 links" in fig.caption  # 12 * 11 / 2 = 66 pairs


def test_projection_matches_scikit_learn_pca_up_to_sign():
    from sklearn.decomposition import PCA

    x = np.random.default_rng(5).normal(size=(50, 7))
    unit = x / np.linalg.norm(x, axis=1, keepdims=True)
    ref = PCA(n_components=2, svd_solver="full").fit_transform(unit)  # scikit-learn PCA
    ours = F.project_2d(x)
    for c in range(2):
        same = np.allclose(ours[:, c], ref[:, c], atol=1e-8)
        flipped = np.allclose(ours[:, c], -ref[:, c], atol=1e-8)
        assert same or flipped


def test_projection_samples_large_views_and_says_so():
    rng = np.random.default_rng(2)
    v = {"local": rng.normal(size=(500, 4)), "far": rng.normal(size=(500, 4))}
    comm = rng.integers(1, 12, 500)
    fig = F.projections(v, comm, max_points=200, max_groups=8)
    assert "sample of 200" in fig.caption
    assert "3 smaller" in fig.caption  # 11 communities, 8 shown
    root = ET.fromstring(fig.svg)
    # Each drawn point is a <use> of a marker definition (matplotlib's SVG writer).
    uses = [el for el in root.iter(f"{SVG}use")]
    assert 2 * 200 <= len(uses) < 2 * 200 + 40  # both panels, plus legend markers


def test_role_regions_are_the_published_bounds():
    # Guimerà & Amaral, Nature 433:895 (2005), Fig. 2 / text: hubs z >= 2.5; non-hubs
    # split at P = 0.05, 0.62, 0.80; hubs at P = 0.30, 0.75.
    non_hub = sorted({b for _, z, p in F.ROLE_REGIONS if z[1] == 2.5 for b in p})
    hub = sorted({b for _, z, p in F.ROLE_REGIONS if z[0] == 2.5 for b in p})
    assert non_hub == [0.0, 0.05, 0.62, 0.80, 1.0]
    assert hub == [0.0, 0.30, 0.75, 1.0]


def test_categories_differ_by_shape_as_well_as_colour():
    assert len(set(F.MARKERS)) == len(F.MARKERS) == len(F.PALETTE)


def test_every_reference_points_to_an_id_of_the_same_figure(all_figures):
    import re

    for fig in all_figures.values():
        ids = _ids(fig)
        refs = set(re.findall(r'(?:url\(#|href="#)([^"\)]+)', fig.svg))
        assert refs and refs <= ids


def test_dense_point_layers_become_one_image_and_the_rest_stays_vector():
    rng = np.random.default_rng(4)
    n = F.RASTER_ABOVE + 200
    roles = ["member"] * n + ["hub-like"] * 3
    z = np.r_[rng.normal(size=n), [3.0, 3.5, 4.0]]
    p = rng.uniform(size=n + 3)
    fig = F.role_map(z, p, roles)
    root = ET.fromstring(fig.svg)
    images = list(root.iter(f"{SVG}image"))
    assert len(images) == 1
    href = images[0].get("{http://www.w3.org/1999/xlink}href") or images[0].get("href")
    assert href.startswith("data:image/png;base64,")  # the only URL the renderer serves
    # Markers are <use> elements: the three hubs, their legend entry and the tick
    # marks, but not the 1,700 members.
    assert 3 <= len(list(root.iter(f"{SVG}use"))) < 60


def test_mid_sized_layers_of_a_dense_plot_become_images_too():
    # 1,300 members, 300 bridge-like, 3 hubs: more than RASTER_ABOVE points in all, so
    # every layer above RASTER_LAYER_MIN points is an image; only the hubs stay vector.
    rng = np.random.default_rng(5)
    big, mid = F.RASTER_ABOVE - 200, F.RASTER_LAYER_MIN * 3
    roles = ["member"] * big + ["bridge-like"] * mid + ["hub-like"] * 3
    z = np.r_[rng.normal(size=big + mid), [3.0, 3.5, 4.0]]
    p = rng.uniform(size=big + mid + 3)
    root = ET.fromstring(F.role_map(z, p, roles).svg)
    assert len(list(root.iter(f"{SVG}image"))) >= 1
    assert 3 <= len(list(root.iter(f"{SVG}use"))) < 60  # not the 300 bridge-like markers
    # Below RASTER_ABOVE points in all, every layer stays vector.
    small = F.role_map(z[: mid + 3], p[: mid + 3], roles[big : big + mid] + ["hub-like"] * 3)
    small_root = ET.fromstring(small.svg)
    assert not list(small_root.iter(f"{SVG}image"))
    assert len(list(small_root.iter(f"{SVG}use"))) >= mid


def test_right_to_left_names_are_stored_in_display_order():
    # Unicode Bidirectional Algorithm (UAX #9), left-to-right line: a right-to-left run
    # is shown reversed, a number inside it keeps its own order.
    assert F._visual("\u05e9\u05dc\u05d5\u05dd Noa") == "\u05dd\u05d5\u05dc\u05e9 Noa"
    assert F._visual("ab \u05d0\u05d1 12 \u05d2\u05d3 cd") == "ab \u05d3\u05d2 12 \u05d1\u05d0 cd"
    assert F._visual("Noa <b> & 12") == "Noa <b> & 12"
    fig = F.dependents_chart(["\u05e9\u05dc\u05d5\u05dd Noa", "plain"], [2, 1])
    root = ET.fromstring(fig.svg)
    marked = [t for t in root.iter(f"{SVG}text") if t.get("unicode-bidi") == "bidi-override"]
    # Only the right-to-left label is marked, so a browser does not reorder it again.
    assert ["".join(t.itertext()) for t in marked] == ["\u05dd\u05d5\u05dc\u05e9 Noa"]


def _network(seed: int) -> F.Figure:
    import networkx as nx

    g = nx.connected_caveman_graph(4, 6)  # 4 cliques of 6 in a ring (networkx generator)
    comm = [1 + i // 6 for i in g]
    return F.network_map(
        len(g), list(g.edges()), comm, names=[f"n{i}" for i in g], annotate=[0, 6], seed=seed
    )


def test_network_map_is_seeded_same_run_same_picture():
    assert _network(3).svg == _network(3).svg
    assert _network(3).svg != _network(4).svg  # the seed, not chance, fixes the layout


def test_network_map_names_communities_and_key_members(all_figures):
    texts = _texts(all_figures["net"])
    assert "community 1: mostly Assembly" in texts
    assert "community 2" in texts
    # Only the annotated (the hostile names, positions 0-5) are named, not m6..m59.
    assert not any(t.startswith("m") and t[1:].isdigit() for t in texts)
    assert any("&amp; Söhne" in t for t in texts)
    assert "marker shape" in all_figures["net"].caption  # legible in greyscale


def test_network_map_fills_the_width():
    # A long 3 x 20 grid (networkx generator) lies along its length across the page,
    # however the force layout happened to orient it.
    import networkx as nx

    g = nx.convert_node_labels_to_integers(nx.grid_2d_graph(3, 20))
    svg = F.network_map(len(g), list(g.edges()), [1] * len(g), names=list(map(str, g))).svg
    width = float(svg.split('width="', 1)[1].split("pt", 1)[0])
    height = float(svg.split('height="', 1)[1].split("pt", 1)[0])
    assert width > 1.5 * height


def test_positions_are_turned_onto_their_principal_axes():
    # A line along y becomes a line along x, lengths kept (by hand).
    out = F.project_2d_positions(np.array([[1.0, 0.0], [1.0, 3.0], [1.0, 6.0]]))
    assert np.allclose(out, [[-3, 0], [0, 0], [3, 0]])


def test_a_link_never_passes_under_a_third_circle():
    # Circles 0 and 2 with circle 1 right between them (by hand): a straight link 0-2
    # would run under 1 and read as 0-1 and 1-2.
    centres = np.array([[-4.0, 0.0], [0.0, 0.0], [4.0, 0.0]])
    radii = np.array([1.0, 1.0, 1.0])
    path = F._link_path(centres[0] + [1, 0], centres[2] - [1, 0], centres, radii, skip=(0, 2))
    assert np.min(np.hypot(*(path - centres[1]).T)) > 1.0
    assert np.allclose(path[0], [-3, 0]) and np.allclose(path[-1], [3, 0])
    # With nothing in the way the link stays straight.
    straight = F._link_path(
        np.array([-3.0, 0]), np.array([3.0, 0]), centres[[0, 2]], radii[:2], skip=(0, 1)
    )
    assert np.allclose(straight[:, 1], 0)
