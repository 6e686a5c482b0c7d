"""Run parameters: frozen dataclasses, their defaults, validation and TOML loading.

Every key of the TOML file is optional. Unknown keys and out-of-range or mistyped values
are refused with one message shape::

    The 'q' parameter of [views.local] must be a number greater than 0. Got -1 instead.
"""

from __future__ import annotations

import dataclasses
import math
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .errors import ConfigError
from .errors import quoted as _got

__all__ = [
    "WalkConfig",
    "EmbeddingConfig",
    "ViewConfig",
    "ClusterConfig",
    "ConfidenceConfig",
    "Config",
    "load_config",
    "config_from_mapping",
    "DEFAULT_SEED",
    "P_Q_RANGE",
]

DEFAULT_SEED = 20261202
#: Largest configuration file read: every setting together takes under 2 kB.
MAX_CONFIG_BYTES = 1 << 20


#: Range of the node2vec return and in-out parameters p and q. The node2vec paper
#: searched p, q in {0.25, 0.5, 1, 2, 4} (Grover & Leskovec, KDD 2016, Sec. 4.3, from
#: memory), and the walk sampler's cost is bounded by the range: a proposal is accepted
#: with probability a / max(a) for the bias a in {1/p, 1, 1/q} of its candidate, so at
#: worst 1 in max(a) / min(a) proposals is kept (a member whose only tie leads back,
#: with p = 4 and q = 0.25: 1 in 16). At q = 1e-9 the same member needs about a billion
#: proposals per step, and the run stalls.
P_Q_RANGE = (0.25, 4.0)


def _check_int(section: str, name: str, value: Any, low: int, high: int) -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        raise ConfigError(
            f"The '{name}' parameter of {section} must be a whole number from {low} to {high}. "
            f"Got {_got(value)} instead."
        )
    if not low <= value <= high:
        raise ConfigError(
            f"The '{name}' parameter of {section} must be a whole number from {low} to {high}. "
            f"Got {_got(value)} instead."
        )
    return value


def _check_walk_bias(section: str, name: str, value: Any) -> float:
    """p or q, within :data:`P_Q_RANGE` (bounds included)."""
    low, high = P_Q_RANGE
    ok = not isinstance(value, bool) and isinstance(value, (int, float))
    if not ok or not (math.isfinite(float(value)) and low <= float(value) <= high):
        raise ConfigError(
            f"The '{name}' parameter of {section} must be a number from {low:g} to {high:g} "
            "(the range node2vec was tuned over; beyond it the walks slow down without "
            f"limit). Got {_got(value)} instead."
        )
    return float(value)


@dataclass(frozen=True)
class WalkConfig:
    """How many walks start at each node and how many nodes each walk visits."""

    walks_per_node: int = 10
    walk_length: int = 40

    def __post_init__(self) -> None:
        _check_int("[walks]", "walks_per_node", self.walks_per_node, 1, 1000)
        _check_int("[walks]", "walk_length", self.walk_length, 2, 10000)


@dataclass(frozen=True)
class EmbeddingConfig:
    """Skip-gram settings (gensim Word2Vec, sg=1, negative sampling).

    ``dimensions`` 16: on planted-community networks of 10,000 to 100,000 members it
    recovered the communities better than 64 (NMI up to 0.05 higher) and tied on
    1,000-member LFR graphs and the karate club (benchmarks/RESULTS.md, "Vector
    dimensions at scale").
    """

    dimensions: int = 16
    window: int = 5
    epochs: int = 1
    negative: int = 5

    def __post_init__(self) -> None:
        _check_int("[embedding]", "dimensions", self.dimensions, 2, 1024)
        _check_int("[embedding]", "window", self.window, 1, 100)
        _check_int("[embedding]", "epochs", self.epochs, 1, 100)
        _check_int("[embedding]", "negative", self.negative, 1, 50)


@dataclass(frozen=True)
class ViewConfig:
    """node2vec return parameter p and in-out parameter q of one view."""

    p: float = 1.0
    q: float = 1.0
    name: str = "view"

    def __post_init__(self) -> None:
        section = f"[views.{self.name}]"
        _check_walk_bias(section, "p", self.p)
        _check_walk_bias(section, "q", self.q)
        object.__setattr__(self, "p", float(self.p))
        object.__setattr__(self, "q", float(self.q))


def _local_default() -> ViewConfig:
    # q > 1 keeps walks near their start: breadth-like context (Grover & Leskovec 2016, 3.1).
    return ViewConfig(p=1.0, q=2.0, name="local")


def _far_default() -> ViewConfig:
    # q < 1 pushes walks outward: depth-like context.
    return ViewConfig(p=1.0, q=0.5, name="far")


@dataclass(frozen=True)
class ClusterConfig:
    """HDBSCAN settings; ``min_cluster_size = 0`` means the default (5 members, see
    :func:`roles.embedding.cluster.default_min_cluster_size`).

    ``fit_limit``: HDBSCAN is fitted on at most this many members, chosen at random,
    and every other member takes the verdict of its nearest fitted members; 0 fits
    every member. Below the limit, networks of more than 12,000 members are fitted on
    60 % of them but at least 12,000 (:func:`roles.embedding.cluster.fitted_rows`). On a
    planted-community test network of 50,000 members a fit on 20,000 scored as well as
    a fit on all (NMI against the planted communities: local view 0.79-0.81 against
    0.80, far view 0.73 against 0.71) in a quarter of the time; at 20,000 members a fit
    on 12,000 scored within 0.003 of the full fit in under half the time
    (``benchmarks/bench_cluster.py``, two sample seeds).
    """

    min_cluster_size: int = 0
    reduce_to: int = 16
    fit_limit: int = 20000

    def __post_init__(self) -> None:
        _check_int("[cluster]", "min_cluster_size", self.min_cluster_size, 0, 100000)
        _check_int("[cluster]", "reduce_to", self.reduce_to, 2, 256)
        _check_int("[cluster]", "fit_limit", self.fit_limit, 0, 100_000_000)
        if 0 < self.fit_limit < 100:
            raise ConfigError(
                "The 'fit_limit' parameter of [cluster] must be 0 (fit every member) or a "
                f"whole number of at least 100. Got {_got(self.fit_limit)} instead."
            )


@dataclass(frozen=True)
class ConfidenceConfig:
    """Re-runs with other seeds (stability) and randomised copies (structure test)."""

    runs: int = 3
    randomisations: int = 20
    scale_down: bool = True

    def __post_init__(self) -> None:
        _check_int("[confidence]", "runs", self.runs, 0, 50)
        _check_int("[confidence]", "randomisations", self.randomisations, 0, 1000)
        if not isinstance(self.scale_down, bool):
            raise ConfigError(
                "The 'scale_down' parameter of [confidence] must be true or false. "
                f"Got {_got(self.scale_down)} instead."
            )


@dataclass(frozen=True)
class Config:
    """The whole effective configuration of one run."""

    seed: int = DEFAULT_SEED
    walks: WalkConfig = field(default_factory=WalkConfig)
    embedding: EmbeddingConfig = field(default_factory=EmbeddingConfig)
    local: ViewConfig = field(default_factory=_local_default)
    far: ViewConfig = field(default_factory=_far_default)
    cluster: ClusterConfig = field(default_factory=ClusterConfig)
    confidence: ConfidenceConfig = field(default_factory=ConfidenceConfig)
    #: Whether the user set walk keys; only then is the walk budget left as given.
    walks_given: bool = field(default=False, compare=False)
    #: Whether the user set the skip-gram window; only then is it kept for large networks.
    window_given: bool = field(default=False, compare=False)
    #: Whether the user set the skip-gram epochs; only then are they kept for small networks.
    epochs_given: bool = field(default=False, compare=False)

    def __post_init__(self) -> None:
        _check_int("the configuration", "seed", self.seed, 0, 2**32 - 1)

    @property
    def views(self) -> dict[str, ViewConfig]:
        return {"local": self.local, "far": self.far}

    def with_seed(self, seed: int | None) -> Config:
        """Return a copy with ``seed`` replaced (``None`` keeps the current one)."""
        return self if seed is None else dataclasses.replace(self, seed=seed)

    def as_dict(self) -> dict[str, Any]:
        """The configuration in the same shape as the TOML file."""
        return {
            "seed": self.seed,
            "walks": dataclasses.asdict(self.walks),
            "embedding": dataclasses.asdict(self.embedding),
            "views": {name: {"p": view.p, "q": view.q} for name, view in self.views.items()},
            "cluster": dataclasses.asdict(self.cluster),
            "confidence": dataclasses.asdict(self.confidence),
        }


_SECTIONS = {
    "walks": WalkConfig,
    "embedding": EmbeddingConfig,
    "cluster": ClusterConfig,
    "confidence": ConfidenceConfig,
}


def _fields(cls: type) -> list[str]:
    return [f.name for f in dataclasses.fields(cls) if f.name != "name"]


def _section(data: Any, label: str, cls: type, **extra: Any) -> Any:
    if not isinstance(data, Mapping):
        raise ConfigError(f"{label} must be a table of keys. Got {_got(data)} instead.")
    allowed = _fields(cls)
    unknown = sorted(set(data) - set(allowed))
    if unknown:
        raise ConfigError(
            f"Unknown key {unknown[0]!r} in {label}. Allowed keys: {', '.join(allowed)}."
        )
    return cls(**dict(data), **extra)


def config_from_mapping(data: Mapping[str, Any]) -> Config:
    """Build a :class:`Config` from a parsed TOML document, refusing unknown keys."""
    top = {"seed", "walks", "embedding", "views", "cluster", "confidence"}
    unknown = sorted(set(data) - top)
    if unknown:
        raise ConfigError(
            f"Unknown key {unknown[0]!r} at the top of the configuration. "
            f"Allowed keys: {', '.join(sorted(top))}."
        )
    kwargs: dict[str, Any] = {}
    if "seed" in data:
        kwargs["seed"] = data["seed"]
    for key, cls in _SECTIONS.items():
        if key in data:
            kwargs[key] = _section(data[key], f"[{key}]", cls)
    kwargs["walks_given"] = bool(data.get("walks"))
    embedding = data.get("embedding")
    kwargs["window_given"] = isinstance(embedding, Mapping) and "window" in embedding
    kwargs["epochs_given"] = isinstance(embedding, Mapping) and "epochs" in embedding
    if "views" in data:
        views = data["views"]
        if not isinstance(views, Mapping):
            raise ConfigError(f"[views] must be a table of keys. Got {_got(views)} instead.")
        unknown = sorted(set(views) - {"local", "far"})
        if unknown:
            raise ConfigError(f"Unknown view {unknown[0]!r} in [views]. Allowed views: local, far.")
        defaults = {"local": _local_default(), "far": _far_default()}
        for name in ("local", "far"):
            if name in views:
                base = dataclasses.asdict(defaults[name])
                base.pop("name")
                section = views[name]
                if isinstance(section, Mapping):
                    base.update(section)
                    section = base
                kwargs[name] = _section(section, f"[views.{name}]", ViewConfig, name=name)
    return Config(**kwargs)


def load_config(path: str | Path | None) -> Config:
    """Read a TOML configuration file; ``None`` gives the defaults.

    Raises
    ------
    ConfigError
        When the file is missing, is not valid TOML, or holds unknown keys or bad values.
    """
    if path is None:
        return Config()
    p = Path(path)
    shown = str(p) if len(str(p)) <= 120 else str(p)[:60] + "..." + str(p)[-60:]
    try:
        if not p.is_file():
            raise ConfigError(f"{shown}: the configuration file does not exist or is not a file.")
        size = p.stat().st_size
        if size > MAX_CONFIG_BYTES:
            raise ConfigError(
                f"{shown}: the configuration file is {size:,} bytes; a configuration holds a "
                f"few settings, at most {MAX_CONFIG_BYTES:,} bytes. Check that this is the "
                "right file."
            )
        with open(p, "rb") as fh:
            raw = fh.read(MAX_CONFIG_BYTES + 1)
    except OSError as exc:
        raise ConfigError(
            f"{shown}: the configuration file cannot be read ({exc.strerror or exc})."
        ) from None
    try:
        data = tomllib.loads(raw.decode("utf-8-sig"))
    except UnicodeDecodeError as exc:
        raise ConfigError(f"{shown}: the configuration file is not UTF-8 text ({exc}).") from None
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{shown}: the configuration is not valid TOML: {exc}.") from None
    except RecursionError:
        raise ConfigError(
            f"{shown}: the configuration cannot be read: its arrays or tables are nested too "
            "deeply. No setting needs more than two levels; remove the nesting."
        ) from None
    except Exception as exc:  # whatever else a parser can raise on hostile text
        raise ConfigError(
            f"{shown}: the configuration cannot be read ({type(exc).__name__}). "
            "Check that it is a TOML file as described in the README."
        ) from None
    try:
        return config_from_mapping(data)
    except ConfigError as exc:
        raise ConfigError(f"{shown}: {exc}") from None
    except (TypeError, ValueError, RecursionError) as exc:
        raise ConfigError(
            f"{shown}: a value of the configuration has the wrong form "
            f"({type(exc).__name__}: {_got(str(exc))})."
        ) from None
