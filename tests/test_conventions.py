"""Command-line conventions: --version, the exit statuses in --help, the package metadata."""

from __future__ import annotations

import tomllib

import pytest
from _cli import ROOT, roles

import roles as package
from roles.cli import build_parser


def test_version_comes_from_the_package(capsys):
    with pytest.raises(SystemExit) as stop:
        build_parser().parse_args(["--version"])
    assert stop.value.code == 0
    assert capsys.readouterr().out.strip() == f"roles {package.__version__}"
    # One source: pyproject.toml reads the version from roles._version.__version__.
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    assert "version" not in meta["project"]
    assert "version" in meta["project"]["dynamic"]
    assert meta["tool"]["setuptools"]["dynamic"]["version"] == {
        "attr": "roles._version.__version__"
    }


@pytest.mark.parametrize("argv", [[], ["report"], ["compare"], ["embed"], ["demo"]])
def test_help_lists_the_exit_statuses(argv, capsys):
    with pytest.raises(SystemExit):
        build_parser().parse_args([*argv, "--help"])
    text = capsys.readouterr().out
    table = text[text.index("exit status:") :]
    for status in ("0", "1", "2", "130"):
        assert f"\n  {status} " in table
    # The table keeps its own lines (argparse would otherwise reflow it).
    assert "\n  130  interrupted (Ctrl-C)" in table


def test_version_from_the_command_line():
    done = roles("--version")
    assert done.returncode == 0
    assert done.stdout.strip() == f"roles {package.__version__}"


def _name(requirement: str) -> str:
    """The normalised distribution name of a requirement (PEP 503)."""
    import re

    return re.sub(r"[-_.]+", "-", re.split(r"[<>=!~;\[ ]", requirement, maxsplit=1)[0]).lower()


def test_floors_are_the_pinned_versions():
    """Every dependency's floor is the version constraints.txt pins (the tested one)."""
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    assert meta["requires-python"] == ">=3.11"
    assert meta["name"] == "roles-network-report"
    pins = {}
    for line in (ROOT / "constraints.txt").read_text(encoding="utf-8").splitlines():
        if line and not line.startswith("#"):
            name, _, version = line.partition("==")
            pins[_name(name)] = version.strip()
    required = meta["dependencies"] + meta["optional-dependencies"]["test"]
    for requirement in required:
        floor = requirement.split(">=", 1)[1].split(";")[0].strip()
        assert pins[_name(requirement)] == floor, requirement


def test_versions_block_names_what_shapes_the_results():
    from roles.pipeline import _versions

    versions = _versions()
    assert versions["roles"] == package.__version__
    for pkg in ("numpy", "networkx", "gensim", "scikit-learn", "hdbscan", "numba", "weasyprint"):
        assert versions[pkg] != "not installed", pkg
