"""Notes that summary.json carries beside the figures, in the report's words.

The stages hand over numbers (how many members the groups were fitted on, why roles
are withheld); the sentences are written here, where the report's other wording lives.
"""

from __future__ import annotations

__all__ = [
    "ISOLATED_TREATMENT",
    "walk_clauses",
    "longer_walks_note",
    "more_epochs_note",
    "sparser_walks_note",
    "sampled_fit_note",
    "confidence_cut_note",
    "withheld_explanation",
]

#: What summary.json says about members with no ties.
ISOLATED_TREATMENT = (
    "walks of length one and zero vectors; not clustered; community 0, role 'no ties'"
)


def walk_clauses(changed: dict[str, tuple[int, int]], order: tuple[str, ...]) -> list[str]:
    """One clause per changed walk setting (``name -> (before, after)``), in ``order``.

    Examples
    --------
    >>> walk_clauses({"walk_length": (40, 80)}, ("window", "walk_length"))
    ['each walk visited 80 members instead of 40']
    """
    words = {
        "window": "each member was learned from up to {1} members either side of it on a "
        "walk instead of up to {0}",
        "walk_length": "each walk visited {1} members instead of {0}",
        "walks_per_node": "{1} walks started from each member instead of {0}",
    }
    return [words[k].format(*changed[k]) for k in order if k in changed]


def longer_walks_note(n_nodes: int, clauses: list[str]) -> str:
    """Why a network of a few hundred to a few thousand members got longer walks."""
    return (
        f"This network is small enough ({n_nodes:,} members) to describe each member's "
        f"surroundings with longer random walks: {'; '.join(clauses)}. On test networks "
        "with loosely knit communities this found them more often; it costs seconds. "
        "To keep the settings, set walk_length in the [walks] section and window in the "
        "[embedding] section of a configuration file."
    )


def more_epochs_note(n_nodes: int, epochs: int, before: int) -> str:
    """Why a small network's walks were learned from more than once."""
    was = "once" if before == 1 else f"{before} times"
    return (
        f"This network is small ({n_nodes:,} members), so the random walks that describe "
        f"each member's surroundings were learned from {epochs} times instead of "
        f"{was}: on a network this small, one pass stops learning before the groups "
        "show. This costs seconds. To keep the setting, set epochs in the [embedding] "
        "section of a configuration file."
    )


def sparser_walks_note(n_nodes: int, n_edges: int, clauses: list[str]) -> str:
    """Why a large network's walks were cut back."""
    return (
        f"This network is large ({n_nodes:,} members, {n_edges:,} ties), so the random "
        f"walks that describe each member's surroundings were used more sparingly: "
        f"{'; '.join(clauses)}. This keeps the analysis within minutes. On test "
        "networks with clearly separated communities it makes little difference; where "
        "communities are loosely knit, the groups are less reliable. To keep the full "
        "settings, set walks_per_node and walk_length in the [walks] section and window "
        "in the [embedding] section of a configuration file."
    )


def sampled_fit_note(fitted: int, members: int) -> str:
    """A sentence for when HDBSCAN saw only ``fitted`` of the ``members`` with ties.

    Examples
    --------
    >>> sampled_fit_note(5000, 20000)[:44]
    'The groups were found among 5,000 randomly c'
    """
    return (
        f"The groups were found among {fitted:,} randomly chosen members of the "
        f"{members:,} with ties; every other member joined the group of its nearest chosen "
        "members. On test networks of 20,000 and 50,000 members with planted communities "
        "this found the communities as well as using everyone, in a quarter to a half of "
        "the time. To use everyone, set fit_limit = 0 in the [cluster] section of a "
        "configuration file."
    )


def confidence_cut_note(cuts: list[str]) -> str:
    """A sentence for when the confidence checks were cut back, each cut a clause.

    Examples
    --------
    >>> confidence_cut_note(["no structure test"])[:40]
    'To keep the run affordable: no structure'
    """
    return (
        "To keep the run affordable: "
        + "; ".join(cuts)
        + ". Set scale_down = false under [confidence] to spend the full budget."
    )


def withheld_explanation(reason: str, z: float) -> str:
    """Why hub-like and bridge-like are withheld, for summary.json.

    Parameters
    ----------
    reason : {'no groups', 'structure not clear'}
        :attr:`roles.analysis.findings.Withheld.reason`.
    z : float
        The structure test's z (read only for ``"structure not clear"``).

    Examples
    --------
    >>> "(z = 0.50)" in withheld_explanation("structure not clear", 0.5)
    True
    """
    if reason == "no groups":
        return (
            "no communities were found, and hub-like and bridge-like are "
            "defined relative to communities"
        )
    return (
        "the communities are not clearly stronger than in randomised "
        f"networks with the same degrees (z = {z:.2f}), and hub-like and "
        "bridge-like are defined relative to communities"
    )
