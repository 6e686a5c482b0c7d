"""Result -> report.html (jinja2, autoescaped) -> report.pdf (WeasyPrint).

The PDF renderer fetches nothing but the project's own templates: every other URL is
refused, so a node name that looks like markup or a link stays inert text.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import jinja2

from .._resources import data_dir
from ..results import Result
from .context import build_context
from .names import NAME_LIMIT, printed_names

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


def render_html(context: dict[str, Any], template: str = "report.html") -> str:
    """The report (or another page of ``templates/``) as one self-contained HTML
    document."""
    env = _environment()
    css = (template_dir() / "report.css").read_text(encoding="utf-8")
    css = css.replace("@PAPER@", "A4" if context.get("paper") == "A4" else "letter")
    return env.get_template(template).render(css=css, name_limit=NAME_LIMIT, **context)


def _refuse(url: str) -> ValueError:
    return ValueError(f"the report renderer fetches only data: URIs, not {url[:60]!r}")


def _url_fetcher() -> Any:
    """A WeasyPrint URL fetcher that serves ``data:`` URIs and refuses everything else.

    The figures embed their raster parts as ``data:`` URIs; any other URL (``file:``,
    ``http:``, a relative path) is refused, so nothing in the data can make the
    renderer read a local file or reach the network. Recent WeasyPrint releases take a
    :class:`weasyprint.urls.URLFetcher` subclass; older releases a plain function.
    """
    import weasyprint
    import weasyprint.urls

    base = getattr(weasyprint.urls, "URLFetcher", None)
    if isinstance(base, type):

        class _DataOnly(base):  # type: ignore[misc, valid-type]
            def fetch(self, url: str, headers: Any = None) -> Any:
                if not url.startswith("data:"):
                    raise _refuse(url)
                return super().fetch(url, headers)

        return _DataOnly(allowed_protocols=("data",), allow_redirects=False)

    legacy = weasyprint.default_url_fetcher

    def _data_only(url: str, *args: Any, **kwargs: Any) -> Any:
        if not url.startswith("data:"):
            raise _refuse(url)
        return legacy(url, *args, **kwargs)

    return _data_only


def write_pdf(html: str, path: Path) -> None:
    """Render ``html`` to a PDF at ``path`` without fetching anything from outside."""
    import logging

    import weasyprint

    for name in ("weasyprint", "weasyprint.progress", "fontTools"):
        logging.getLogger(name).setLevel(logging.ERROR)
    doc = weasyprint.HTML(string=html, base_url=str(template_dir()), url_fetcher=_url_fetcher())
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
    pseudonymized: bool = False,
    pdf: bool = True,
) -> None:
    """Write ``report.html`` and (when ``pdf``) ``report.pdf`` for ``result`` into
    ``folder``.

    Names longer than :data:`roles.report.names.NAME_LIMIT` are printed shortened.
    """
    context = build_context(
        printed_names(result),
        title=title,
        kind=kind,
        paper=paper,
        min_group_size=min_group_size,
        made=made,
        pseudonymized=pseudonymized,
    )
    html = render_html(context)
    (Path(folder) / "report.html").write_text(html, encoding="utf-8")
    if pdf:
        write_pdf(html, Path(folder) / "report.pdf")
