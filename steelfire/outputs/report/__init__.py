"""The report layer: figures (:mod:`steelfire.report.plots`) and the HTML report (:mod:`steelfire.report.html`).

It reads the result document (results.json) and the result objects and never recomputes physics.
matplotlib is imported only when figures are drawn. Files are written by :func:`steelfire.output.write_outputs`.
"""

__all__ = ["plots", "html"]
