"""The printed report: result -> HTML (jinja2) -> PDF (WeasyPrint)."""

from .render import render_html, render_report, write_pdf

__all__ = ["render_report", "render_html", "write_pdf"]
