"""Command line: ``steelfire check|size CASE [--json] [--time-step-s S] [--out DIR]``.

A thin layer over the Python API: it loads the case, runs it and prints. Exit codes: 0 every member
passes and meets its period, 1 some member does not, 2 bad input, 3 an internal error, 130 interrupted.
"""

from __future__ import annotations

import argparse
import os
import sys

EXIT_OK, EXIT_FAIL, EXIT_INPUT, EXIT_INTERNAL, EXIT_INTERRUPTED = 0, 1, 2, 3, 130


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2, no usage dump
        sys.stderr.write(f"steelfire: error: {message} (see steelfire --help)\n")
        raise SystemExit(EXIT_INPUT)


def _parser():
    p = _Parser(prog="steelfire",
                description="Fire resistance of steel members: design fire, steel temperatures, verdicts.",
                epilog="Caution: simplified code methods (EN 1991-1-2, EN 1993-1-2) within their validity "
                       "limits; results to be verified by a competent fire engineer; national annexes, local "
                       "codes and the approving authority prevail. Exit codes: 0 every member passes, 1 some "
                       "member fails or is marginal (within the numerical error), 2 bad input (one line naming the "
                       "field), 3 an internal error (traceback written to a file), 130 interrupted.")
    from steelfire._version import __version__

    p.add_argument("--version", action="version", version=f"steelfire {__version__}")
    sub = p.add_subparsers(dest="command", required=True, parser_class=_Parser)
    c = sub.add_parser("check", help="check every member of a case against its critical temperature")
    z = sub.add_parser("size", help="least protection thickness per member (standard period and burnout)")
    for q in (c, z):
        q.add_argument("case", help="case file (TOML)")
        q.add_argument("--json", action="store_true", help="print the result document as JSON on stdout")
        q.add_argument("--time-step-s", default=None, metavar="S",  # a number, checked in _load
                       help="time step [s] (overrides analysis.time_step_s; bare steel <= 5 s, protected <= 30 s)")
        q.add_argument("--wide", action="store_true", help="terminal tables wider than 100 columns (names uncut)")
        q.add_argument("--no-histories", action="store_true",
                       help="with --out: no steel-temperature histories (histories.csv holds time and gas only)")
        q.add_argument("--allow-outside", action="store_true",
                       help="let the case read schedules and tables outside its own folder (absolute paths, ..)")
        q.add_argument("--out", default=None, metavar="DIR",
                       help="also write results.json, members.csv, histories.csv, figures (PNG, SVG) and a "
                            "self-contained report.html into DIR (created if missing)")
    s = sub.add_parser("sample", help="fire severity as a distribution: sample the compartment's [variability], "
                                      "probability that each member exceeds its critical temperature")
    s.add_argument("case", help="case file (TOML) with a [variability] table")
    s.add_argument("--json", action="store_true", help="print the result document with its variability section")
    s.add_argument("--time-step-s", default=None, metavar="S", help="time step [s] (overrides analysis.time_step_s)")
    s.add_argument("--out", default=None, metavar="DIR", help="also write the deterministic check's files, the "
                   "sampled inputs and per-member statistics (CSV) and their figures into DIR")
    s.add_argument("--wide", action="store_true", help="terminal tables wider than 100 columns (names uncut)")
    s.add_argument("--no-histories", action="store_true",
                   help="with --out: no steel-temperature histories (histories.csv holds time and gas only)")
    s.add_argument("--allow-outside", action="store_true",
                   help="let the case read schedules and tables outside its own folder (absolute paths, ..)")
    s.add_argument("--fires", default=None, metavar="N", help="number of sampled fires (overrides variability.fires)")
    s.add_argument("--seed", default=None, metavar="S", help="seed (overrides variability.seed); the same seed "
                   "gives the same answer whatever the workers")
    where = s.add_mutually_exclusive_group()
    where.add_argument("--workers", default=None, metavar="K", help="run on a local dask cluster of K processes")
    where.add_argument("--scheduler", default=None, metavar="ADDRESS",
                       help="run on an existing dask cluster (e.g. tcp://10.0.0.5:8786)")
    s.add_argument("--size", action="store_true", help="least supplied thickness per member whose probability "
                   "of exceeding its critical temperature is below variability.target_probability")
    z.add_argument("--csv", default=None, metavar="OUT",
                   help="write the protection schedule (one row per member, chosen thickness) to the CSV file OUT "
                        "(- for standard output)")
    return p


def render_table(result, sizing=False, wide=False, out_dir=None, written=None, command=None) -> str:
    """The terminal summary of a run (:func:`steelfire.outputs.terminal.render` of its document; the
    document --out wrote, where there is one, so that the files it lists are this run's)."""
    from steelfire.outputs import document, terminal

    doc = written if written is not None else document.build(result)
    return terminal.render(doc, sizing=sizing, wide=wide, out_dir=out_dir, command=command).rstrip("\n")


def _load(args):
    from steelfire.errors import InputError
    from steelfire.inputs.case import load_case, with_time_step

    if args.out is not None:
        from steelfire.outputs.files import check_out_dir

        check_out_dir(args.out, [args.case])  # a bad --out fails (exit 2) before the analysis runs
    if getattr(args, "csv", None) is not None:
        check_csv_target(args.csv, [args.case])
    case = load_case(args.case, allow_outside=args.allow_outside)
    if args.time_step_s is not None:
        try:
            step = float(args.time_step_s)
        except ValueError:
            raise InputError("--time-step-s", args.time_step_s, "must be a number [s]") from None
        case = with_time_step(case, step)
    # first run after installing: the kernels compiled side by side before the run, not one by one in it
    from steelfire.models import kernels

    kernels.prepare(kernels.needed(case))
    return case


def _print(result, args, sizing=False):
    if args.json:
        from steelfire.outputs import document

        sys.stdout.buffer.write(document.dumps(document.build(result)) + b"\n")
        sys.stdout.flush()
    else:
        sys.stdout.write(render_table(result, sizing=sizing, wide=args.wide, out_dir=args.out,
                                      written=getattr(args, "written", None)) + "\n")


def _run_check(args) -> int:
    from steelfire.chain.analysis import analyse

    case = _load(args)
    result = analyse(case, histories=args.out is not None and not args.no_histories)
    _write(result, args, case, "check")
    _print(result, args)
    return EXIT_OK if result.all_ok else EXIT_FAIL


def _run_size(args) -> int:
    from steelfire.chain.sizing import size

    case = _load(args)
    if args.csv is not None:
        check_csv_target(args.csv, case.inputs)
    result = size(case, histories=args.out is not None and not args.no_histories)
    _write(result, args, case, "size")
    if args.csv == "-":
        write_schedule_csv(result, case, "-")   # the schedule is the output: no summary after it
        return EXIT_OK if all(m.sizing["achievable"] for m in result.members) else EXIT_FAIL
    if args.csv is not None:
        write_schedule_csv(result, case, args.csv)
    _print(result, args, sizing=True)
    return EXIT_OK if all(m.sizing["achievable"] for m in result.members) else EXIT_FAIL


def _integer(text, field, lo=0):
    from steelfire.errors import InputError

    if text is None:
        return None
    try:
        v = int(text)
    except ValueError:
        raise InputError(field, text, f"must be a whole number >= {lo}") from None
    if v < lo:
        raise InputError(field, text, f"must be a whole number >= {lo}")
    return v


#: Most processes of a local dask cluster (--workers): more than the cores only adds memory and start-up.
MAX_WORKERS = max(2, os.cpu_count() or 1) * 2


def _run_sample(args) -> int:
    """``steelfire sample``: the deterministic check of the case, and beside it the statistics over the
    sampled fires (chain.sampling). Exit 1 where a member fails the check or, with a target probability,
    the upper end of the 95 % interval of its exceedance probability with the error band (fires within the
    band below the critical temperature counted as exceeding) is above it."""
    from steelfire.chain import sampling
    from steelfire.chain.analysis import analyse
    from steelfire.outputs import document, terminal

    fires = _integer(args.fires, "--fires", 1)
    seed = _integer(args.seed, "--seed", 0)
    workers = _integer(args.workers, "--workers", 1)
    if workers is not None and workers > MAX_WORKERS:
        from steelfire.errors import InputError

        raise InputError("--workers", args.workers, f"must be a whole number from 1 to {MAX_WORKERS} (local processes)")
    case = _load(args)
    sampling.check_budget(case, sampling.sample_spec(case, fires=fires, seed=seed), args.size)  # before any work
    keep = args.out is not None and not args.no_histories
    if args.size:
        from steelfire.chain.sizing import size

        result = size(case, histories=keep)   # the deterministic check at the deterministically sized thicknesses
    else:
        result = analyse(case, histories=keep)
    run = sampling.run(case, fires=fires, seed=seed, workers=workers, scheduler=args.scheduler, size=args.size,
                       progress=False if args.json else None)
    section = run.to_dict()
    _write(result, args, case, "sample", sections={"variability": section})
    if args.out is not None:
        from steelfire.outputs import sampling as sampling_out

        sampling_out.write(run, args.out, inputs=[args.case, *case.inputs])
    if args.json:
        doc = document.build(result)
        doc["variability"] = section
        sys.stdout.buffer.write(document.dumps(doc) + b"\n")
        sys.stdout.flush()
    else:
        sys.stdout.write(render_table(result, sizing=args.size, wide=args.wide, out_dir=args.out,
                                      written=getattr(args, "written", None), command="sample")
                         + "\n\n" + terminal.sample_summary(section, wide=args.wide) + "\n")
    target = section.get("target_probability")
    # not demonstrated: the upper end of the 95 % interval with the error band above the target (as --size judges)
    too_likely = target is not None and any(m["exceeds_target_probability"] for m in section["members"])
    return EXIT_OK if (result.all_ok and not too_likely) else EXIT_FAIL


def check_csv_target(path, inputs=()):
    """``--csv`` must be ``-`` (standard output) or name a regular file (or a new one) in an existing,
    writable folder, and not an input of the case."""
    import os
    import stat
    from pathlib import Path

    from steelfire.errors import InputError
    from steelfire.outputs.files import same_file

    if path == "-":
        return
    if not str(path).strip():
        raise InputError("--csv", path, "must name a file, or - for standard output")
    p = Path(path)
    try:
        st = os.lstat(p)
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise InputError("--csv", str(path), f"cannot be used ({exc.strerror})") from None
    if st is not None and not stat.S_ISREG(st.st_mode):
        raise InputError("--csv", str(path), "must name a regular file (not a folder, device, pipe or link), "
                         "or - for standard output")
    if st is not None and any(same_file(p, Path(q)) for q in inputs if q is not None):
        raise InputError("--csv", str(path), "must not name an input of the case (case file, schedule, fire table)")
    parent = p.parent if str(p.parent) else Path(".")
    if not parent.is_dir() or not os.access(parent, os.W_OK):
        raise InputError("--csv", str(path), "must be in an existing, writable folder")


def write_schedule_csv(result, case, path):
    """The protection schedule (:func:`steelfire.outputs.tables.schedule_csv`) to standard output (``-``) or
    to a file: written to a temporary file in the same folder (with the user's usual permissions) and
    renamed, so that no half-written file is left."""
    import os
    import tempfile
    from pathlib import Path

    from steelfire.outputs import document, tables

    text = tables.schedule_csv(document.build(result), case)
    if path == "-":
        sys.stdout.write(text)
        sys.stdout.flush()
        return
    p = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{p.name}.", suffix=".part", dir=str(p.parent if str(p.parent) else "."))
    try:
        umask = os.umask(0)
        os.umask(umask)
        os.fchmod(fd, 0o666 & ~umask)
        with os.fdopen(fd, "w", newline="", encoding="utf-8") as fh:
            fh.write(text)
        os.replace(tmp, p)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def _write(result, args, case, command, sections=None):
    if args.out is None:
        return
    from steelfire.errors import InputError
    from steelfire.outputs.files import write_outputs

    try:
        args.written = write_outputs(result, args.out, args.case, command=command, case=case,
                                     sections=sections).document
    except OSError as exc:
        raise InputError("--out", args.out, f"could not be written ({exc.strerror or exc})") from None


def main(argv=None) -> int:
    """Run the command line ``argv`` (default: sys.argv[1:]); returns the exit code."""
    from steelfire.errors import InputError

    try:
        args = _parser().parse_args(argv)
    except SystemExit as exc:  # --help, --version, or a usage error (already printed)
        return int(exc.code or 0)
    try:
        if args.command == "check":
            return _run_check(args)
        if args.command == "size":
            return _run_size(args)
        if args.command == "sample":
            return _run_sample(args)
    except InputError as exc:
        sys.stderr.write(f"steelfire: error: {exc}\n")
        return EXIT_INPUT
    except KeyboardInterrupt:
        return _interrupted()
    except MemoryError:
        sys.stderr.write("steelfire: error: out of memory; split the schedule, use a coarser time step, or run "
                         "without --out (see the README's limits)\n")
        return EXIT_INPUT
    except Exception as exc:  # an internal error: never reported as a member verdict
        if _caused_by_interrupt(exc):
            return _interrupted()
        return _internal_error(exc)
    return EXIT_INPUT


def _interrupted() -> int:
    sys.stderr.write("steelfire: interrupted; outputs left as they were before the run\n")
    return EXIT_INTERRUPTED


def _caused_by_interrupt(exc) -> bool:
    """Whether ``exc`` comes of a Ctrl-C (numba's threads report it as a SystemError chained to it)."""
    seen = set()
    while exc is not None and id(exc) not in seen:
        if isinstance(exc, KeyboardInterrupt):
            return True
        seen.add(id(exc))
        exc = exc.__cause__ or exc.__context__
    return False


def _internal_error(exc) -> int:
    """Write the traceback to a file in the temporary folder and say where, in one line; exit code 3."""
    import tempfile
    import traceback

    text = "".join(traceback.format_exception(type(exc), exc, exc.__traceback__))
    try:
        fd, path = tempfile.mkstemp(prefix="steelfire-error-", suffix=".txt")
        with open(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        where = f"traceback written to {path}"
    except OSError:
        where = "no traceback file could be written"
    sys.stderr.write(f"steelfire: internal error ({type(exc).__name__}); {where}; please report it\n")
    return EXIT_INTERNAL
