"""The command line run in-process: ``steelfire.cli.main(argv)`` with its output captured.

Returns what a process would give (exit code, stdout, stderr as text), so that a test reads the same
whether the command ran in this process or in a new one (tests/test_cli.py keeps a few of those).
"""

from __future__ import annotations

import io
import subprocess
import sys
from pathlib import Path

from steelfire import cli

ROOT = Path(__file__).resolve().parents[1]


def main(*args) -> subprocess.CompletedProcess:
    """``steelfire ARGS`` in this process; the JSON document is written to stdout's byte buffer, so both
    streams are text wrappers over bytes."""
    argv = [str(a) for a in args]
    out, err = io.BytesIO(), io.BytesIO()
    so = io.TextIOWrapper(out, encoding="utf-8", newline="", write_through=True)
    se = io.TextIOWrapper(err, encoding="utf-8", newline="", write_through=True)
    saved = sys.stdout, sys.stderr
    sys.stdout, sys.stderr = so, se
    try:
        code = cli.main(argv)
    finally:
        so.flush()
        se.flush()
        sys.stdout, sys.stderr = saved
    return subprocess.CompletedProcess(["steelfire", *argv], code, out.getvalue().decode("utf-8"),
                                       err.getvalue().decode("utf-8"))
