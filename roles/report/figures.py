"""Report figures: plain numbers in, one inline SVG element and its caption out.

Every function here is a pure function of arrays, lists and dicts; none reads a
:class:`~roles.pipeline.Result`. The figures are drawn by matplotlib (Agg backend) as
SVG with text kept as text, so the PDF stays searchable, and they are deterministic:
the same input gives byte-identical SVG (no date, fixed id salt per figure).

Every figure must read in greyscale: categories differ by marker shape or hatching as
well as by colour, and strengths by line width or by printed numbers.

Names printed in figures are passed to matplotlib as plain text (``parse_math`` off, so
``$`` stays a dollar sign); its SVG writer escapes ``<``, ``>``, ``&`` and quotes, so a
name such as ``<script>`` is inert text inside the report.
"""

from __future__ import annotations

import io
import re
import unicodedata
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..analysis.measures.cartography import HUB_P, HUB_Z, NON_HUB_P
from ..analysis.measures.cartography import ROLE_REGIONS as REGIONS
from .names import short_name

__all__ = [
    "Figure",
    "PALETTE",
    "MARKERS",
    "community_map",
    "role_map",
    "dependents_chart",
    "robustness_chart",
    "contingency_heatmap",
    "projections",
    "project_2d",
    "network_map",
    "ROLE_REGIONS",
]

#: Colours for up to eight categories (a colour-blind-safe set), each paired with a
#: marker shape in :data:`MARKERS` so the categories stay apart in greyscale.
PALETTE = (
    "#0072B2",
    "#E69F00",
    "#009E73",
    "#CC79A7",
    "#56B4E9",
    "#D55E00",
    "#F0E442",
    "#000000",
)
# The seventh colour is pale yellow, near white in greyscale: it gets a large solid
# hexagon with a dark rim rather than a thin cross.
MARKERS = ("o", "s", "^", "D", "v", "P", "h", "*")
_OTHER = "#9a9a9a"

_REGION_NAMES = {
    "R1": "ultra-peripheral",
    "R2": "peripheral",
    "R3": "connector",
    "R4": "kinless",
    "R5": "provincial hub",
    "R6": "connector hub",
    "R7": "kinless hub",
}

#: Role regions of Guimerà & Amaral (2005) as (name, z range, P range), the bounds
#: those of :mod:`roles.analysis.measures.cartography`: hubs have z >= 2.5; a P bound
#: belongs to the region below it (R1 is P <= 0.05, R2 is 0.05 < P <= 0.62, ...).
ROLE_REGIONS = tuple((f"{code} {_REGION_NAMES[code]}", z, p) for code, z, p in REGIONS)

# Marker, colour and size of the report's role labels in the role map; labels the
# pipeline may add later fall back to the remaining shapes.
_ROLE_STYLE = {
    "connector hub": ("*", "#000000", 70),
    "hub-like": ("D", PALETTE[5], 30),
    "bridge-like": ("^", PALETTE[0], 32),
    "peripheral": ("s", PALETTE[1], 16),
    "member": ("o", "#d9d9d9", 9),
}


def _role_rank(kind: str) -> int:
    names = list(_ROLE_STYLE)
    return names.index(kind) if kind in names else len(names)


def _role_styles(kinds: Sequence[str]) -> dict[str, tuple[str, str, float]]:
    spare = [(m, c, 18.0) for m, c in zip(("v", "P", "X", "<", ">"), PALETTE[2:], strict=False)]
    out: dict[str, tuple[str, str, float]] = {}
    for kind in kinds:
        if kind in _ROLE_STYLE:
            out[kind] = _ROLE_STYLE[kind]
        else:
            out[kind] = spare.pop(0) if spare else ("o", _OTHER, 9.0)
    return out


_GENERAL = {
    "member": "member",
    "members": "members",
    "Member": "Member",
    "Members": "Members",
    "community": "community",
    "communities": "communities",
    "Community": "Community",
    "Communities": "Communities",
    "tie": "tie",
    "ties": "ties",
    "sources": "every source (a member no tie points to)",
    "path": "path from one",
}

_WIDTH = 6.3  # inches: fits the text width of A4 and US Letter with 18 mm margins

#: Point layers with more points than this are drawn as an embedded image (200 dpi)
#: rather than one vector shape per point: the PDF renderer takes about 3 ms a point,
#: so 20,000 vector points cost a minute (measured with WeasyPrint 70). Labels, lines
#: and axes stay vector graphics.
RASTER_ABOVE = 1500

#: In a plot with more than ``RASTER_ABOVE`` points, a layer of more than this many
#: points is drawn as an image too, so only the rare labels stay vector shapes. At
#: 20,000 members the role map's 1,844 bridge-like and connector-hub points took the
#: PDF from 3.2-3.7 s to 5.1 s (WeasyPrint 70, benchmarks/RESULTS.md).
RASTER_LAYER_MIN = 100


@dataclass(frozen=True)
class Figure:
    """One figure of the report.

    Attributes
    ----------
    svg : str
        An ``<svg>`` element, ready to be placed inline in HTML (no XML prolog).
    caption : str
        Plain text saying what the figure shows and what to look for in it.
    """

    svg: str
    caption: str


def _words(words: Mapping[str, str] | None) -> dict[str, str]:
    return {**_GENERAL, **(words or {})}


def _rc(key: str) -> dict[str, Any]:
    return {
        "svg.fonttype": "none",
        # One salt per figure: the ids of clip paths and markers stay the same from run
        # to run, and differ between the figures placed in the same HTML page.
        "svg.hashsalt": f"roles-{key}",
        "text.parse_math": False,
        "text.usetex": False,
        "font.family": "sans-serif",
        "font.sans-serif": ["DejaVu Sans"],
        "font.size": 8,
        "axes.titlesize": 9,
        "axes.labelsize": 8,
        "xtick.labelsize": 7,
        "ytick.labelsize": 7,
        "legend.fontsize": 7,
        "axes.spines.top": False,
        "axes.spines.right": False,
        "axes.edgecolor": "#333333",
        "hatch.linewidth": 0.6,
    }


_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f]")


def _is_rtl(ch: str) -> bool:
    return unicodedata.bidirectional(ch) in ("R", "AL")


def _visual(text: str) -> str:
    """``text`` in display order for a left-to-right line, by the Unicode bidirectional
    algorithm (UAX #9 [1]_, as python-bidi implements it).

    WeasyPrint draws SVG text in stored order, without UAX #9, so a Hebrew or Arabic
    name would print backwards. The line is laid out here as a left-to-right paragraph
    (the report's direction; UAX #9 rule HL1), and :func:`_svg` marks those text
    elements ``unicode-bidi: bidi-override`` so that browsers showing the HTML do not
    reorder them a second time. Mirrored glyphs (rule L4: a bracket inside a
    right-to-left run) are not applied: python-bidi's display function leaves them to
    the renderer.

    References
    ----------
    .. [1] Unicode Standard Annex #9, "Unicode Bidirectional Algorithm",
       https://www.unicode.org/reports/tr9/

    Examples
    --------
    >>> _visual("Noa \u05db\u05d4\u05df 3") == "Noa 3 \u05df\u05d4\u05db"
    True
    """
    if not any(_is_rtl(c) for c in text):
        return text
    from bidi import get_display

    return str(get_display(text, base_dir="L"))


def _label(name: Any, width: int = 28) -> str:
    """A node name fit for a figure: control characters as spaces, long names cut,
    right-to-left runs in display order (see :func:`_visual`)."""
    # Cut first, so that a huge name costs no more than a short one.
    text = _CONTROL.sub(" ", short_name(str(name).strip(), width)).strip()
    return _visual(text)


_TAG = re.compile(r"<[^<>]+>")
_ID_REF = re.compile(r'(\bid="|url\(#|href="#)([^"\)]+)')


def _prefix_ids(svg: str, key: str) -> str:
    """Prefix every id (and every reference to one) with ``key``.

    matplotlib names its groups ``figure_1``, ``axes_1``...: the same in every figure,
    and ids must be unique in the HTML page that holds them all. Only markup is
    rewritten (text content never contains ``<``: it is escaped), so a name that
    happens to look like an id is printed unchanged.
    """

    def tag(m: re.Match[str]) -> str:
        return _ID_REF.sub(lambda r: f"{r.group(1)}{key}-{r.group(2)}", m.group(0))

    return _TAG.sub(tag, svg)


_TEXT = re.compile(r"<text\b([^>]*)>([^<]*)</text>")


def _no_reordering(svg: str) -> str:
    """Mark text holding right-to-left letters as already in display order."""

    def mark(m: re.Match[str]) -> str:
        if not any(_is_rtl(c) for c in m.group(2)):
            return m.group(0)
        return f'<text{m.group(1)} direction="ltr" unicode-bidi="bidi-override">{m.group(2)}</text>'

    return _TEXT.sub(mark, svg)


def _svg(fig: Any, key: str) -> str:
    import matplotlib.pyplot as plt

    buf = io.StringIO()
    fig.savefig(
        buf, format="svg", metadata={"Date": None}, bbox_inches="tight", pad_inches=0.04, dpi=200
    )
    plt.close(fig)
    text = buf.getvalue()
    text = text[text.index("<svg") :]
    # The RDF block names the writer only; it is noise inside HTML.
    text = re.sub(r"<metadata>.*?</metadata>\s*", "", text, count=1, flags=re.S)
    return _prefix_ids(_no_reordering(text.strip()), key)


def _figure(size: tuple[float, float], ncols: int = 1) -> tuple[Any, Any]:
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    fig, axes = plt.subplots(1, ncols, figsize=size)
    return fig, axes


def _draw(key: str, size: tuple[float, float], paint: Any, ncols: int = 1) -> str:
    import warnings

    import matplotlib

    with matplotlib.rc_context(_rc(key)), warnings.catch_warnings():  # type: ignore[arg-type]
        # A glyph missing from the font (emoji, rare scripts) is drawn as a box; the
        # text itself stays in the SVG, so the warning is noise here.
        warnings.simplefilter("ignore", UserWarning)
        fig, axes = _figure(size, ncols)
        paint(fig, axes)
        return _svg(fig, key)


# --------------------------------------------------------------------------- layout


def _layout(sizes: np.ndarray, ties: np.ndarray, radii: np.ndarray, seed: int) -> np.ndarray:
    """Circle centres: a force layout of the communities, then overlaps pushed apart."""
    import networkx as nx

    k = len(sizes)
    if k == 1:
        return np.zeros((1, 2))
    if k == 2:
        return np.array([[-1.0, 0.0], [1.0, 0.0]]) * (radii.sum() * 0.75)
    g = nx.Graph()
    g.add_nodes_from(range(k))
    top = ties.max() if ties.size and ties.max() > 0 else 1.0
    for i in range(k):
        for j in range(i + 1, k):
            if ties[i, j] > 0:
                g.add_edge(i, j, weight=float(ties[i, j]) / top)
    # Start on a circle, largest first, so the result depends on the data and seed only.
    angles = np.linspace(0, 2 * np.pi, k, endpoint=False)
    start = {i: (np.cos(a), np.sin(a)) for i, a in enumerate(angles)}
    pos = nx.spring_layout(g, pos=start, weight="weight", seed=seed, iterations=200)
    xy = np.array([pos[i] for i in range(k)], dtype=float)
    span = np.ptp(xy, axis=0).max() or 1.0
    xy = xy / span * radii.sum() * 1.2
    gap = max(radii.max() * 0.25, float(np.median(radii)) * 0.8)  # room for the lines
    for _ in range(400):
        moved = False
        for i in range(k):
            for j in range(i + 1, k):
                d = xy[j] - xy[i]
                dist = float(np.hypot(*d))
                need = radii[i] + radii[j] + gap
                if dist < need:
                    if dist < 1e-9:
                        d, dist = np.array([1.0, 0.0]), 1.0
                    push = (need - dist) / 2 * d / dist
                    xy[i] -= push
                    xy[j] += push
                    moved = True
        if not moved:
            break
    return xy - xy.mean(axis=0)


def _link_path(
    a: np.ndarray, b: np.ndarray, centres: np.ndarray, radii: np.ndarray, skip: tuple[int, int]
) -> np.ndarray:
    """Points of a link from ``a`` to ``b`` that passes under no other circle.

    A straight line that runs under a third circle reads as two links (4-2 as 4-1 and
    1-2), so such a link is bent: a quadratic curve bowed to whichever side, by the
    least of a few amounts, clears every other circle. If none does, the straight line
    is kept.
    """
    t = np.linspace(0.0, 1.0, 41)[:, None]
    d = b - a
    normal = np.array([-d[1], d[0]])
    others = [c for c in range(len(radii)) if c not in skip]

    def clear(pts: np.ndarray) -> bool:
        return all(np.min(np.hypot(*(pts - centres[c]).T)) > radii[c] * 1.08 for c in others)

    straight = a + t * d
    if clear(straight):
        return straight
    for bow in (0.2, -0.2, 0.35, -0.35, 0.5, -0.5):
        ctrl = (a + b) / 2 + bow * normal
        curve = (1 - t) ** 2 * a + 2 * (1 - t) * t * ctrl + t**2 * b
        if clear(curve):
            return curve
    return straight


def community_map(
    sizes: Sequence[int],
    ties: np.ndarray,
    labels: Sequence[str],
    *,
    words: Mapping[str, str] | None = None,
    max_lines: int = 40,
    seed: int = 0,
) -> Figure:
    """Communities as circles sized by members, joined by lines weighted by their ties.

    Parameters
    ----------
    sizes : sequence of int, length k
        Members per community (circle area is proportional to it).
    ties : ndarray, shape (k, k)
        Ties (or tie weight) between communities; symmetric, diagonal ignored.
    labels : sequence of str, length k
        What to print in each circle (for instance the community number).
    words : mapping, optional
        Vocabulary (``members``, ``communities``, ...) for the caption.
    max_lines : int
        Only the strongest ``max_lines`` links are drawn, so the map stays readable.
    seed : int
        Seed of the force layout (positions only; nothing is measured here).

    Returns
    -------
    Figure
    """
    w = _words(words)
    sizes_a = np.asarray(sizes, dtype=float)
    k = len(sizes_a)
    t = np.array(ties, dtype=float).reshape(k, k)
    t = (t + t.T) / 2 if not np.allclose(t, t.T) else t
    np.fill_diagonal(t, 0)
    radii = np.sqrt(np.maximum(sizes_a, 1) / np.pi)
    xy = _layout(sizes_a, t, radii, seed)
    iu = np.triu_indices(k, 1)
    strengths = t[iu]
    order = [int(o) for o in np.argsort(-strengths, kind="stable") if strengths[o] > 0][:max_lines]
    top = strengths[order[0]] if order else 1.0
    n_links = int(np.count_nonzero(strengths))

    label_gap = 0.35 * float(np.median(radii))

    def paint(fig: Any, ax: Any) -> None:
        from matplotlib.colors import to_rgb
        from matplotlib.patches import Circle

        for o in reversed(order):  # strongest drawn last, on top
            i, j = iu[0][o], iu[1][o]
            d = xy[j] - xy[i]
            dist = float(np.hypot(*d)) or 1.0
            a = xy[i] + d / dist * radii[i]  # from rim to rim, never across a circle
            b = xy[j] - d / dist * radii[j]
            width = 0.6 + 7.0 * strengths[o] / top
            line = _link_path(a, b, xy, radii, skip=(int(i), int(j)))
            ax.plot(
                line[:, 0],
                line[:, 1],
                color="#4d4d4d",
                lw=width,
                solid_capstyle="butt",
                zorder=1,
            )
            mid = line[len(line) // 2]
            room = np.hypot(*(b - a)) > label_gap and all(
                np.hypot(*(mid - xy[c])) > radii[c] + label_gap / 2 for c in range(k)
            )
            if k <= 10 and room:
                mx, my = mid
                ax.text(
                    mx,
                    my,
                    f"{strengths[o]:.0f}",
                    ha="center",
                    va="center",
                    fontsize=6.5,
                    zorder=3,
                    bbox={"boxstyle": "round,pad=0.15", "fc": "white", "ec": "#4d4d4d", "lw": 0.4},
                )
        for i in range(k):
            rgb = np.array(to_rgb(PALETTE[i] if i < len(PALETTE) else _OTHER))
            light = 1 - 0.35 * (1 - rgb)  # a pale tint: the label stays readable in grey
            ax.add_patch(
                Circle(xy[i], radii[i], facecolor=light, edgecolor="#222222", lw=1.0, zorder=2)
            )
            big = radii[i] > radii.max() * 0.3
            ax.text(
                xy[i, 0],
                xy[i, 1],
                f"{_label(labels[i], 16)}\n{int(sizes_a[i])}",
                ha="center",
                va="center",
                linespacing=1.25,
                fontsize=7.5 if big else 6,
                zorder=5,
            )
        pad = radii.max() * 0.15
        ax.set_xlim(lo[0] - pad, hi[0] + pad)
        ax.set_ylim(lo[1] - pad, hi[1] + pad)
        ax.set_aspect("equal")
        ax.axis("off")

    lo = (xy - radii[:, None]).min(axis=0)
    hi = (xy + radii[:, None]).max(axis=0)
    aspect = (hi[1] - lo[1]) / max(hi[0] - lo[0], 1e-9)
    height = float(np.clip(_WIDTH * 0.8 * aspect, 2.2, 4.6))
    svg = _draw("community-map", (_WIDTH * 0.8, height), paint)
    shown = (
        f"the {len(order)} strongest of {n_links} links are drawn"
        if len(order) < n_links
        else "every link is drawn"
    )
    caption = (
        f"{w['Communities']} as circles: the area of each circle is proportional to its "
        f"{w['members']} (the number under its label), and the width of a line to the "
        f"{w['ties']} between two {w['communities']}"
        + (" (printed on the line where there is room)" if k <= 10 else "")
        + f"; {shown}. {w['Communities']} close together share many {w['ties']}; "
        "a circle with one thick line hangs on a single neighbour."
    )
    return Figure(svg, caption)


# ------------------------------------------------------------------------- role map


def role_map(
    within_z: Sequence[float],
    participation: Sequence[float],
    roles: Sequence[str],
    *,
    names: Sequence[str] | None = None,
    annotate: Sequence[int] = (),
    words: Mapping[str, str] | None = None,
) -> Figure:
    """Within-community z against participation coefficient, with the role regions.

    The regions are those of Guimerà & Amaral [1]_: hubs above z = 2.5; non-hubs split
    at P = 0.05, 0.62 and 0.80, hubs at P = 0.30 and 0.75.

    Parameters
    ----------
    within_z, participation : sequences of float, length n
        Each member's within-community degree z-score and participation coefficient.
        Non-finite values (members without ties) are left out.
    roles : sequence of str, length n
        The report's role label of each member; each label gets its own marker.
    names : sequence of str, optional
        Member names, needed for ``annotate``.
    annotate : sequence of int
        Positions of the members whose names are printed beside their point.
    words : mapping, optional
        Vocabulary for the caption.

    Returns
    -------
    Figure

    References
    ----------
    .. [1] R. Guimerà and L. A. N. Amaral, "Functional cartography of complex metabolic
       networks", Nature 433, 895-900 (2005). doi:10.1038/nature03288
    """
    w = _words(words)
    z = np.asarray(within_z, dtype=float)
    p = np.asarray(participation, dtype=float)
    r = np.asarray([str(x) for x in roles], dtype=object)
    ok = np.isfinite(z) & np.isfinite(p)
    kinds = sorted(set(r[ok]), key=lambda x: (_role_rank(x), -int(np.sum(r[ok] == x)), x))
    styles = _role_styles(kinds)
    zmax = max(3.2, float(np.nanmax(z[ok])) + 0.4) if ok.any() else 3.2
    zmin = min(-1.5, float(np.nanmin(z[ok])) - 0.3) if ok.any() else -1.5

    def paint(fig: Any, ax: Any) -> None:
        ax.axhspan(HUB_Z, zmax, color="#eeeeee", zorder=0, lw=0)
        ax.axhline(HUB_Z, color="#222222", lw=1.0, ls="-", zorder=1)
        for x in NON_HUB_P:
            ax.plot([x, x], [zmin, HUB_Z], color="#444444", lw=0.7, ls="--", zorder=1)
        for x in HUB_P:
            ax.plot([x, x], [HUB_Z, zmax], color="#444444", lw=0.7, ls="--", zorder=1)
        for name, (z0, _), (p0, p1) in ROLE_REGIONS:
            code, text = name.split(" ", 1)
            hub = z0 >= HUB_Z
            ax.text(
                (p0 + p1) / 2,
                # Hub regions are named above the plot, the others just under the hub
                # line, where points are rare; points are drawn over the names.
                zmax + 0.02 * (zmax - zmin) if hub else HUB_Z - 0.03 * (zmax - zmin),
                code if p1 - p0 < 0.1 else f"{code} {text}",
                ha="center",
                va="bottom" if hub else "top",
                fontsize=6.5,
                color="#444444",
                zorder=2,
                clip_on=False,
            )
        # The common label first, so the rare ones are drawn on top of it.
        dense = int(ok.sum()) > RASTER_ABOVE
        for kind in sorted(kinds, key=lambda x: -int(np.sum(r[ok] == x))):
            sel = ok & (r == kind)
            marker, colour, size = styles[kind]
            ax.scatter(
                p[sel],
                z[sel],
                rasterized=dense and int(sel.sum()) > RASTER_LAYER_MIN,
                s=size,
                marker=marker,
                facecolor=colour,
                edgecolor="#222222",
                linewidth=0.4,
                alpha=0.9,
                label=f"{kind} ({int(sel.sum())})",
                zorder=3,
            )
        if names is not None:
            for idx in annotate:
                if not ok[idx]:
                    continue
                ax.annotate(
                    _label(names[idx], 22),
                    (p[idx], z[idx]),
                    xytext=(4, 3),
                    textcoords="offset points",
                    fontsize=6.2,
                    zorder=4,
                    bbox={"boxstyle": "round,pad=0.1", "fc": "white", "ec": "none", "alpha": 0.8},
                )
        ax.set_xlim(-0.02, 1.0)
        ax.set_ylim(zmin, zmax)
        ax.set_xlabel(
            f"participation coefficient: share of ties spread over other {w['communities']}"
        )
        ax.set_ylabel(f"within-{w['community']} z-score")
        handles, labels = ax.get_legend_handles_labels()
        order = sorted(range(len(labels)), key=lambda i: _role_rank(labels[i].rsplit(" (", 1)[0]))
        ax.legend(
            [handles[i] for i in order],
            [labels[i] for i in order],
            loc="center left",
            bbox_to_anchor=(1.01, 0.5),
            frameon=False,
            title="role",
        )

    svg = _draw("role-map", (_WIDTH, 3.5), paint)
    caption = (
        f"Each point is a {w['member']}: height is how many more {w['ties']} it has inside "
        f"its own {w['community']} than is usual there (z-score), the horizontal position "
        f"how evenly its {w['ties']} spread over {w['communities']} (participation). "
        "The solid line at z = 2.5 separates hubs (shaded) from the rest; dashed lines "
        "mark the role regions of Guimerà & Amaral (2005). Points high up are hubs; "
        "points far to the right connect several "
        f"{w['communities']}. Marker shapes show the role label used in this report."
    )
    return Figure(svg, caption)


# --------------------------------------------------------------------- dependencies


def dependents_chart(
    names: Sequence[str],
    dependents: Sequence[int],
    *,
    reach: Sequence[int] | None = None,
    directed: bool = False,
    words: Mapping[str, str] | None = None,
) -> Figure:
    """Horizontal bars: how many others each of the worst cases cuts off if lost.

    Parameters
    ----------
    names : sequence of str
        The members shown, worst first.
    dependents : sequence of int
        How many others each one cuts off (the pipeline's ``dependents``).
    reach : sequence of int, optional
        For directed networks: how many members lie downstream of each one at all
        (drawn as a hatched bar behind the dependents bar).
    directed : bool
        Whether the network is directed (changes the wording only).
    words : mapping, optional
        Vocabulary for the axis and caption.

    Returns
    -------
    Figure
    """
    w = _words(words)
    labels = [_label(n, 30) for n in names]
    dep = np.asarray(dependents, dtype=float)
    m = len(labels)
    ypos = np.arange(m)[::-1]
    top = max(float(dep.max()) if m else 1.0, float(max(reach)) if reach else 0.0, 1.0)

    def paint(fig: Any, ax: Any) -> None:
        if reach is not None:
            ax.barh(
                ypos,
                reach,
                height=0.7,
                facecolor="white",
                edgecolor="#444444",
                hatch="////",
                lw=0.6,
                label=f"{w['members']} downstream (can be reached)",
            )
        ax.barh(
            ypos,
            dep,
            height=0.7 if reach is None else 0.42,
            color=PALETTE[0],
            edgecolor="#222222",
            lw=0.6,
            label=f"{w['members']} cut off if it is lost",
        )
        for y, d, i in zip(ypos, dep, range(m), strict=True):
            text = f"{int(d)}" if reach is None else f"{int(d)} of {int(reach[i])}"
            right = max(d, reach[i] if reach is not None else 0)
            ax.text(right + top * 0.01, y, text, va="center", fontsize=6.5)
        ax.set_yticks(ypos, labels)
        ax.set_xlim(0, top * 1.15)
        ax.set_xlabel(f"{w['members']} cut off" + (" / downstream" if reach is not None else ""))
        if reach is not None:
            ax.legend(loc="lower right", frameon=False)

    height = min(4.8, 0.8 + 0.22 * max(m, 1))
    svg = _draw("dependents", (_WIDTH, height), paint)
    if directed:
        caption = (
            f"The {w['members']} whose loss cuts off most others from {w['sources']}, "
            f"worst at the top. The solid bar counts those left without any {w['path']}; "
            + (
                f"the hatched bar counts all {w['members']} downstream of it, so a solid bar "
                "nearly as long as the hatched one means the downstream chain has no "
                "alternative route. "
                if reach is not None
                else ""
            )
        )
    else:
        caption = (
            f"The {w['members']} whose loss splits the network, worst at the top: each bar "
            f"counts the {w['members']} that would be cut off from the main body of their part "
            "of the network. "
        )
    caption += "Check each case with those concerned before acting on it."
    return Figure(svg, caption)


# ---------------------------------------------------------------------- contingency


def _lump(table: np.ndarray, labels: Sequence[str], axis: int, keep: int) -> tuple:
    if table.shape[axis] <= keep:
        return table, list(labels)
    totals = table.sum(axis=1 - axis)
    order = np.argsort(-totals, kind="stable")
    head, tail = np.sort(order[: keep - 1]), order[keep - 1 :]
    if axis == 0:
        out = np.vstack([table[head], table[tail].sum(axis=0, keepdims=True)])
    else:
        out = np.hstack([table[:, head], table[:, tail].sum(axis=1, keepdims=True)])
    return out, [labels[i] for i in head] + [f"{len(tail)} others"]


def contingency_heatmap(
    table: np.ndarray,
    *,
    row_labels: Sequence[str],
    col_labels: Sequence[str],
    row_title: str,
    col_title: str,
    key: str = "contingency",
    max_cells: int = 14,
    words: Mapping[str, str] | None = None,
    caption: str | None = None,
) -> Figure:
    """A table of counts drawn as grey cells with the count printed in each.

    Rows and columns beyond ``max_cells`` are summed into one "others" row/column.

    Parameters
    ----------
    table : ndarray of int, shape (rows, cols)
        ``table[i, j]`` members are in row group i and column group j.
    row_labels, col_labels : sequences of str
        Names of the rows and columns.
    row_title, col_title : str
        Axis titles (say which grouping each axis is).
    key : str
        Distinguishes two heatmaps in one page (SVG ids).
    max_cells : int
        Largest number of rows or columns drawn.
    words : mapping, optional
        Vocabulary for the default caption.
    caption : str, optional
        Replaces the default caption.

    Returns
    -------
    Figure
    """
    w = _words(words)
    t = np.asarray(table, dtype=float)
    if t.ndim != 2 or t.size == 0:
        t = np.zeros((1, 1))
        row_labels, col_labels = ["–"], ["–"]
    t, rows = _lump(t, [_label(x, 18) for x in row_labels], 0, max_cells)
    t, cols = _lump(t, [_label(x, 18) for x in col_labels], 1, max_cells)
    # Shade by share of the row, so a small row that sits wholly in one column is as
    # dark as a large one.
    share = t / np.where(t.sum(axis=1, keepdims=True) > 0, t.sum(axis=1, keepdims=True), 1)

    def paint(fig: Any, ax: Any) -> None:
        # Vector cells (no embedded raster), white gaps between them.
        ax.pcolormesh(
            np.arange(t.shape[1] + 1) - 0.5,
            np.arange(t.shape[0] + 1) - 0.5,
            share,
            cmap="Greys",
            vmin=0,
            vmax=1.15,
            edgecolors="white",
            linewidth=1.2,
        )
        ax.set_xlim(-0.5, t.shape[1] - 0.5)
        ax.set_ylim(t.shape[0] - 0.5, -0.5)
        for i in range(t.shape[0]):
            for j in range(t.shape[1]):
                if t[i, j] == 0:
                    continue
                ax.text(
                    j,
                    i,
                    f"{int(t[i, j])}",
                    ha="center",
                    va="center",
                    fontsize=6.5 if max(t.shape) > 8 else 7.5,
                    color="white" if share[i, j] > 0.55 else "#111111",
                    fontweight="bold" if share[i, j] > 0.5 else "normal",
                )
        tilt = sum(len(c) for c in cols) > 40
        ax.set_xticks(
            range(len(cols)), cols, rotation=40 if tilt else 0, ha="left" if tilt else "center"
        )
        ax.xaxis.set_label_position("top")
        ax.xaxis.tick_top()
        ax.set_yticks(range(len(rows)), rows)
        ax.set_xlabel(col_title)
        ax.set_ylabel(row_title)
        ax.tick_params(length=0)
        for spine in ax.spines.values():
            spine.set_visible(False)

    height = min(4.6, 1.0 + 0.25 * len(rows))
    width = min(_WIDTH, 1.6 + 0.38 * len(cols))
    svg = _draw(key, (width, height), paint)
    if caption is None:
        caption = (
            f"How the {w['members']} of each row group fall into the column groups; each "
            "number counts members, and the darker a cell, the larger its share of the row. "
            "One dark cell per row means the two groupings agree; a row spread over "
            "several columns is split by the other grouping."
        )
    return Figure(svg, caption)


# ---------------------------------------------------------------------- projections


def project_2d(vectors: np.ndarray) -> np.ndarray:
    """Rows of ``vectors`` on their two main directions (PCA after L2 normalisation).

    The signs are fixed (largest loading positive) so the picture does not flip from
    run to run. For display only: nothing is measured on these coordinates.
    """
    x = np.asarray(vectors, dtype=float)
    if x.ndim != 2 or x.shape[0] == 0:
        return np.zeros((0, 2))
    norms = np.linalg.norm(x, axis=1, keepdims=True)
    x = x / np.where(norms > 0, norms, 1.0)
    x = x - x.mean(axis=0)
    if x.shape[0] < 2 or not np.any(x):
        return np.zeros((x.shape[0], 2))
    _, _, vt = np.linalg.svd(x, full_matrices=False)
    vt = vt[:2]
    signs = np.sign(vt[np.arange(len(vt)), np.abs(vt).argmax(axis=1)])
    out = x @ (vt * signs[:, None]).T
    if out.shape[1] < 2:
        out = np.hstack([out, np.zeros((out.shape[0], 2 - out.shape[1]))])
    return out


def projections(
    views: Mapping[str, np.ndarray],
    communities: Sequence[int],
    *,
    titles: Mapping[str, str] | None = None,
    max_points: int = 3000,
    max_groups: int = 8,
    seed: int = 0,
    words: Mapping[str, str] | None = None,
) -> Figure:
    """A 2-D picture of each view, every member marked by its community.

    Parameters
    ----------
    views : mapping of str to ndarray (n, d)
        View name -> vectors, rows in the same member order.
    communities : sequence of int, length n
        Community of each member (the same colouring in every panel); members with a
        community of 0 or less (no ties) are left out.
    titles : mapping, optional
        Panel title per view name.
    max_points : int
        At most this many members are drawn (a fixed random sample beyond it).
    max_groups : int
        The largest ``max_groups`` communities get their own colour and marker;
        the rest are drawn as small grey dots.
    seed : int
        Seed of the sample.
    words : mapping, optional
        Vocabulary for the legend and caption.

    Returns
    -------
    Figure
    """
    w = _words(words)
    names = list(views)
    comm = np.asarray(communities, dtype=int)
    keep = np.flatnonzero(comm > 0)
    sampled = len(keep) > max_points
    if sampled:
        keep = np.sort(np.random.default_rng(seed).choice(keep, max_points, replace=False))
    groups, counts = np.unique(comm[keep], return_counts=True)
    ranked = [int(g) for g, _ in sorted(zip(groups, counts, strict=True), key=lambda gc: -gc[1])]
    shown = ranked[:max_groups]
    coords = {v: project_2d(np.asarray(views[v])[keep]) for v in names}

    def paint(fig: Any, axes: Any) -> None:
        axes = np.atleast_1d(axes)
        for ax, view in zip(axes, names, strict=True):
            xy = coords[view]
            rest = ~np.isin(comm[keep], shown)
            dense = len(keep) > RASTER_ABOVE
            if rest.any():
                ax.scatter(
                    xy[rest, 0],
                    xy[rest, 1],
                    s=4,
                    color=_OTHER,
                    lw=0,
                    label="other",
                    rasterized=dense,
                )
            for i, g in enumerate(shown):
                sel = comm[keep] == g
                ax.scatter(
                    xy[sel, 0],
                    xy[sel, 1],
                    rasterized=dense,
                    s=11 if len(keep) < 800 else 6,
                    marker=MARKERS[i],
                    facecolor=PALETTE[i],
                    edgecolor="#222222",
                    linewidth=0.5,  # a dark rim: the pale seventh colour stays visible in grey
                    alpha=0.85,
                    label=f"{w['community']} {g}",
                )
            ax.set_title((titles or {}).get(view, view))
            ax.set_xticks([])
            ax.set_yticks([])
            ax.set_aspect("equal", adjustable="datalim")
            for spine in ("top", "right"):
                ax.spines[spine].set_visible(True)
        handles, labels = axes[0].get_legend_handles_labels()
        fig.legend(
            handles,
            labels,
            loc="lower center",
            ncol=len(labels) if len(labels) <= 5 else (len(labels) + 1) // 2,
            frameon=False,
            bbox_to_anchor=(0.5, -0.02),
        )
        fig.subplots_adjust(bottom=0.2, wspace=0.08)

    svg = _draw("projections", (_WIDTH, 3.4), paint, ncols=len(names))
    caption = (
        f"Each point is a {w['member']}, placed by the two main directions of its vectors "
        f"in each view (a flat shadow of many dimensions, so distances are only rough); "
        f"colour and marker show its {w['community']}, the same in both panels. "
        f"Tight, separate clouds mean the view sets the {w['communities']} clearly apart; "
        "mixed clouds mean it sees them as one region."
    )
    if len(ranked) > max_groups:
        caption += f" Grey dots: the {len(ranked) - max_groups} smaller {w['communities']}."
    if sampled:
        caption += f" A fixed random sample of {max_points} {w['members']} is drawn."
    return Figure(svg, caption)


# ----------------------------------------------------------------------- robustness


def robustness_chart(
    removed: Sequence[float] | np.ndarray,
    by_betweenness: Sequence[float] | np.ndarray,
    at_random: Sequence[float] | np.ndarray,
    *,
    R: tuple[float, float],
    words: Mapping[str, str] | None = None,
) -> Figure:
    """Two robustness curves: the largest connected part as members are removed.

    Parameters
    ----------
    removed : sequence of float
        Share of members removed at each point (0 to 1), shared by both curves.
    by_betweenness, at_random : sequence of float
        Share of all members in the largest connected part at each point, members
        removed by betweenness (highest first) and in random order (mean of several).
    R : tuple of float
        The robustness index of each curve (betweenness, random), printed in the legend.
    words : mapping, optional
        Vocabulary for the axes and caption.

    Returns
    -------
    Figure
    """
    w = _words(words)
    x = 100 * np.asarray(removed, dtype=float)
    attack = 100 * np.asarray(by_betweenness, dtype=float)
    failure = 100 * np.asarray(at_random, dtype=float)

    def paint(fig: Any, ax: Any) -> None:
        ax.plot(
            x,
            failure,
            color=PALETTE[0],
            lw=1.6,
            label=f"in random order (R = {R[1]:.2f})",
        )
        ax.plot(
            x,
            attack,
            color=PALETTE[5],
            lw=1.6,
            ls="--",
            label=f"most in-between first (R = {R[0]:.2f})",
        )
        ax.set_xlim(0, 100)
        ax.set_ylim(0, 102)
        ax.set_xlabel(f"{w['members']} removed (%)")
        ax.set_ylabel(f"{w['members']} in the largest connected part (%)")
        ax.legend(loc="upper right", frameon=False)

    svg = _draw("robustness", (_WIDTH, 2.6), paint)
    caption = (
        f"How the {w.get('network', 'network')} holds together as {w['members']} are "
        "removed one after another: solid, in random order (the mean of several "
        f"orders); dashed, the {w['members']} that lie on the most shortest paths first. "
        "The higher a line stays, the longer the rest stay connected. R is the average "
        "height of the line as a share: at most about 0.5, reached when each removal "
        f"costs only the member removed. Based on recorded {w['ties']} only."
    )
    return Figure(svg, caption)


# -------------------------------------------------------------------- whole network


def project_2d_positions(xy: np.ndarray) -> np.ndarray:
    """Points turned onto their principal axes, the longer one first (signs fixed).

    Unlike :func:`project_2d`, rows are not normalised: distances are kept.

    Examples
    --------
    >>> project_2d_positions(np.array([[0.0, 0.0], [0.0, 2.0], [0.0, 4.0]])).round(6).tolist()
    [[-2.0, 0.0], [0.0, 0.0], [2.0, 0.0]]
    """
    x = np.asarray(xy, dtype=float)
    if x.ndim != 2 or x.shape[0] < 2:
        return np.zeros((0 if x.ndim != 2 else x.shape[0], 2))
    x = x - x.mean(axis=0)
    _, _, vt = np.linalg.svd(x, full_matrices=False)
    signs = np.sign(vt[np.arange(len(vt)), np.abs(vt).argmax(axis=1)])
    signs[signs == 0] = 1.0
    out = x @ (vt * signs[:, None]).T
    return out + 0.0  # no negative zeros


def network_map(
    n: int,
    ties: Sequence[tuple[int, int]],
    communities: Sequence[int],
    *,
    names: Sequence[str],
    annotate: Sequence[int] = (),
    community_names: Mapping[int, str] | None = None,
    max_groups: int = 8,
    seed: int = 0,
    words: Mapping[str, str] | None = None,
) -> Figure:
    """The whole network, member by member: a seeded force layout of every tie.

    Parameters
    ----------
    n : int
        Number of members drawn (positions 0..n-1).
    ties : sequence of (int, int)
        Ties as pairs of positions; direction is not drawn.
    communities : sequence of int, length n
        Community of each member (1-based; 0 or less: none).
    names : sequence of str, length n
        Member names, printed for the members in ``annotate``.
    annotate : sequence of int
        Positions of the key members whose names are printed.
    community_names : mapping, optional
        Community -> a name ('mostly Assembly') for the legend.
    max_groups : int
        The largest ``max_groups`` communities get their own colour and marker shape;
        the rest are small grey dots.
    seed : int
        Seed of the layout (Fruchterman & Reingold 1991, as networkx's
        ``spring_layout``): the same run draws the same picture.
    words : mapping, optional
        Vocabulary for the legend and caption.

    Returns
    -------
    Figure

    References
    ----------
    .. [1] T. M. J. Fruchterman and E. M. Reingold, "Graph drawing by force-directed
       placement", Software: Practice and Experience 21(11):1129-1164, 1991.
    """
    import networkx as nx

    w = _words(words)
    comm = np.asarray(communities, dtype=int)
    g = nx.Graph()
    g.add_nodes_from(range(n))
    g.add_edges_from((int(a), int(b)) for a, b in ties if a != b)
    # Twice networkx's default spacing (1 / sqrt(n)): a dense core opens up enough to
    # tell its members apart (our own choice, judged on the two bundled examples).
    pos = nx.spring_layout(g, seed=seed, iterations=150, k=2 / np.sqrt(max(n, 1)))
    xy = np.array([pos[i] for i in range(n)], dtype=float) if n else np.zeros((0, 2))
    # Turned so that the longer side lies across the page: the figure fills the text
    # width instead of a narrow column (PCA of the positions; signs fixed).
    xy = project_2d_positions(xy)
    span = np.ptp(xy, axis=0) if n else np.ones(2)
    aspect = float(span[1] / span[0]) if span[0] > 0 else 1.0
    groups, counts = np.unique(comm[comm > 0], return_counts=True)
    ranked = [int(c) for c, _ in sorted(zip(groups, counts, strict=True), key=lambda gc: -gc[1])]
    shown = ranked[:max_groups]
    cn = community_names or {}

    def paint(fig: Any, ax: Any) -> None:
        from matplotlib.collections import LineCollection

        segs = [(xy[a], xy[b]) for a, b in g.edges()]
        ax.add_collection(LineCollection(segs, colors="#8c8c8c", linewidths=0.35, zorder=1))
        rest = ~np.isin(comm, shown)
        if rest.any():
            ax.scatter(
                xy[rest, 0],
                xy[rest, 1],
                s=7,
                color=_OTHER,
                edgecolor="#222222",
                linewidth=0.3,
                label="other",
                zorder=2,
            )
        for i, c in enumerate(shown):
            sel = comm == c
            name = cn.get(c)
            ax.scatter(
                xy[sel, 0],
                xy[sel, 1],
                s=22,
                marker=MARKERS[i],
                facecolor=PALETTE[i],
                edgecolor="#222222",
                linewidth=0.5,
                label=_label(f"{w['community']} {c}" + (f": {name}" if name else ""), 34),
                zorder=3,
            )
        for idx in annotate:
            ax.annotate(
                _label(names[idx], 22),
                xy[idx],
                xytext=(4, 3),
                textcoords="offset points",
                fontsize=6.5,
                zorder=5,
                bbox={
                    "boxstyle": "round,pad=0.12",
                    "fc": "white",
                    "ec": "#444444",
                    "lw": 0.3,
                    "alpha": 0.9,
                },
            )
        ax.set_xticks([])
        ax.set_yticks([])
        for spine in ax.spines.values():
            spine.set_visible(False)
        ax.set_aspect("equal", adjustable="datalim")
        fig.subplots_adjust(left=0.0, right=1.0, top=1.0, bottom=0.9 / fig.get_size_inches()[1])
        ax.legend(
            loc="upper center",
            bbox_to_anchor=(0.5, -0.01),
            ncol=2 if len(shown) > 3 else max(len(shown), 1),
            frameon=False,
            fontsize=6.5,
        )

    svg = _draw("network-map", (_WIDTH, float(np.clip(_WIDTH * aspect + 0.9, 3.0, 6.0))), paint)
    caption = (
        f"Every {w['member']} with {w['ties']} and every {w['tie']}, "
        f"placed so that tied {w['members']} sit close together (a force layout with a "
        "fixed seed: the same run draws the same picture; distances are only rough). "
        f"Colour and marker shape show the {w['community']}; named points are the key "
        f"{w['members']} of the tables that follow."
    )
    if len(ranked) > max_groups:
        caption += f" Grey dots: the {len(ranked) - max_groups} smaller {w['communities']}."
    return Figure(svg, caption)
