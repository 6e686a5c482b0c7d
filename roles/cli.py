"""The ``roles`` command: parse options, call the pipeline, map errors to exit codes.

Exit status: 0 success, 2 a problem with the input or options (one ``error:`` line),
130 interrupted by Ctrl-C (SIGINT), 143 stopped by SIGTERM, 1 out of memory (one
``error:`` line) or an unexpected internal error (a traceback).
"""

from __future__ import annotations

import argparse
import logging
import sys
from concurrent.futures.process import BrokenProcessPool
from pathlib import Path

from ._version import __version__
from .errors import RolesError
from .workers import exit_status, signals_stop_run

__all__ = ["main", "build_parser"]

log = logging.getLogger("roles")

EXAMPLES = Path(__file__).resolve().parent / "examples"


def _add_input(p: argparse.ArgumentParser, *, edges: bool = True) -> None:
    if edges:
        p.add_argument(
            "edges",
            metavar="EDGES",
            help="the network: a CSV or TSV edge list with a header row "
            "(source,target[,weight]), a GraphML file or a node-link JSON file",
        )
    p.add_argument(
        "--out",
        required=True,
        metavar="DIR",
        help="folder to write the results into (created if needed; files of an "
        "earlier run there are replaced only when this run succeeds)",
    )
    p.add_argument(
        "--config",
        metavar="FILE",
        help="TOML file of parameters; every key is optional (see the README)",
    )
    p.add_argument(
        "--seed",
        type=int,
        metavar="N",
        help="random seed; overrides the seed in --config. Same seed, same input: same results",
    )
    p.add_argument(
        "--directed",
        action="store_true",
        help="read each tie as pointing from source to target (for supply "
        "networks: supplier to customer)",
    )
    p.add_argument(
        "--source-column",
        default="source",
        metavar="NAME",
        help="header of the column holding the first member of each tie (default: source)",
    )
    p.add_argument(
        "--target-column",
        default="target",
        metavar="NAME",
        help="header of the column holding the second member (default: target)",
    )
    p.add_argument(
        "--weight-column",
        default="weight",
        metavar="NAME",
        help="header of the tie-strength column, if any (default: weight; "
        "ties count 1 when the column is absent)",
    )
    p.add_argument("--quiet", action="store_true", help="print nothing but errors")
    p.add_argument(
        "--debug", action="store_true", help="on an error, show the full Python traceback too"
    )
    p.add_argument(
        "--no-work-limit",
        action="store_true",
        help="run even when the estimated walks need more than half the memory or the "
        "training would take over an hour (refused otherwise, before any work)",
    )


def _add_pseudonym_options(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--pseudonymize",
        action="store_true",
        help="replace every member's name by a code in every output (also names in "
        "attribute columns such as a manager column, and the input file names); codes "
        "are keyed hashes that follow no order of the names. Codes do not make the "
        "data anonymous: a position in the network can still identify someone",
    )
    p.add_argument(
        "--key-file",
        metavar="FILE",
        help="with --pseudonymize: keep the secret key and the code-to-name list in FILE "
        "(written for the owner only; keep it apart from the report). When FILE holds "
        "the key of an earlier run, that key is used again, so the same names get the "
        "same codes. Without it, the codes of this run cannot be traced back",
    )


def _add_report_options(p: argparse.ArgumentParser, *, nodes_twice: bool = False) -> None:
    if nodes_twice:
        p.add_argument(
            "--nodes",
            action="append",
            metavar="FILE",
            help="CSV of member attributes (a 'node' column plus any others); once for "
            "both snapshots, or twice: first for OLD, then for NEW",
        )
    else:
        p.add_argument(
            "--nodes",
            metavar="FILE",
            help="CSV of member attributes: a 'node' column plus any others "
            "(department, site, tier...); members listed only here are kept "
            "as members without ties",
        )
    p.add_argument(
        "--title", default=None, metavar="TEXT", help="title printed on the cover of the report"
    )
    p.add_argument(
        "--kind",
        choices=["organisation", "supply", "general"],
        default="general",
        help="wording of the report: 'organisation' speaks of people and teams, "
        "'supply' of firms, suppliers and customers (default: general)",
    )
    p.add_argument(
        "--group-by",
        metavar="COLUMN",
        help="a column of --nodes holding formal groups (department, tier) to "
        "compare with the communities found",
    )
    p.add_argument(
        "--min-group-size",
        type=int,
        default=5,
        metavar="N",
        help="never report on an attribute group smaller than N members (default: 5)",
    )
    _add_pseudonym_options(p)
    p.add_argument(
        "--remove",
        action="append",
        metavar="NAME",
        help="a member to take out in the 'if members were gone' scenario; repeat it to "
        "take several out together (replaces the scenarios chosen by default)",
    )
    p.add_argument(
        "--remove-file",
        metavar="FILE",
        help="like --remove, for every name in FILE (one name per line)",
    )
    p.add_argument(
        "--paper",
        choices=["a4", "letter"],
        default="a4",
        help="paper size of the PDF (default: a4)",
    )
    p.add_argument(
        "--no-pdf",
        action="store_true",
        help="write every output but report.pdf (for a machine without the PDF "
        "library, Pango; report.html holds the same report and prints from a browser)",
    )


class _Parser(argparse.ArgumentParser):
    """argparse with our one-line error shape: ``error: ...``, exit status 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(2, f"error: {message} (see '{self.prog} --help')\n")


def _interrupted(exc: BaseException) -> KeyboardInterrupt | None:
    """The Ctrl-C or SIGTERM behind ``exc``, if any (an import cut short re-raises it
    as ImportError)."""
    seen: set[int] = set()
    cur: BaseException | None = exc
    while cur is not None and id(cur) not in seen:
        if isinstance(cur, KeyboardInterrupt):
            return cur
        seen.add(id(cur))
        cur = cur.__cause__ or cur.__context__
    return None


EXIT_STATUSES = """exit status:
  0    success: every output is written
  1    an unexpected internal error (a bug: please report it with --debug's traceback)
  2    a problem with the input, the options or the system, told in one 'error:' line;
       nothing is written
  1    also: out of memory, or a worker process lost (one 'error:' line)
  130  interrupted (Ctrl-C); the output folder holds its earlier files or this run's
       complete outputs, never a mix
  143  stopped by SIGTERM, with the same guarantee
"""


class _Formatter(argparse.HelpFormatter):
    """argparse's formatter, but the exit-status table keeps its lines."""

    def _fill_text(self, text: str, width: int, indent: str) -> str:
        if text is EXIT_STATUSES:
            return text
        return super()._fill_text(text, width, indent)


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="roles",
        description="Find a network's communities, the members that bridge them, its hubs "
        "and its single points of failure, and write a printed report.",
        epilog=EXIT_STATUSES,
        formatter_class=_Formatter,
    )
    parser.add_argument("--version", action="version", version=f"roles {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    rep = sub.add_parser(
        "report",
        help="the whole job: analyse a network and write the report",
        description="Analyse a network and write report.pdf, report.html, nodes.csv, "
        "summary.json and graph.graphml into --out.",
    )
    _add_input(rep)
    _add_report_options(rep)
    emb = sub.add_parser(
        "embed",
        help="compute the two node2vec views only and write their vectors",
        description="Compute the local and far node2vec views and write local.csv, far.csv "
        "and summary.json into --out.",
    )
    _add_input(emb)
    _add_pseudonym_options(emb)
    emb.add_argument(
        "--keep-walks",
        action="store_true",
        help="also write the random walks (local.walks.tsv, far.walks.tsv)",
    )
    cmp = sub.add_parser(
        "compare",
        help="analyse two snapshots of one network alike and report what changed",
        description="Analyse OLD and NEW with the same parameters and seed, join their "
        "members by name, and write report.pdf, report.html and changes.json into --out, "
        "with each snapshot's own full outputs in old/ and new/.",
    )
    cmp.add_argument("old", metavar="OLD", help="the earlier snapshot's edge list")
    cmp.add_argument("new", metavar="NEW", help="the later snapshot's edge list")
    _add_input(cmp, edges=False)
    _add_report_options(cmp, nodes_twice=True)
    demo = sub.add_parser(
        "demo",
        help="write the report of a bundled invented example",
        description="Write the report of one of the bundled invented scenarios.",
    )
    demo.add_argument(
        "--out",
        default="demo-report",
        metavar="DIR",
        help="folder to write the demo report into (default: demo-report)",
    )
    demo.add_argument(
        "--scenario",
        choices=["company", "suppliers", "company-year"],
        default="company",
        help="'company': a made-up firm's collaboration network; 'suppliers': "
        "a made-up manufacturer's supplier network; 'company-year': the same firm a "
        "year on, compared with the first snapshot (a change report) (default: company)",
    )
    demo.add_argument("--seed", type=int, metavar="N", help="random seed")
    demo.add_argument("--no-pdf", action="store_true", help="write every output but report.pdf")
    demo.add_argument("--quiet", action="store_true", help="print nothing but errors")
    demo.add_argument("--debug", action="store_true", help="show tracebacks on errors")
    for command in sub.choices.values():
        command.epilog = EXIT_STATUSES
        command.formatter_class = _Formatter
    return parser


def _demo_args(args: argparse.Namespace) -> argparse.Namespace:
    from .demo import scenario

    s = scenario(args.scenario)
    if s.before_edges is not None:
        extra = dict(
            command="compare",
            old=str(s.before_edges),
            new=str(s.edges),
            nodes=[str(s.before_nodes), str(s.nodes)],
        )
    else:
        extra = dict(command="report", edges=str(s.edges), nodes=str(s.nodes))
    return argparse.Namespace(
        **extra,
        out=args.out,
        config=None,
        seed=args.seed,
        directed=s.directed,
        source_column="source",
        target_column="target",
        weight_column="weight",
        quiet=args.quiet,
        debug=args.debug,
        title=s.title,
        kind=s.kind,
        group_by=s.group_by,
        min_group_size=5,
        pseudonymize=False,
        key_file=None,
        paper="a4",
        no_pdf=args.no_pdf,
        remove=None,
        remove_file=None,
        no_work_limit=False,
    )


def _dispatch(args: argparse.Namespace) -> None:
    from . import commands

    if args.command == "demo":
        args = _demo_args(args)
    if args.command == "report":
        commands.report(args)
    elif args.command == "embed":
        commands.embed(args)
    elif args.command == "compare":
        commands.compare(args)


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not args.command:
        parser.print_help(sys.stderr)
        return 2
    # Only our own logger speaks; the libraries' chatter (gensim, WeasyPrint) stays off.
    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(logging.Formatter("%(message)s"))
    log.handlers[:] = [handler]
    log.propagate = False
    log.setLevel(logging.WARNING if args.quiet else logging.INFO)
    try:
        with signals_stop_run():
            _dispatch(args)
    except RolesError as exc:
        if args.debug:
            raise
        print(f"error: {exc}", file=sys.stderr)
        return 2
    except (MemoryError, BrokenProcessPool) as exc:
        if args.debug:
            raise
        what = (
            "ran out of memory"
            if isinstance(exc, MemoryError)
            else ("lost a worker process (the system may have run out of memory)")
        )
        print(
            f"error: the run {what}. Lower walks_per_node or walk_length in [walks], or "
            "dimensions in [embedding], or run on a machine with more memory. Nothing "
            "was written.",
            file=sys.stderr,
        )
        return 1
    except BaseException as exc:
        stop = _interrupted(exc)
        if args.debug or stop is None:
            raise
        print(
            "error: interrupted. The output folder holds either its earlier files or this "
            "run's complete outputs, never a mix.",
            file=sys.stderr,
        )
        return exit_status(stop)
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
