"""The ``--json`` documents of ``check`` and ``size`` for every bundled case, against tests/golden/.

The golden files are the tool's own earlier output (no outside source): they hold every number and word
of the documents still, so that a change in any of them shows here and in the diff of the files. Right
after the package restructuring the documents equalled those of the release before it except for the
``fire`` object's null keys of other fire models, no longer written (checked against that release's
output); the files here were written later, after the member-resistance, conduction, fire-model and
hardening work had changed the documents on purpose.

Equality is exact, after parsing (numbers included; key order aside); ``steelfire_version`` is ignored.
A deliberate change of the output is one command, whose diff is then reviewed:

    python tests/golden/regenerate.py
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

import cli_run

sys.path.insert(0, str(Path(__file__).resolve().parent / "golden"))
import regenerate  # noqa: E402  (tests/golden/regenerate.py)

IGNORED = ("steelfire_version",)


def comparable(doc: dict) -> dict:
    return {k: v for k, v in doc.items() if k not in IGNORED}


def differences(a, b, path="", out=None, most=20):
    """Where two parsed documents differ (paths), for a readable failure."""
    out = [] if out is None else out
    if len(out) >= most:
        return out
    if isinstance(a, dict) and isinstance(b, dict):
        for k in sorted(set(a) | set(b)):
            if k not in a or k not in b:
                out.append(f"{path}.{k}: {'missing' if k not in b else 'added'}")
            else:
                differences(a[k], b[k], f"{path}.{k}", out, most)
    elif isinstance(a, list) and isinstance(b, list) and len(a) == len(b):
        for i, (x, y) in enumerate(zip(a, b)):
            differences(x, y, f"{path}[{i}]", out, most)
    elif a != b or type(a) is not type(b):
        out.append(f"{path}: golden {json.dumps(a)[:120]} now {json.dumps(b)[:120]}")
    return out


PARAMS = [pytest.param(case, command, id=f"{case.stem}-{command}")
          for case in regenerate.cases() for command in regenerate.COMMANDS]


def test_every_bundled_case_has_its_golden_files():
    missing = [str(regenerate.golden_path(c, cmd).name) for c, cmd in ((p.values[0], p.values[1]) for p in PARAMS)
               if not regenerate.golden_path(c, cmd).is_file()]
    assert not missing, f"missing golden files {missing}: run python tests/golden/regenerate.py"
    stale = {p.name for p in Path(regenerate.HERE).glob("*.json")} - {
        regenerate.golden_path(c, cmd).name for c in regenerate.cases() for cmd in regenerate.COMMANDS}
    assert not stale, f"golden files of no bundled case: {sorted(stale)}"


@pytest.mark.parametrize("case, command", PARAMS)
def test_json_output_equals_golden(case, command):
    golden = regenerate.golden_path(case, command)
    r = cli_run.main(command, case, "--json")
    assert r.stderr == "" and r.returncode in (0, 1), r.stderr
    now = comparable(json.loads(r.stdout))
    # exit codes (DESIGN.md): check 0 where every member passes and meets its period; size 0 where every
    # member's protection is achievable
    if command == "check":
        ok = all(m["passes"] and m["meets_required_period"] is not False for m in now["members"])
    else:
        ok = all(m["sizing"]["achievable"] for m in now["members"])
    assert r.returncode == (0 if ok else 1)
    want = comparable(json.loads(golden.read_text("utf-8")))
    assert now == want, "\n".join(differences(want, now)) + "\n(a deliberate change: python tests/golden/regenerate.py)"
