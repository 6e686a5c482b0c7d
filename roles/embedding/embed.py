"""Walks -> vectors: skip-gram with negative sampling (gensim Word2Vec), two views.

Each view (``local``: q > 1, ``far``: q < 1) is one node2vec run [1]_: second-order
walks from :mod:`roles.embedding.walks`, then skip-gram with negative sampling [2]_ trained by
gensim [3]_ with one worker thread, so the result depends on the seed only. The two
views run side by side in two processes.

Nodes are gensim "words" named by their index (``"0"``, ``"1"``, ...); the vector of
node ``i`` is row ``i``. A node that never shares a walk with another node (an isolated
node: its walks have length 1) gets no training signal; its row is zero and it is
counted in :attr:`Embedding.n_untrained`.

References
----------
.. [1] A. Grover and J. Leskovec, "node2vec: Scalable feature learning for networks",
   KDD 2016. https://doi.org/10.1145/2939672.2939754
.. [2] T. Mikolov, I. Sutskever, K. Chen, G. Corrado and J. Dean, "Distributed
   representations of words and phrases and their compositionality", NeurIPS 2013.
.. [3] R. Řehůřek and P. Sojka, "Software framework for topic modelling with large
   corpora", LREC 2010 Workshop on New Challenges for NLP Frameworks.
"""

from __future__ import annotations

import logging
import multiprocessing
import os
import tempfile
import zlib
from collections.abc import Callable, Iterator, Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..config import Config, EmbeddingConfig, ViewConfig, WalkConfig
from ..errors import parameter_error
from ..seeds import StageSeeds
from ..workers import worker_pool
from .graph import CSRGraph
from .walks import generate_walks, visit_counts, walk_lengths

__all__ = [
    "Embedding",
    "embed_walks",
    "embed_views",
    "embed_views_then",
    "untrained_nodes",
    "FEEDS",
]

#: Ways of handing the walks to gensim; see ``benchmarks/bench_walks.py`` for the choice.
FEEDS = ("corpus_file", "iterable")
_DEFAULT_FEED = "corpus_file"

# Below this many walk tokens per view, starting worker processes costs more than it
# saves: a fresh process needs about 1.9 CPU-seconds to import its code, and skip-gram
# trains about 250,000 tokens per CPU-second (benchmarks/bench_walks.py).
_PARALLEL_MIN_TOKENS = 1_000_000

_log = logging.getLogger(__name__)


@dataclass(frozen=True, eq=False)
class Embedding:
    """Vectors of one view and how they were made.

    Attributes
    ----------
    view : str
        ``"local"`` or ``"far"``.
    names : tuple of str
        ``names[i]`` is the node of row ``i``.
    vectors : ndarray of float32, shape (n_nodes, dimensions)
        Row ``i`` is node ``i``; zero for untrained nodes.
    p, q : float
        node2vec return and in-out parameters of the walks.
    walk_seed, train_seed : int
        Seeds of the walks and of gensim, derived from the run seed.
    n_walks : int
        Walks sampled (``walks_per_node`` per node).
    walk_length : int
        Nodes per walk, before any directed dead end.
    n_steps : int
        Moves made by all walks together.
    n_stopped : int
        Walks that ended early at a node without out-ties (directed networks) or
        started at an isolated node.
    n_isolated : int
        Nodes without any tie (in or out).
    untrained : ndarray of bool, shape (n_nodes,)
        Nodes that shared no walk with another node: their row is zero.
    walks : ndarray of int32 or None
        The walks themselves, when kept (``keep_walks=True``).
    """

    view: str
    names: tuple[str, ...]
    vectors: np.ndarray
    p: float
    q: float
    walk_seed: int
    train_seed: int
    n_walks: int
    walk_length: int
    n_steps: int
    n_stopped: int
    n_isolated: int
    untrained: np.ndarray
    walks: np.ndarray | None = None

    @property
    def n_untrained(self) -> int:
        """Nodes whose row is zero because no walk gave them a neighbour."""
        return int(self.untrained.sum())

    @property
    def dimensions(self) -> int:
        return int(self.vectors.shape[1])


def _stable_hash(text: str) -> int:
    """String hash that does not depend on PYTHONHASHSEED (gensim's ``hashfxn``)."""
    return zlib.crc32(text.encode("utf-8"))


def untrained_nodes(walks: np.ndarray, n_nodes: int) -> np.ndarray:
    """Nodes that appear in no walk of two or more nodes (boolean mask).

    Skip-gram only moves a node's vector when the node has a context word, so these
    rows carry no information; :func:`embed_walks` sets them to zero.
    """
    return visit_counts(walks, n_nodes, min_length=2) == 0


class _Walks:
    """Restartable corpus of token lists; the token strings are made once."""

    def __init__(self, walks: np.ndarray, lengths: np.ndarray, tokens: np.ndarray):
        self._walks = walks
        self._lengths = lengths
        self._tokens = tokens

    def __iter__(self) -> Iterator[list[str]]:
        tokens = self._tokens
        for row, k in zip(self._walks, self._lengths, strict=True):
            yield tokens[row[:k]].tolist()


def _write_corpus(path: str, walks: np.ndarray, lengths: np.ndarray, n_nodes: int) -> None:
    """One walk per line, node indices separated by spaces (gensim's LineSentence)."""
    tokens = np.array([str(i).encode("ascii") for i in range(n_nodes)], dtype=object)
    with open(path, "wb", buffering=1 << 20) as fh:
        step = 4096
        for lo in range(0, walks.shape[0], step):
            lines = [
                b" ".join(tokens[row[:k]].tolist())
                for row, k in zip(walks[lo : lo + step], lengths[lo : lo + step], strict=True)
            ]
            fh.write(b"\n".join(lines))
            fh.write(b"\n")


def embed_walks(
    walks: np.ndarray,
    n_nodes: int,
    *,
    dimensions: int,
    window: int,
    epochs: int,
    negative: int,
    seed: int,
    feed: str = _DEFAULT_FEED,
) -> np.ndarray:
    """Train skip-gram with negative sampling on walks and return one vector per node.

    Parameters
    ----------
    walks : ndarray of int32, shape (n_walks, walk_length)
        Node indices, ``-1`` after a walk's end (as :func:`roles.embedding.walks.generate_walks`).
    n_nodes : int
        Number of nodes; the result has one row per node, in index order.
    dimensions, window, epochs, negative : int
        Vector size, context window, passes over the walks, negative samples.
    seed : int
        gensim's seed, 0 to 2**32 - 1.
    feed : {"corpus_file", "iterable"}
        How the walks reach gensim: a temporary text file read by gensim's compiled
        reader, or a Python iterable of token lists. Both are deterministic.

    Returns
    -------
    ndarray of float32, shape (n_nodes, dimensions)
        Row ``i`` is the vector of node ``i``. Rows of nodes found by
        :func:`untrained_nodes` are zero.

    Notes
    -----
    gensim runs with ``sg=1``, ``workers=1``, ``min_count=1`` and a ``hashfxn`` that
    ignores PYTHONHASHSEED, which together make the vectors a function of the walks
    and the seed [1]_. Frequent nodes are down-sampled with gensim's default
    ``sample=1e-3`` (Mikolov et al., NeurIPS 2013), common practice for node2vec.

    References
    ----------
    .. [1] gensim 4 documentation of ``gensim.models.word2vec.Word2Vec``, parameter
       ``seed``: "for a fully deterministically-reproducible run, you must also limit
       the model to a single worker thread (`workers=1`) ... reproducibility between
       interpreter launches also requires use of the `PYTHONHASHSEED` environment
       variable". A fixed ``hashfxn`` (CRC-32) stands in for that variable here.
    """
    from gensim.models import Word2Vec

    if feed not in FEEDS:
        raise parameter_error("feed", f"one of {FEEDS}", feed)
    if walks.ndim != 2:
        raise parameter_error("walks", "a 2-d array", walks.shape)
    vectors = np.zeros((n_nodes, dimensions), dtype=np.float32)
    counts = visit_counts(walks, n_nodes, min_length=2)
    lengths = walk_lengths(walks)
    keep = lengths >= 2  # a lone node has no context: nothing to learn from it
    if not keep.all():  # copy only when there is something to drop
        walks, lengths = walks[keep], lengths[keep]
    if walks.shape[0] == 0:
        return vectors
    present = np.flatnonzero(counts)
    keys = [str(i) for i in present]
    total_words = int(lengths.sum())
    model = Word2Vec(
        vector_size=dimensions,
        window=window,
        min_count=1,
        sg=1,
        hs=0,
        negative=negative,
        workers=1,
        seed=int(seed),
        hashfxn=_stable_hash,
        epochs=epochs,
    )
    model.build_vocab_from_freq(
        dict(zip(keys, counts[present].tolist(), strict=True)), corpus_count=int(walks.shape[0])
    )
    if feed == "iterable":
        tokens = np.empty(n_nodes, dtype=object)
        tokens[present] = keys
        model.train(
            _Walks(walks, lengths, tokens),
            total_examples=int(walks.shape[0]),
            total_words=total_words,
            epochs=epochs,
        )
    else:
        fd, path = tempfile.mkstemp(prefix="roles-walks-", suffix=".txt")
        os.close(fd)
        try:
            _write_corpus(path, walks, lengths, n_nodes)
            model.train(
                corpus_file=path,
                total_examples=int(walks.shape[0]),
                total_words=total_words,
                epochs=epochs,
            )
        finally:
            os.unlink(path)
    index = np.fromiter((model.wv.key_to_index[k] for k in keys), dtype=np.int64, count=len(keys))
    vectors[present] = model.wv.vectors[index]
    return vectors


def _isolated(csr: CSRGraph) -> int:
    out_deg = np.diff(csr.indptr)
    in_deg = np.bincount(csr.indices, minlength=csr.n_nodes)
    return int(np.count_nonzero((out_deg == 0) & (in_deg == 0)))


def _embed_view(
    csr: CSRGraph,
    view: ViewConfig,
    name: str,
    walks_cfg: WalkConfig,
    emb_cfg: EmbeddingConfig,
    seeds: tuple[int, int],
    keep_walks: bool,
) -> Embedding:
    walk_seed, train_seed = seeds
    walks = generate_walks(
        csr,
        walks_per_node=walks_cfg.walks_per_node,
        walk_length=walks_cfg.walk_length,
        p=view.p,
        q=view.q,
        seed=walk_seed,
    )
    vectors = embed_walks(
        walks,
        csr.n_nodes,
        dimensions=emb_cfg.dimensions,
        window=emb_cfg.window,
        epochs=emb_cfg.epochs,
        negative=emb_cfg.negative,
        seed=train_seed,
    )
    lengths = walk_lengths(walks)
    return Embedding(
        view=name,
        names=csr.names,
        vectors=vectors,
        p=view.p,
        q=view.q,
        walk_seed=walk_seed,
        train_seed=train_seed,
        n_walks=int(walks.shape[0]),
        walk_length=int(walks.shape[1]),
        n_steps=int(np.maximum(lengths - 1, 0).sum()),
        n_stopped=int(np.count_nonzero(lengths < walks.shape[1])),
        n_isolated=_isolated(csr),
        untrained=untrained_nodes(walks, csr.n_nodes),
        walks=walks if keep_walks else None,
    )


def _embed_view_then(
    then: Callable[[str, Embedding], Any] | None, *args: Any
) -> tuple[Embedding, Any]:
    embedding = _embed_view(*args)
    return embedding, (then(embedding.view, embedding) if then is not None else None)


def embed_views(
    csr: CSRGraph,
    config: Config,
    *,
    seeds: Mapping[str, tuple[int, int]] | None = None,
    keep_walks: bool = False,
    processes: int | None = None,
) -> dict[str, Embedding]:
    """Compute the ``local`` and ``far`` node2vec views of a network.

    Parameters
    ----------
    csr : CSRGraph
        The network.
    config : Config
        ``config.local`` / ``config.far`` give p and q, ``config.walks`` and
        ``config.embedding`` the walk and skip-gram settings.
    seeds : mapping, optional
        View name -> (walk seed, skip-gram seed); by default
        ``StageSeeds.of(config.seed).view_walks`` (:class:`roles.seeds.StageSeeds`), as
        in a run.
    keep_walks : bool, default False
        Keep each view's walks in :attr:`Embedding.walks`.
    processes : int, optional
        2 computes the two views side by side in two worker processes (this one only
        waits, so Ctrl-C is acted on at once); 1 computes them one after the other
        here. By default two processes are used unless the walks are so short that
        starting a process would cost more than it saves. The vectors are the same either way.

    Returns
    -------
    dict
        ``{"local": Embedding, "far": Embedding}``.

    Notes
    -----
    The worker processes die with this one (:func:`roles.workers.worker_pool`). They
    are started with the "spawn" method (numba's and gensim's threads
    do not survive ``fork``). As with any spawned process, a script that calls this at
    import level must put that call under ``if __name__ == "__main__":``. Inside a
    daemonic process, which may not have children, the views run one after the other.

    References
    ----------
    .. [1] A. Grover and J. Leskovec, "node2vec: Scalable feature learning for
       networks", KDD 2016. https://doi.org/10.1145/2939672.2939754
    """
    done = embed_views_then(
        csr, config, None, seeds=seeds, keep_walks=keep_walks, processes=processes
    )
    return {name: embedding for name, (embedding, _) in done.items()}


def embed_views_then(
    csr: CSRGraph,
    config: Config,
    then: Callable[[str, Embedding], Any] | None,
    *,
    seeds: Mapping[str, tuple[int, int]] | None = None,
    keep_walks: bool = False,
    processes: int | None = None,
) -> dict[str, tuple[Embedding, Any]]:
    """:func:`embed_views`, then ``then(view, embedding)`` in the process of each view.

    The work that follows each view (grouping its vectors, say) then runs on both cores
    as the embeddings do, and only its result travels back.

    Parameters
    ----------
    then : callable or None
        Called once per view with the view's name and :class:`Embedding`, in the
        process that computed it. With two processes it must be picklable (a module-level
        function, or a :func:`functools.partial` of one) and so must its result.
    csr, config, seeds, keep_walks, processes
        As for :func:`embed_views`.

    Returns
    -------
    dict
        ``{"local": (Embedding, result), "far": (Embedding, result)}``; ``result`` is
        ``None`` when ``then`` is ``None``.
    """
    if seeds is None:
        seeds = StageSeeds.of(config.seed).view_walks
    jobs = {
        name: (csr, view, name, config.walks, config.embedding, seeds[name], keep_walks)
        for name, view in config.views.items()
    }
    if processes is None:
        tokens = csr.n_nodes * config.walks.walks_per_node * config.walks.walk_length
        processes = 2 if tokens >= _PARALLEL_MIN_TOKENS and (os.cpu_count() or 1) > 1 else 1
    if multiprocessing.current_process().daemon:
        processes = 1
    if processes <= 1:
        return {name: _embed_view_then(then, *args) for name, args in jobs.items()}
    # Both views in worker processes, so this process only waits and a stop signal is
    # acted on at once (a compiled kernel running here would hold it off until done).
    with worker_pool(2) as pool:
        futures = {name: pool.submit(_embed_view_then, then, *args) for name, args in jobs.items()}
        return {name: future.result() for name, future in futures.items()}
