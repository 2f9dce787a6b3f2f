"""The report layer: figures (:mod:`.plots`) and the self-contained HTML report (:mod:`.html`, from the
template ``report.html.j2`` and the stylesheet ``report.css`` of this folder).

It reads the result document (results.json) and, for the time histories of the figures, the result
objects; it never recomputes physics. matplotlib and jinja2 are imported only when figures or a page
are rendered. Files are written by :func:`steelfire.outputs.files.write_outputs`.
"""

__all__ = ["plots", "html"]
