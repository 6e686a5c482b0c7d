"""Every stage's seed, drawn from the one user seed (part of the run recipe,
:mod:`roles.plan`; a module of its own so that any stage may import it).

Nothing seeds a global generator: each stage gets its own 32-bit seed from a child of
``numpy.random.SeedSequence(seed)``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["StageSeeds", "seed_list"]


def _word(child: np.random.SeedSequence) -> int:
    return int(child.generate_state(1)[0])


@dataclass(frozen=True)
class StageSeeds:
    """Each stage's seed, all drawn from the one user seed.

    Child ``i`` of ``numpy.random.SeedSequence(seed).spawn(9)`` seeds one stage, so no
    two stages share a random stream and a stage's seed does not depend on how many
    others exist. Nothing seeds a global generator.

    Attributes
    ----------
    local_walks, far_walks : tuple of int
        (walk seed, skip-gram seed) of each view (children 0 and 1).
    local_groups, far_groups : int
        Each view's clustering (PCA, HDBSCAN sample, refinement order) (2 and 3).
    roles : int
        The role measures (betweenness source sample) (4).
    louvain : int
        The modularity check (5).
    confidence : int
        The structure test and the stability re-runs (6).
    trial_walks : int
        The trial walks that decide whether a directed network is walked both ways (7).
    what_if : int
        The removal scenarios' sampled efficiency (8).

    Examples
    --------
    >>> s = StageSeeds.of(7)
    >>> s == StageSeeds.of(7), s.local_groups == s.far_groups
    (True, False)
    """

    local_walks: tuple[int, int]
    far_walks: tuple[int, int]
    local_groups: int
    far_groups: int
    roles: int
    louvain: int
    confidence: int
    trial_walks: int
    what_if: int

    @classmethod
    def of(cls, seed: int) -> StageSeeds:
        c = np.random.SeedSequence(seed).spawn(9)
        walks = [tuple(int(x) for x in k.generate_state(2, dtype=np.uint32)) for k in c[:2]]
        return cls(
            local_walks=(walks[0][0], walks[0][1]),
            far_walks=(walks[1][0], walks[1][1]),
            local_groups=_word(c[2]),
            far_groups=_word(c[3]),
            roles=_word(c[4]),
            louvain=_word(c[5]),
            confidence=_word(c[6]),
            trial_walks=_word(c[7]),
            what_if=_word(c[8]),
        )

    @property
    def view_walks(self) -> dict[str, tuple[int, int]]:
        """(walk seed, skip-gram seed) per view, as :func:`roles.embedding.embed.embed_views`
        takes them."""
        return {"local": self.local_walks, "far": self.far_walks}

    @property
    def view_groups(self) -> dict[str, int]:
        """The clustering seed of each view."""
        return {"local": self.local_groups, "far": self.far_groups}


def seed_list(seed: int, n: int, *, avoid: int | None = None) -> list[int]:
    """``n`` 32-bit seeds from ``SeedSequence(seed)``, skipping ``avoid`` (the seeds of
    the confidence checks and of the re-runs, which must differ from the run's own).

    Examples
    --------
    >>> len(seed_list(3, 4)), seed_list(3, 4) == seed_list(3, 4)
    (4, True)
    """
    values = [_word(c) for c in np.random.SeedSequence(seed).spawn(n + 1)]
    return [v for v in values if v != avoid][:n]
