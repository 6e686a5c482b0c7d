"""Result -> report.html (jinja2, autoescaped) -> report.pdf (WeasyPrint).

The PDF renderer fetches nothing but the project's own templates: every other URL is
refused, so a node name that looks like markup or a link stays inert text.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import jinja2

from .._resources import data_dir
from ..pipeline import Result
from .context import build_context

__all__ = ["render_report", "render_html", "write_pdf", "template_dir"]


def template_dir() -> Path:
    """Where report.html and report.css live (installed or in the source tree)."""
    return data_dir("roles.templates", "templates")


def _environment() -> jinja2.Environment:
    return jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(template_dir())),
        autoescape=True,  # everything, whatever the template's extension
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
    )


def render_html(context: dict[str, Any]) -> str:
    """The report as one self-contained HTML document."""
    env = _environment()
    css = (template_dir() / "report.css").read_text(encoding="utf-8")
    css = css.replace("@PAPER@", "A4" if context.get("paper") == "A4" else "letter")
    return env.get_template("report.html").render(css=css, **context)


def _no_fetch(url: str, *args: Any, **kwargs: Any) -> dict[str, Any]:
    import weasyprint

    if url.startswith("data:"):
        return weasyprint.default_url_fetcher(url, *args, **kwargs)
    raise ValueError(f"the report renderer does not fetch {url[:60]!r}")


def write_pdf(html: str, path: Path) -> None:
    """Render ``html`` to a PDF at ``path`` without fetching anything from outside."""
    import logging

    import weasyprint

    logging.getLogger("weasyprint").setLevel(logging.ERROR)
    logging.getLogger("fontTools").setLevel(logging.ERROR)
    doc = weasyprint.HTML(string=html, base_url=str(template_dir()), url_fetcher=_no_fetch)
    doc.write_pdf(str(path))


def render_report(
    result: Result,
    folder: Path,
    *,
    title: str,
    kind: str,
    paper: str,
    min_group_size: int,
    made: str,
) -> None:
    """Write ``report.html`` and ``report.pdf`` for ``result`` into ``folder``."""
    context = build_context(
        result, title=title, kind=kind, paper=paper, min_group_size=min_group_size, made=made
    )
    html = render_html(context)
    (Path(folder) / "report.html").write_text(html, encoding="utf-8")
    write_pdf(html, Path(folder) / "report.pdf")
