"""The bundled invented scenarios behind ``roles demo``."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from ._resources import data_dir
from .errors import ConfigError

__all__ = ["Scenario", "scenario", "SCENARIOS"]


@dataclass(frozen=True)
class Scenario:
    """Files and report settings of one invented example."""

    name: str
    edges: Path
    nodes: Path
    directed: bool
    kind: str
    group_by: str
    title: str
    #: For a change report: the earlier snapshot's edges and nodes (``None`` otherwise).
    before_edges: Path | None = None
    before_nodes: Path | None = None


def _dir() -> Path:
    return data_dir("roles.scenarios", "examples")


SCENARIOS = {
    "company": dict(
        edges="company_edges.csv",
        nodes="company_people.csv",
        directed=False,
        kind="organisation",
        group_by="department",
        title="Tessary Works: who works with whom (invented example)",
    ),
    "suppliers": dict(
        edges="suppliers_edges.csv",
        nodes="suppliers_firms.csv",
        directed=True,
        kind="supply",
        group_by="tier",
        title="Calder Motive: supplier dependencies (invented example)",
    ),
    "company-year": dict(
        edges="company_year_edges.csv",
        nodes="company_year_people.csv",
        before_edges="company_edges.csv",
        before_nodes="company_people.csv",
        directed=False,
        kind="organisation",
        group_by="department",
        title="Tessary Works: a year on (invented example)",
    ),
}


def scenario(name: str) -> Scenario:
    """The scenario called ``name`` ('company', 'suppliers' or 'company-year')."""
    if name not in SCENARIOS:
        raise ConfigError(f"Unknown scenario {name!r}. Choose one of: {', '.join(SCENARIOS)}.")
    spec = SCENARIOS[name]
    base = _dir()
    return Scenario(
        name=name,
        edges=base / str(spec["edges"]),
        nodes=base / str(spec["nodes"]),
        directed=bool(spec["directed"]),
        kind=str(spec["kind"]),
        group_by=str(spec["group_by"]),
        title=str(spec["title"]),
        before_edges=base / str(spec["before_edges"]) if "before_edges" in spec else None,
        before_nodes=base / str(spec["before_nodes"]) if "before_nodes" in spec else None,
    )
