"""The work a run will do, estimated before it starts, and the limits past which it is
refused unless the user insists.

Per view (the two views run side by side, one process each):

- walk steps: ``nodes * walks_per_node * (walk_length - 1)``;
- the walk matrix: ``nodes * walks_per_node * walk_length`` 32-bit node indices, held in
  memory whole (:func:`roles.embedding.walks.generate_walks`), two of them at once;
- skip-gram work: ``pairs * (negative + 1) * dimensions`` multiply-adds, where ``pairs``
  is :func:`roles.embedding.budget.skipgram_pairs` (``tokens * (window + 1) * epochs``): each
  (centre, context) pair updates one positive and ``negative`` sampled vectors of
  ``dimensions`` numbers (Mikolov et al., NeurIPS 2013).

Limits (:data:`MAX_SKIPGRAM_WORK`, :data:`memory_limit`) are checked by
:func:`check_workload`; ``--no-work-limit`` on the command line lifts them.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

from .config import Config
from .errors import ConfigError

__all__ = [
    "Workload",
    "estimate",
    "check_workload",
    "memory_limit",
    "MAX_SKIPGRAM_WORK",
    "SKIPGRAM_WORK_PER_SECOND",
    "INSIST_OPTION",
]

#: Skip-gram multiply-adds per second on one core of the measured 2-core machine:
#: about 1.3 million pairs per second at 16 dimensions and 5 negative samples
#: (:mod:`roles.embedding.budget`, ``benchmarks/bench_pipeline.py``), times 6 * 16. Cost is taken
#: as linear in ``dimensions`` and ``negative + 1``, which overstates it a little at
#: small sizes, where gensim's fixed per-pair cost weighs more.
SKIPGRAM_WORK_PER_SECOND = 1.3e6 * 6 * 16

#: Skip-gram work per view past which a run is refused: one hour of training per view
#: at :data:`SKIPGRAM_WORK_PER_SECOND`. The largest benchmarked default run (100,000
#: members) needs about 20 s per view and a million members at the walk budget's floors
#: about 12 minutes, so only settings raised far past the defaults reach it (the
#: issue's ``dimensions = 1024, epochs = 100, window = 100, negative = 50`` on 300
#: members: about five days).
MAX_SKIPGRAM_WORK = 3600 * SKIPGRAM_WORK_PER_SECOND

#: Bytes of one walk-matrix entry (int32 node index).
_ENTRY_BYTES = 4

#: The command-line option that lifts the limits, named in the error messages.
INSIST_OPTION = "--no-work-limit"

_FALLBACK_MEMORY = 8 * 2**30


def memory_limit() -> int:
    """Bytes the walk matrices may take together: half the machine's physical memory
    (8 GiB where it cannot be read).

    Half, because the walk matrices are only part of the run's peak: the walks are also
    written out for gensim, gensim holds its own model, and the machine runs other
    programs.
    """
    try:
        total = os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES")
    except (ValueError, OSError, AttributeError):
        return _FALLBACK_MEMORY
    return int(total // 2) if total > 0 else _FALLBACK_MEMORY


@dataclass(frozen=True)
class Workload:
    """The estimated work of the two views of one run.

    Attributes
    ----------
    walk_steps : int
        Moves of all walks of one view.
    tokens : int
        Walk entries of one view (the skip-gram corpus).
    walk_bytes : int
        Memory of both views' walk matrices, held at the same time.
    skipgram_work : float
        Skip-gram multiply-adds of one view.
    """

    walk_steps: int
    tokens: int
    walk_bytes: int
    skipgram_work: float

    @property
    def seconds(self) -> float:
        """Skip-gram seconds per view on the measured machine (the views run side by side)."""
        return self.skipgram_work / SKIPGRAM_WORK_PER_SECOND


def estimate(n_nodes: int, config: Config) -> Workload:
    """Estimate the walks and skip-gram work of ``config`` on ``n_nodes`` members.

    ``config`` is the configuration that will run (for ``roles report``, after
    :func:`roles.embedding.budget.walk_budget`).

    Examples
    --------
    >>> w = estimate(1000, Config())  # 10 walks of 40 nodes, window 5, 16 dims
    >>> w.walk_steps, w.tokens, w.walk_bytes
    (390000, 400000, 3200000)
    >>> round(w.seconds, 2)  # 400,000 tokens * 6 pairs / 1.3 million pairs per second
    1.85
    """
    walks, emb = config.walks, config.embedding
    starts = n_nodes * walks.walks_per_node
    tokens = starts * walks.walk_length
    pairs = tokens * (emb.window + 1) * emb.epochs
    return Workload(
        walk_steps=starts * (walks.walk_length - 1),
        tokens=tokens,
        walk_bytes=2 * tokens * _ENTRY_BYTES,
        skipgram_work=float(pairs) * (emb.negative + 1) * emb.dimensions,
    )


def _duration(seconds: float) -> str:
    if seconds < 5400:
        return f"{seconds / 60:,.0f} minutes"
    if seconds < 2 * 86400:
        return f"{seconds / 3600:,.0f} hours"
    return f"{seconds / 86400:,.0f} days"


def _gib(n: float) -> str:
    return f"{n / 2**30:,.1f} GiB"


def check_workload(n_nodes: int, config: Config, *, insist: bool = False) -> Workload:
    """Refuse a run whose walks would not fit in memory or whose training would run for
    hours, before anything is allocated.

    Parameters
    ----------
    n_nodes : int
        Members of the network (isolated ones included: each starts its walks).
    config : Config
        The configuration that will run.
    insist : bool, default False
        Run anyway (the user gave :data:`INSIST_OPTION`).

    Returns
    -------
    Workload
        The estimate, when the run may go ahead.

    Raises
    ------
    ConfigError
        When the walk matrices need more than :func:`memory_limit` or one view's
        skip-gram work exceeds :data:`MAX_SKIPGRAM_WORK`, and ``insist`` is false. The
        message gives the estimate and names the settings to lower.
    """
    work = estimate(n_nodes, config)
    if insist:
        return work
    walks, emb = config.walks, config.embedding
    limit = memory_limit()
    if work.walk_bytes > limit:
        raise ConfigError(
            f"the random walks of this run would need {_gib(work.walk_bytes)} of memory "
            f"({n_nodes:,} members x {walks.walks_per_node:,} walks_per_node x "
            f"{walks.walk_length:,} walk_length x 4 bytes, for each of the two views), "
            f"more than the {_gib(limit)} allowed (half of this machine's memory). Lower "
            f"walks_per_node or walk_length in the [walks] section of the configuration, "
            f"or add {INSIST_OPTION} to try anyway."
        )
    if work.skipgram_work > MAX_SKIPGRAM_WORK:
        raise ConfigError(
            f"this run's skip-gram training would take about {_duration(work.seconds)} "
            f"({work.tokens:,} walk tokens x window {emb.window} x epochs {emb.epochs} x "
            f"{emb.negative} negative samples x {emb.dimensions} dimensions, for each "
            f"view), past the limit of {_duration(MAX_SKIPGRAM_WORK / SKIPGRAM_WORK_PER_SECOND)}"
            f". Lower dimensions, epochs, window or negative in the [embedding] section, or "
            f"walks_per_node or walk_length in [walks], or add {INSIST_OPTION} to run anyway."
        )
    return work
