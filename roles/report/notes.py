"""Notes that summary.json carries beside the figures, in the report's words.

The stages hand over numbers (how many members the groups were fitted on, why roles
are withheld); the sentences are written here, where the report's other wording lives.
"""

from __future__ import annotations

__all__ = [
    "ISOLATED_TREATMENT",
    "sampled_fit_note",
    "confidence_cut_note",
    "withheld_explanation",
]

#: What summary.json says about members with no ties.
ISOLATED_TREATMENT = (
    "walks of length one and zero vectors; not clustered; community 0, role 'no ties'"
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
