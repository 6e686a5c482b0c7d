"""The printed report: typed results -> sentences (notes, context), figures, HTML
(jinja2, render) -> PDF (WeasyPrint, render). Import the module you need, e.g.
``from roles.report.render import render_report``; this package file loads nothing, so
a stage may use the report's wording (:mod:`roles.report.notes`) without the renderer."""
