"""Files of one run in an output directory: results.json, members.csv, histories.csv, plots, report.html.

:func:`write_outputs` is the one entry point (the CLI's ``--out DIR`` calls it). Everything is
rendered in memory first (the result document, the CSV files, the figures, the HTML report), then
written to temporary names inside DIR and renamed into place only when every file is complete; on
any failure the temporary files are removed, so no half-written file is ever left in DIR. Nothing
outside DIR is written, and the case file is only read (for its SHA-256 in the run stamp).

The report and the CSV files are formatted from the *document* (``result.to_dict()`` plus a run
stamp, the case inputs and a summary), round-tripped through JSON, so that every number the report
shows is the number in results.json, character for character up to a trailing ``.0``.

No physics here: the numbers come from the result objects; this module only arranges and writes them.
"""

from __future__ import annotations

import os
import secrets
import time
from dataclasses import dataclass, field
from pathlib import Path

from steelfire.errors import InputError
from steelfire.outputs import document, tables

#: Names of the files a run writes (figures add ``fig_<name>.png`` / ``.svg``).
RESULTS_JSON = "results.json"
MEMBERS_XLSX = "members.xlsx"
MEMBERS_CSV = "members.csv"
HISTORIES_CSV = "histories.csv"
REPORT_HTML = "report.html"

#: Suffix of the temporary files (hidden names, removed on failure).
_TMP_SUFFIX = ".part"


@dataclass
class WrittenOutputs:
    """What :func:`write_outputs` wrote: the directory, the file names, wall times [s] per stage."""

    out_dir: Path
    files: list
    timings_s: dict = field(default_factory=dict)
    document: dict = field(default=None, repr=False)


# ----------------------------------------------------------------------------------------------
# the directory


def output_targets() -> list:
    """Every file name a run may write into its output directory."""
    from steelfire.outputs.report.plots import FIGURE_NAMES

    return [RESULTS_JSON, MEMBERS_CSV, MEMBERS_XLSX, HISTORIES_CSV, REPORT_HTML] + \
        [f"fig_{n}.{x}" for n in FIGURE_NAMES for x in ("png", "svg")]


def check_out_dir(out_dir, inputs=()) -> Path:
    """Refuse an output directory that cannot receive the files, writing nothing.

    Raises ``InputError("--out", ...)`` for an empty name, an existing regular file, a directory that is
    not writable, a path under a regular file, a path that cannot be resolved (a symlink loop), a target
    name taken by anything but a regular file (a folder, a device, a pipe), or a target that is one of the
    ``inputs`` (case file, schedule, tables: compared by resolved path and by inode). A missing directory
    is fine (:func:`write_outputs` creates it). The CLI calls this before the analysis so that a bad
    ``--out`` fails fast; :func:`write_outputs` calls it again.
    """
    if out_dir is None or str(out_dir).strip() == "":
        raise InputError("--out", out_dir, "must name a directory")
    out = Path(out_dir)
    try:
        _check_out_dir(out, output_targets())
        _guard_inputs(out, output_targets(), inputs)
    except InputError:
        raise
    except (OSError, RuntimeError) as exc:
        raise InputError("--out", str(out), f"cannot be used ({getattr(exc, 'strerror', None) or type(exc).__name__})") \
            from None
    return out


def _check_out_dir(out: Path, targets) -> None:
    import stat

    field_name = "--out"
    out.resolve(strict=False)   # a symlink loop raises here
    if out.exists() or out.is_symlink():
        if not out.is_dir():
            raise InputError(field_name, str(out), "is an existing file, not a directory; name a directory")
        if not os.access(out, os.W_OK | os.X_OK):
            raise InputError(field_name, str(out), "is a directory that is not writable")
        for name in targets:
            p = out / name
            try:
                st = os.lstat(p)
            except FileNotFoundError:
                continue
            if not stat.S_ISREG(st.st_mode):
                raise InputError(field_name, str(out), f"holds {name!r}, which is not a regular file; steelfire "
                                 "replaces only regular files")
        return
    parent = out.parent
    while not parent.exists():
        if parent == parent.parent:
            break
        parent = parent.parent
    if not parent.is_dir():
        raise InputError(field_name, str(out), f"cannot be created: {str(parent)!r} is not a directory")
    if not os.access(parent, os.W_OK | os.X_OK):
        raise InputError(field_name, str(out), f"cannot be created: {str(parent)!r} is not writable")


def same_file(a: Path, b: Path) -> bool:
    """Whether two paths name the same file (resolved path, or device and inode)."""
    try:
        if a.resolve() == b.resolve():
            return True
        sa, sb = os.stat(a), os.stat(b)
        return (sa.st_dev, sa.st_ino) == (sb.st_dev, sb.st_ino)
    except (OSError, RuntimeError, ValueError):  # unreadable, a symlink loop, a NUL in the path
        return False


def _guard_inputs(out: Path, targets, inputs) -> None:
    """Refuse to write over any input of the case (case file, schedule, fire and heat-release tables)."""
    existing = [Path(p) for p in inputs if p is not None and Path(p).exists()]
    for name in targets:
        t = out / name
        if t.exists() and any(same_file(t, p) for p in existing):
            raise InputError("--out", str(out), f"would overwrite the input file {name!r}; choose another directory")


def remove_stale_parts(out: Path, targets) -> None:
    """Remove the hidden temporary files an interrupted earlier run left for these targets."""
    for name in targets:
        for stale in out.glob(f".{name}.*{_TMP_SUFFIX}"):
            try:
                if stale.is_file() and not stale.is_symlink():
                    stale.unlink()
            except OSError:
                pass


def _write_temp(out: Path, name: str, data: bytes) -> Path:
    """Write ``data`` to a new hidden temporary file in ``out``; returns its path."""
    tmp = out / f".{name}.{secrets.token_hex(6)}{_TMP_SUFFIX}"
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    return tmp


def _commit(out: Path, payloads: dict) -> list:
    """All payloads to temporary names first, then renamed into place; temporaries removed on failure."""
    created = []
    p = out
    while not p.exists():
        created.append(p)
        p = p.parent
    out.mkdir(parents=True, exist_ok=True)
    temps = []
    renamed = set()
    try:
        for name, data in payloads.items():
            temps.append((_write_temp(out, name, data), name))
        for tmp, name in temps:
            os.replace(tmp, out / name)
            renamed.add(tmp)
    except BaseException:
        for tmp, _ in temps:
            if tmp not in renamed:
                try:
                    os.unlink(tmp)
                except OSError:
                    pass
        if not renamed:
            for d in created:  # leaf first; only directories this run made, and only if empty
                try:
                    d.rmdir()
                except OSError:
                    break
        raise
    return [name for _, name in temps]


def write_outputs(result, out_dir, case_path=None, command: str | None = None, *, case=None, now=None,
                  sections=None) -> WrittenOutputs:
    """Write the files of a run into ``out_dir`` (created if missing).

    Files: results.json (the document: ``result.to_dict()`` plus the run stamp, the case inputs, the
    summary; every number the report shows), members.csv, histories.csv (needs
    ``analyse(case, histories=True)``; without histories only time and gas are written), the figures
    as PNG and SVG (``fig_*.png``, ``fig_*.svg``) and report.html (self-contained, prints to A4).

    Parameters
    ----------
    result : AnalysisResult
        From :func:`steelfire.analyse`.
    out_dir : str or Path
        The output directory. An existing regular file, or a directory that cannot be written,
        raises :class:`InputError` (``"--out"``) before anything is written.
    case_path : str or Path, optional
        The case file: only read, for its SHA-256 in the run stamp (and its inputs, unless ``case``
        is given). None for a case built in memory.
    command : str
        The command the run stamp names ("check", "size").
    case : Case, optional
        The case model the result came from, for the input tables (loaded from ``case_path`` if omitted).
    now : datetime, optional
        The time of the run stamp (default: now, UTC).
    sections : dict, optional
        More top-level sections of the document (``{"variability": ...}`` of a ``sample`` run): written
        into results.json and shown by the report.

    Files of an earlier run that this run does not write (a thickness figure of an earlier sizing run)
    are left alone; ``results.json["report"]["files"]`` lists the files of this run.

    Returns :class:`WrittenOutputs` (directory, file names, wall times per stage [s]).
    """
    from steelfire.outputs.report import html as report_html
    from steelfire.outputs.report import plots

    inputs = ([case_path] if case_path is not None else []) + (list(case.inputs) if case is not None else [])
    out = check_out_dir(out_dir, inputs)
    if out.is_dir():
        remove_stale_parts(out, output_targets())

    timings = {}
    t0 = time.perf_counter()
    doc = document.full(result, case=case, case_path=case_path, command=command or result.command, now=now)
    doc.update(sections or {})
    hist_text, hist_names = tables.histories_csv(result)
    doc["report"] = plots.plan(doc, hist_names)
    xlsx = tables.members_xlsx(doc)
    doc["report"]["files"] = [RESULTS_JSON, MEMBERS_CSV] + ([MEMBERS_XLSX] if xlsx is not None else []) + \
        [HISTORIES_CSV] + [f"fig_{n}.{x}" for n in doc["report"]["figures"] for x in ("png", "svg")] + [REPORT_HTML]
    timings["document_s"] = time.perf_counter() - t0

    t0 = time.perf_counter()
    figures = plots.render_figures(doc, result)
    timings["plots_s"] = time.perf_counter() - t0

    t0 = time.perf_counter()
    page = report_html.render_report(doc, figures)
    timings["html_s"] = time.perf_counter() - t0

    payloads = {RESULTS_JSON: document.dumps(doc) + b"\n",
                MEMBERS_CSV: tables.members_csv(doc).encode("utf-8"),
                HISTORIES_CSV: hist_text.encode("utf-8")}
    if xlsx is not None:
        payloads[MEMBERS_XLSX] = tables.members_xlsx(doc)
    for fig in figures:
        payloads[f"fig_{fig.name}.png"] = fig.png
        payloads[f"fig_{fig.name}.svg"] = fig.svg.encode("utf-8")
    payloads[REPORT_HTML] = page.encode("utf-8")

    t0 = time.perf_counter()
    files = _commit(out, payloads)
    timings["write_s"] = time.perf_counter() - t0
    return WrittenOutputs(out_dir=out, files=files, timings_s=timings, document=doc)

