"""Walk budget: more training for small and medium networks; a narrower window, then
shorter walks, for large ones.

Small networks first. gensim lowers the skip-gram learning rate linearly over all the
tokens of the training, so a network of a few dozen members (Zachary's karate club: 34
members x 10 walks x 40 nodes, about 14,000 tokens) stops learning before its vectors
settle: with one epoch the far view of the karate club found no groups in any of seeds
0-9. Below :data:`MIN_TOKENS_PER_VIEW` tokens per view the epochs are raised until the
floor is met, up to :data:`MAX_EPOCHS`: 12 epochs for the karate club (well under a
second), 1 from 300 members up. With 10 epochs the far view found the two factions in
every seed (mean NMI 0.84-0.85; ``benchmarks/RESULTS.md``, "Training budget"); on LFR
graphs of 1,000 members three epochs did not help (mean NMI at mixing 0.4, local view,
0.625 against 0.666), so the floor stops well below them.

Medium networks next. From :data:`LONG_WALKS_FROM` (300) members, as long as a view
stays within :data:`MAX_PAIRS_PER_VIEW` (up to 2,727 members), the walks are lengthened
to 80 nodes and the window widened to 10 (:func:`training_raise`): on LFR graphs of
1,000 members that raised the mean NMI at mixing 0.5 from 0.227 to 0.253 (graph seeds
1-3) and from 0.213 to 0.262 (graph seeds 4-6) for about 3.5 times the training time.

The walks and their skip-gram training cost time in proportion to the skip-gram
(centre, context) pairs of a view: ``nodes * walks_per_node * walk_length * (window +
1)`` (gensim draws each token's window from 1 to ``window`` on each side, so a token has
``window + 1`` context words on average). Measured on the project's 2-core machine
(``benchmarks/bench_pipeline.py``), skip-gram trains about 1.3 million pairs per second
per core, and the two views run side by side, one per core.

Beyond :data:`MAX_PAIRS_PER_VIEW` pairs the skip-gram window is narrowed first, down to
:data:`MIN_WINDOW`; then the walks are shortened, down to :data:`MIN_WALK_LENGTH`
nodes; and only then are fewer walks started at each node, down to
:data:`MIN_WALKS_PER_NODE`. The order and the floors come from
``benchmarks/bench_defaults.py`` (LFR graphs, Lancichinetti, Fortunato & Radicchi 2008,
n = 1000, mean NMI over mixing 0.1 and 0.3 on 16 graphs): window 2 recovers the planted
communities as well as window 5 (0.943 against 0.919) for 60 % of the pairs, so it is
the cheapest cut; community recovery then follows mostly the pairs per node, and below
the walk floors it breaks down on loosely knit communities. NMI at mixing 0.1 / 0.3,
window 2: 10 walks of 40 nodes 0.996 / 0.890; of 30 nodes 0.992 / 0.790; of 20 nodes
0.950 / 0.202; 6 walks of 40 nodes 0.986 / 0.353. See ``benchmarks/RESULTS.md``.

Small networks keep the wider default window: on Zachary's karate club (34 members)
window 2 put nearly everyone into one group (faction agreement 17 of 34, against 31 or
more at window 5), and below the cap the window costs little time.

Apply it only to settings the user did not choose (an ``epochs`` key under
``[embedding]`` sets ``epochs_given`` and keeps the epochs). A configuration whose
``walks_given`` flag is set (a configuration file with a ``[walks]`` section) keeps its
walks, one whose ``window_given`` flag is set (a ``window`` key under ``[embedding]``)
keeps its window; a caller that builds configurations another way must set those flags
itself when the user gave the values, since an explicit value equal to the default
cannot be told apart from it.
"""

from __future__ import annotations

import dataclasses

from ..config import Config
from ..report.notes import (
    longer_walks_note,
    more_epochs_note,
    sparser_walks_note,
    walk_clauses,
)

__all__ = [
    "walk_budget",
    "training_floor",
    "training_raise",
    "LONG_WALK_LENGTH",
    "LONG_WALKS_FROM",
    "WIDE_WINDOW",
    "MIN_TOKENS_PER_VIEW",
    "MAX_EPOCHS",
    "skipgram_pairs",
    "MAX_PAIRS_PER_VIEW",
    "MIN_WINDOW",
    "MIN_WALKS_PER_NODE",
    "MIN_WALK_LENGTH",
]

#: Skip-gram pairs per view above which the window narrows and the walks shorten:
#: 20,000 nodes at 10 walks of 40 nodes and window 2 (about 19 s per view on one core
#: of the measured machine), the size the 60-second target is set for.
MAX_PAIRS_PER_VIEW = 24_000_000

#: Fewest skip-gram tokens (members visited by the walks, over all epochs) per view.
MIN_TOKENS_PER_VIEW = 150_000

#: Walk length (nodes) and skip-gram window of the raised training of networks from
#: :data:`LONG_WALKS_FROM` members that fit :data:`MAX_PAIRS_PER_VIEW` with them (up to
#: 2,727 members at 10 walks per node): the setting with which Kojaku et al. (2024)
#: found node2vec to separate planted communities down to the detectability limit.
LONG_WALK_LENGTH = 80
WIDE_WINDOW = 10

#: Fewest members for longer walks and a wider window. Below, a window of 10 spans whole
#: teams: on four planted teams of 10 (``networkx.planted_partition_graph(4, 10, 0.6,
#: 0.05, seed=100)``) it merged two teams in one of seeds 0-9 (NMI 0.857 against 1.000
#: for the Louvain check and for walks of 40 at window 5). Our choice, not a published
#: bound; the same bound as :data:`roles.embedding.cluster.FINER_TREE_ROWS`.
LONG_WALKS_FROM = 300

#: Most epochs the floor raises the training to.
MAX_EPOCHS = 30

#: Narrowest skip-gram window after scaling (context nodes on each side).
MIN_WINDOW = 2

#: Fewest walks started at each node after scaling.
MIN_WALKS_PER_NODE = 10

#: Shortest walk (nodes, start included) after scaling.
MIN_WALK_LENGTH = 30


def skipgram_pairs(n_nodes: int, config: Config) -> int:
    """Skip-gram pairs of one view: ``n_nodes * walks_per_node * walk_length *
    (window + 1) * epochs``, the cost model of this module."""
    w, e = config.walks, config.embedding
    return n_nodes * w.walks_per_node * w.walk_length * (e.window + 1) * e.epochs


def training_raise(n_nodes: int, config: Config) -> tuple[Config, str | None]:
    """Lengthen the walks and widen the window of a network small enough to afford it.

    Parameters
    ----------
    n_nodes : int
        Size of the network.
    config : Config
        The configuration; ``config.walks.walk_length`` changes unless
        ``config.walks_given`` is set, ``config.embedding.window`` unless
        ``config.window_given`` is set, each only upwards, and only from
        :data:`LONG_WALKS_FROM` members.

    Returns
    -------
    config : Config
        ``config`` itself when nothing is raised, otherwise a copy with walks of
        :data:`LONG_WALK_LENGTH` nodes and a window of :data:`WIDE_WINDOW`, when the view
        then still trains on at most :data:`MAX_PAIRS_PER_VIEW` skip-gram pairs.
    note : str or None
        A sentence for the report saying what was raised, or ``None``.

    Notes
    -----
    On LFR graphs of 1,000 members (mixing 0.4 / 0.5, graph seeds 1-3, mean NMI with
    the planted communities, ``benchmarks/RESULTS.md``, "Training for networks up to
    2,727 members") walks of 80 at window 10 scored 0.696 / 0.275 against 0.690 / 0.227
    for 40 at window 5, for about 3.5 times the training time (8 s against 2.3 s for
    both views). Longer walks and wider windows let each member's vector see more of
    its community (Kojaku, Radicchi, Ahn & Fortunato 2024).

    References
    ----------
    .. [1] S. Kojaku, F. Radicchi, Y.-Y. Ahn and S. Fortunato, "Network community
       detection via neural embeddings", Nature Communications 15, 9446, 2024.
       doi:10.1038/s41467-024-52355-w

    Examples
    --------
    >>> from roles.config import Config
    >>> raised, _ = training_raise(1000, Config())
    >>> raised.walks.walk_length, raised.embedding.window
    (80, 10)
    >>> training_raise(20000, Config())[1] is None  # 20,000 x 10 x 80 x 11 pairs: too many
    True
    """
    walks, emb = config.walks, config.embedding
    length, window = walks.walk_length, emb.window
    if n_nodes < LONG_WALKS_FROM:
        return config, None
    if not getattr(config, "walks_given", False):
        length = max(length, LONG_WALK_LENGTH)
    if not getattr(config, "window_given", False):
        window = max(window, WIDE_WINDOW)
    if (length, window) == (walks.walk_length, emb.window):
        return config, None
    raised = dataclasses.replace(
        config,
        walks=dataclasses.replace(walks, walk_length=length),
        embedding=dataclasses.replace(emb, window=window),
    )
    if skipgram_pairs(n_nodes, raised) > MAX_PAIRS_PER_VIEW:
        return config, None
    changed = {"walk_length": (walks.walk_length, length), "window": (emb.window, window)}
    changed = {k: v for k, v in changed.items() if v[0] != v[1]}
    return raised, longer_walks_note(n_nodes, walk_clauses(changed, ("walk_length", "window")))


def training_floor(n_nodes: int, config: Config) -> tuple[Config, str | None]:
    """Raise the epochs of a small network until each view trains on enough tokens.

    Parameters
    ----------
    n_nodes : int
        Size of the network.
    config : Config
        The configuration; only ``config.embedding.epochs`` may change, and only when
        ``config.epochs_given`` is not set.

    Returns
    -------
    config : Config
        ``config`` itself when the floor is met (or the user set the epochs), otherwise
        a copy with ``ceil(MIN_TOKENS_PER_VIEW / tokens per epoch)`` epochs, at most
        :data:`MAX_EPOCHS`.
    note : str or None
        A sentence for the report saying what was raised and why, or ``None``.

    Examples
    --------
    >>> from roles.config import Config
    >>> training_floor(34, Config())[0].embedding.epochs  # 150,000 / 13,600 tokens
    12
    >>> training_floor(1000, Config())[0].embedding.epochs
    1
    """
    walks, emb = config.walks, config.embedding
    per_epoch = max(n_nodes, 1) * walks.walks_per_node * walks.walk_length
    if getattr(config, "epochs_given", False) or per_epoch * emb.epochs >= MIN_TOKENS_PER_VIEW:
        return config, None
    epochs = min(MAX_EPOCHS, -(-MIN_TOKENS_PER_VIEW // per_epoch))
    if epochs <= emb.epochs:
        return config, None
    raised = dataclasses.replace(config, embedding=dataclasses.replace(emb, epochs=epochs))
    return raised, more_epochs_note(n_nodes, epochs, emb.epochs)


def walk_budget(n_nodes: int, n_edges: int, config: Config) -> tuple[Config, str | None]:
    """Narrow the window, then shorten (then thin out) the walks, for a large network.

    Parameters
    ----------
    n_nodes, n_edges : int
        Size of the network (``n_edges`` counts ties once; it appears in the note).
    config : Config
        The configuration to adjust; only ``config.walks`` and
        ``config.embedding.window`` may change.

    Returns
    -------
    config : Config
        ``config`` itself when the budget fits (or the user set the keys that would
        change), otherwise a copy with a narrower window, shorter or fewer walks.
    note : str or None
        Plain-language sentences for the report saying what was changed and why, or
        ``None`` when nothing changed.

    Notes
    -----
    Never cuts a walk setting below its floor: values already at or below a floor stay
    as they are. Applying the function to its own result changes nothing more. A network
    that affords them gets longer walks and a wider window first
    (:func:`training_raise`), then a small one more epochs (:func:`training_floor`);
    their notes are the whole note.
    """
    config, raise_note = training_raise(n_nodes, config)
    config, floor_note = training_floor(n_nodes, config)
    notes = [text for text in (raise_note, floor_note) if text is not None]
    if notes:
        return config, " ".join(notes)
    if skipgram_pairs(n_nodes, config) <= MAX_PAIRS_PER_VIEW:
        return config, None
    walks, emb = config.walks, config.embedding
    n = max(n_nodes, 1)
    tokens = walks.walks_per_node * walks.walk_length * emb.epochs  # per node
    window = emb.window
    if not getattr(config, "window_given", False):
        # Widest window within the cap, but not below the floor (nor above the setting).
        fits = int(MAX_PAIRS_PER_VIEW // (n * tokens)) - 1
        window = max(min(window, MIN_WINDOW), min(window, fits))
    count, length = walks.walks_per_node, walks.walk_length
    if not getattr(config, "walks_given", False):
        # Tokens each node may start: walks_per_node * walk_length.
        allowed = MAX_PAIRS_PER_VIEW / (n * (window + 1) * emb.epochs)
        floor_length = min(length, MIN_WALK_LENGTH)
        length = max(floor_length, min(length, int(allowed // count)))
        if count * length > allowed:
            floor_count = min(count, MIN_WALKS_PER_NODE)
            count = max(floor_count, min(count, int(allowed // length)))
    if (count, length, window) == (walks.walks_per_node, walks.walk_length, emb.window):
        return config, None
    scaled = dataclasses.replace(
        config,
        walks=dataclasses.replace(walks, walks_per_node=count, walk_length=length),
        embedding=dataclasses.replace(emb, window=window),
    )
    changed = {
        "window": (emb.window, window),
        "walk_length": (walks.walk_length, length),
        "walks_per_node": (walks.walks_per_node, count),
    }
    changed = {k: v for k, v in changed.items() if v[0] != v[1]}
    clauses = walk_clauses(changed, ("window", "walk_length", "walks_per_node"))
    return scaled, sparser_walks_note(n_nodes, n_edges, clauses)
