"""Rewrite the golden files: the ``--json`` output of ``steelfire check`` and ``steelfire size`` for every
bundled case (cases/*.toml), as the current code gives it.

Run it only for a deliberate change of the output, then read the diff before committing it:

    python tests/golden/regenerate.py && git diff --stat tests/golden

tests/test_golden.py compares the outputs with these files.
"""

from __future__ import annotations

import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

import cli_run  # noqa: E402

COMMANDS = ("check", "size")


def golden_path(case: Path, command: str) -> Path:
    return HERE / f"{case.stem}.{command}.json"


def cases() -> list:
    return sorted((HERE.parents[1] / "cases").glob("*.toml"))


def main() -> int:
    for case in cases():
        for command in COMMANDS:
            r = cli_run.main(command, case, "--json")
            if r.returncode not in (0, 1) or r.stderr:
                print(f"{case.name} {command}: exit {r.returncode}: {r.stderr.strip()}", file=sys.stderr)
                return 1
            golden_path(case, command).write_text(r.stdout, encoding="utf-8")
            print(f"wrote {golden_path(case, command).relative_to(HERE.parents[1])}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
