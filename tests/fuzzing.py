"""Mutations of steelfire's inputs for the CLI fuzz: cases, schedules, fire tables, paths and ``[code]``.

Shared by ``tests/test_hardening.py`` (hypothesis draws the choices, a modest example count) and
``benchmarks/fuzz.py`` (a seeded random generator, thousands of mutations). One mutation lays out a fresh
workspace folder (a small bundled case with its CSV files, an outside folder with a secret file, a FIFO,
a symlink loop), mutates it, runs the CLI in-process (``steelfire.cli.main``) with the workspace as the
current folder, and reports what the run did. The oracle is deliberately small (no physics):

- the exit code is 0, 1 or 2;
- exit 2 prints exactly one line on standard error, starting with ``steelfire: error:``;
- no traceback anywhere, no exception out of ``main``;
- nothing in the workspace changes outside the ``--out`` folder (and the ``--csv`` target);
- (counted by the script) the secret file's text never appears in the output.

The choices go through a *chooser* (:class:`RandomChooser` or the hypothesis one in the test), so a run
of the script is reproduced from its seed and a hypothesis failure shrinks.
"""

from __future__ import annotations

import contextlib
import copy
import io
import json
import math
import os
import shutil
import signal
import stat
import sys
try:
    import tomllib
except ImportError:  # pragma: no cover - Python 3.10
    import tomli as tomllib
from dataclasses import dataclass, field
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CASES_DIR = ROOT / "cases"

#: The bundled cases the mutations start from, each cut down to a quick run (see :func:`small_case`).
BASE_CASES = ("warehouse_standard", "plant_room", "retail_measured", "office_floor", "office_bay",
              "archive_room", "atrium_localised", "open_office_travelling", "office_variability")

#: Text of the file outside the case's folder: none of it may ever be printed.
SECRET_MARKER = "SECRET-MARKER-5d1c"
SECRET_TEXT = f"{SECRET_MARKER}:password=hunter2\nroot:x:0:0:{SECRET_MARKER}:/root:/bin/sh\n"

#: Seconds one mutation may run before it is stopped and counted as a time-out.
RUN_TIMEOUT_S = 60.0

# ----------------------------------------------------------------------------------------------
# value pools

INF, NAN = math.inf, math.nan
EXTREME_NUMBERS = (0, 0.0, -0.0, -1, -1e-9, 1e-300, 5e-324, 6e-5, 1e-9, 0.5, 1, 3, 1e3, 1e6, 1e15, 1e307, 1e308,
                   -1e308, INF, -INF, NAN, 2 ** 63 - 1, 2 ** 63, -(2 ** 63) - 1, 10 ** 30, 1440, 1441, 1500.0001)
SCALE_FACTORS = (0.0, -1.0, 1e-9, 1e-3, 0.5, 1.0000001, 2.0, 10.0, 1e3, 1e9)
LONG_TEXT = "x" * 100_000
STRINGS = ("", " ", "text", "1e3", "inf", "nan", LONG_TEXT, "a" * 300, "\x1b[31mred\x1b[0m", "line\nbreak",
           "carriage\rreturn", "nul\x00byte", "tab\tbed", "\u2028sep", "\x7fdel", "\x85nel", "=1+1",
           "=HYPERLINK(\"http://x\",\"y\")", "+1", "-1", "@SUM(A1)", "'quoted'", "\"dq\"", "na,me", "<script>x</script>",
           "$\\alpha$", "名前", "../../etc/passwd", "/etc/passwd", "C:\\x", "%s%n", "{0}", "👍" * 10)
WRONG_TYPES = ("text", "", True, False, [], [1, 2], ["a"], {}, {"a": 1}, [[1, 2], [3]])
UNKNOWN_KEYS = ("unknown_key", "", " ", "a\nb", "x\x1by", "nul\x00", "k" * 500, "=cmd", "member ", "Title",
                "duration_min ", "名前")

# Cells of a schedule or fire table.
BAD_CELLS = ("", " ", "abc", "inf", "-inf", "nan", "NaN", "1e308", "1e309", "-1", "0", "-0", "1e-320", "1e307",
             "14400", "14400.5", "1500", "1500.0001", "1,5", "0x10", "1_000", "=1+1", "+1", "-1+2", "@SUM(A1)",
             "\x1b[2J", "a\rb", "a\nb", "\x00", "\u2028", "true", "yes", "\"", "'", "a" * 300, "9" * 400,
             "\ufeffname")
FORMULA_NAMES = ("=1+1", "+A1", "-2+3", "@SUM(A1:A9)", "=HYPERLINK(\"http://example.invalid\",\"x\")", "\t=1",
                 "\r=1")
SCHEDULE_HEADERS = ("name", "kind", "section", "exposure", "encasement", "laterally_restrained", "utilisation",
                    "critical_temperature_C", "protection", "required_minutes", "thickness_mm",
                    "section_factor_per_m", "shadow_factor", "steel_grade", "position.along_m")
TIME_STEPS = ("5", "10", "2", "0", "-1", "nan", "inf", "-inf", "1e-9", "0.05", "abc", "", "300", "301", "1e308",
              "30", "5.0000001")

# Names of paths a case or the command line may give (see Workspace.path_for).
PATH_KINDS = ("real", "missing", "absolute_real", "absolute_outside", "dotdot_outside", "dotdot_inside",
              "folder", "dot", "fifo", "loop", "link_outside", "link_inside", "long_name", "long_path",
              "proc_environ", "etc_passwd", "dev_null", "empty", "blank", "control", "nul", "under_file",
              "hardlink")


# ----------------------------------------------------------------------------------------------
# choosers


class RandomChooser:
    """Choices from a seeded :class:`random.Random` (the script)."""

    def __init__(self, seed: int):
        import random

        self.rng = random.Random(seed)

    def choice(self, seq):
        return seq[self.rng.randrange(len(seq))]

    def integer(self, lo: int, hi: int) -> int:
        return self.rng.randint(lo, hi)

    def chance(self, p: float) -> bool:
        return self.rng.random() < p


class DataChooser:
    """Choices drawn by hypothesis from its ``data()`` strategy (the test; failures shrink)."""

    def __init__(self, data):
        from hypothesis import strategies as st

        self.data, self.st = data, st

    def choice(self, seq):
        return self.data.draw(self.st.sampled_from(list(seq)))

    def integer(self, lo: int, hi: int) -> int:
        return self.data.draw(self.st.integers(lo, hi))

    def chance(self, p: float) -> bool:
        # the top of the range, so that the simplest draw (0, where hypothesis shrinks to) is "no"
        return self.data.draw(self.st.integers(0, 999)) >= 1000 - int(p * 1000)


# ----------------------------------------------------------------------------------------------
# TOML text


@dataclass(frozen=True)
class Nested:
    """A value nested ``depth`` levels deep (arrays or inline tables), written without recursion."""

    depth: int
    kind: str = "array"


def _key(k) -> str:
    return _string(str(k))


def _string(s: str) -> str:
    out = ['"']
    for c in s:
        o = ord(c)
        if c == '"':
            out.append('\\"')
        elif c == "\\":
            out.append("\\\\")
        elif o < 32 or o == 127 or 0x80 <= o < 0xA0:
            out.append(f"\\u{o:04x}")
        else:
            out.append(c)
    out.append('"')
    return "".join(out)


def _number(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if math.isnan(v):
        return "nan"
    if math.isinf(v):
        return "inf" if v > 0 else "-inf"
    text = repr(float(v))
    return text if ("." in text or "e" in text or "n" in text) else text + ".0"


def toml_value(v) -> str:
    """One TOML value on one line (tables inline), iteratively for :class:`Nested`."""
    if isinstance(v, Nested):
        if v.kind == "array":
            return "[" * v.depth + "1" + "]" * v.depth
        return "{ a = " * v.depth + "1" + " }" * v.depth
    if isinstance(v, (bool, int, float)):
        return _number(v)
    if isinstance(v, str):
        return _string(v)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{" + ", ".join(f"{_key(k)} = {toml_value(x)}" for k, x in v.items()) + "}"
    raise TypeError(type(v))


def toml_text(data: dict) -> str:
    """A case dict as TOML text: one ``key = value`` line per top-level key (tables inline)."""
    return "".join(f"{_key(k)} = {toml_value(v)}\n" for k, v in data.items())


# ----------------------------------------------------------------------------------------------
# small bundled cases


def load_base(name: str) -> tuple:
    """(case dict, {file name: text}) of a bundled case cut down to a quick run: at most three members,
    fires of 30-60 min, a step of 5 s, a standard horizon of 60-120 min."""
    data = tomllib.loads((CASES_DIR / f"{name}.toml").read_text(encoding="utf-8"))
    files = {}
    data = small_case(data)
    if "members_file" in data:
        lines = (CASES_DIR / data["members_file"]).read_text(encoding="utf-8").splitlines()
        files[data["members_file"]] = "\n".join(lines[:5]) + "\n"   # comment, header, three members
    fire = data.get("fire", {})
    for key in ("file", "heat_release_file"):
        if key in fire:
            files[fire[key]] = (CASES_DIR / fire[key]).read_text(encoding="utf-8")
    return data, files


def small_case(data: dict) -> dict:
    """``data`` with at most three members, a 60 min fire (30 min for the bundled travelling and localised
    ones), a 5 s step, a standard horizon of 60 min or the longest required period up to 120 min."""
    data = copy.deepcopy(data)
    if isinstance(data.get("member"), list):
        data["member"] = data["member"][:3]
    fire = data.setdefault("fire", {})
    fire["duration_min"] = 30.0 if fire.get("curve") in ("localised", "travelling") else 60.0
    analysis = data.setdefault("analysis", {})
    analysis["time_step_s"] = 5.0
    need = max([60.0] + [float(m.get("required_minutes", 0)) for m in data.get("member", [])])
    if "members_file" in data:
        need = 120.0                 # the bundled schedule's periods go up to R120
    analysis["standard_horizon_min"] = min(120.0, need)
    for m in data.get("member", []):
        if m.get("required_minutes", 0) > 120:
            m["required_minutes"] = 120
    if "variability" in data:
        data["variability"]["fires"] = 16
    return data


# ----------------------------------------------------------------------------------------------
# the workspace


class Workspace:
    """A fresh folder per mutation::

        root/            the current folder of the run
          case/          case.toml and its CSV files, sub/ (a folder), pipe (a FIFO), loop (a symlink loop)
          outside/       secret.csv (SECRET_TEXT): a file the case must not read or quote
    """

    def __init__(self, root: Path):
        self.root = Path(root)
        self.case_dir = self.root / "case"
        self.outside = self.root / "outside"
        self.case_dir.mkdir(parents=True)
        self.outside.mkdir()
        (self.case_dir / "sub").mkdir()
        (self.outside / "secret.csv").write_text(SECRET_TEXT, encoding="utf-8")
        os.mkfifo(self.case_dir / "pipe")
        os.symlink("loop", self.case_dir / "loop")
        os.symlink("../outside/secret.csv", self.case_dir / "link_outside.csv")
        self.case_path = self.case_dir / "case.toml"

    def write(self, name: str, data) -> Path:
        p = self.case_dir / name
        if isinstance(data, bytes):
            p.write_bytes(data)
        else:
            p.write_text(data, encoding="utf-8", newline="")
        return p

    def path_for(self, kind: str, real: str, relative: bool = True) -> str:
        """A path of the given kind (see PATH_KINDS); ``real`` is the file it stands in for; ``relative``:
        relative to the case's folder (a case's key) or to the current folder (the command line)."""
        base = "case/" if not relative else ""
        if kind == "real":
            return base + real
        if kind == "missing":
            return base + "missing_" + real
        if kind == "absolute_real":
            return str(self.case_dir / real)
        if kind == "absolute_outside":
            return str(self.outside / "secret.csv")
        if kind == "dotdot_outside":
            return base + "../outside/secret.csv"
        if kind == "dotdot_inside":
            return base + "sub/../" + real
        if kind == "folder":
            return base + "sub"
        if kind == "dot":
            return base + "." if base else "."
        if kind == "fifo":
            return base + "pipe"
        if kind == "loop":
            return base + "loop"
        if kind == "link_outside":
            return base + "link_outside.csv"
        if kind == "link_inside":
            link = self.case_dir / f"link_{real}"
            if not link.exists():
                os.symlink(real, link)
            return base + f"link_{real}"
        if kind == "long_name":
            return base + "n" * 300 + ".csv"
        if kind == "long_path":
            return base + "d/" * 2100 + real
        if kind == "proc_environ":
            return "/proc/self/environ"
        if kind == "etc_passwd":
            return "/etc/passwd"
        if kind == "dev_null":
            return "/dev/null"
        if kind == "empty":
            return ""
        if kind == "blank":
            return "   "
        if kind == "control":
            return base + "bad\nname.csv"
        if kind == "nul":
            return base + "nul\x00name.csv"
        if kind == "under_file":
            return base + real + "/below.csv"
        if kind == "hardlink":
            link = self.case_dir / f"hard_{real}"
            if not link.exists() and (self.case_dir / real).is_file():
                os.link(self.case_dir / real, link)
            return base + f"hard_{real}"
        raise ValueError(kind)


# ----------------------------------------------------------------------------------------------
# mutations


@dataclass
class Mutation:
    """What one mutation did (``steps``, printable and enough to rebuild it from the chooser's seed) and
    the command line it runs (relative to the workspace root)."""

    base: str
    steps: list = field(default_factory=list)
    argv: list = field(default_factory=list)
    out: str | None = None
    csv: str | None = None

    def note(self, text: str):
        self.steps.append(text)

    def __str__(self):
        return f"base={self.base}; " + "; ".join(self.steps) + f"; argv={self.argv!r}"


def _short(v, most=60) -> str:
    text = repr(v)
    return text if len(text) <= most else text[: most - 3] + "..."


def _paths(tree, prefix=()):
    """Every (path, value) in a nested dict/list tree (paths as tuples of keys and indices)."""
    out = []
    stack = [(tree, prefix)]
    while stack:
        node, at = stack.pop()
        items = node.items() if isinstance(node, dict) else enumerate(node)
        for k, v in items:
            out.append((at + (k,), v))
            if isinstance(v, (dict, list)) and len(at) < 8:
                stack.append((v, at + (k,)))
    out.sort(key=lambda p: tuple(str(x) for x in p[0]))
    return out


def _parent(tree, path):
    node = tree
    for k in path[:-1]:
        node = node[k]
    return node


def _pick_value(ch):
    pool = ch.choice(("number", "number", "string", "wrong", "nested"))
    if pool == "number":
        return ch.choice(EXTREME_NUMBERS)
    if pool == "string":
        return ch.choice(STRINGS)
    if pool == "wrong":
        return copy.deepcopy(ch.choice(WRONG_TYPES))
    return Nested(ch.choice((3, 50, 500, 2000)), ch.choice(("array", "table")))


def mutate_tree(ch, data: dict, m: Mutation, schedule_name=None, fire_name=None):
    """One structural or value mutation of the case dict (in place)."""
    from steelfire import codevalues

    op = ch.choice(("drop", "set", "set", "scale", "add_key", "code", "code", "members", "title", "names"))
    paths = _paths(data)
    if op in ("drop", "set", "scale") and paths:
        path, value = ch.choice(paths)
        parent = _parent(data, path)
        if op == "drop":
            del parent[path[-1]]
            m.note(f"drop {_short(path)}")
        elif op == "set":
            v = _pick_value(ch)
            parent[path[-1]] = v
            m.note(f"set {_short(path)} = {_short(v)}")
        else:
            numbers = [(p, v) for p, v in paths if isinstance(v, (int, float)) and not isinstance(v, bool)]
            if numbers:
                path, value = ch.choice(numbers)
                f = ch.choice(SCALE_FACTORS)
                _parent(data, path)[path[-1]] = value * f
                m.note(f"scale {_short(path)} by {f!r}")
    elif op == "add_key":
        tables = [(), *[p for p, v in paths if isinstance(v, dict)]]
        at = ch.choice(tables)
        node = _parent(data, at + ("x",))
        k, v = ch.choice(UNKNOWN_KEYS), _pick_value(ch)
        node[k] = v
        m.note(f"add key {_short(k)} = {_short(v)} at {_short(at)}")
    elif op == "code":
        code = data.setdefault("code", {})
        for _ in range(ch.integer(1, 3)):
            names = list(codevalues.DEFINITIONS)
            name = ch.choice(names + ["not_a_code_value"])
            d = codevalues.DEFINITIONS.get(name)
            if d is None:
                v = 1.0
            else:
                span = d.maximum - d.minimum
                v = ch.choice((d.minimum, d.maximum, d.value, d.minimum - max(1e-9, 1e-6 * span),
                               d.maximum + max(1e-9, 1e-6 * span), d.maximum * 10 + 1, d.minimum - 1,
                               (d.minimum + d.maximum) / 2, INF, NAN, -0.0, 2000, "1", True))
            code[name] = v
            m.note(f"code.{name} = {_short(v)}")
    elif op == "members" and isinstance(data.get("member"), list) and data["member"]:
        members = data["member"]
        how = ch.choice(("copy", "copy_renamed", "empty", "many"))
        if how == "copy":
            members.append(copy.deepcopy(members[0]))
        elif how == "copy_renamed":
            extra = copy.deepcopy(members[-1])
            extra["name"] = str(extra.get("name", "m")) + "-b"
            members.append(extra)
        elif how == "empty":
            members.append({})
        else:
            n = ch.choice((20, 100))
            proto = members[0]
            data["member"] = [{**copy.deepcopy(proto), "name": f"M{i:04d}"} for i in range(n)]
        m.note(f"members {how} -> {len(data['member'])}")
    elif op == "title":
        v = ch.choice(STRINGS)
        data["title"] = v
        m.note(f"title = {_short(v)}")
    else:  # names
        members = data.get("member")
        if isinstance(members, list) and members and isinstance(members[0], dict):
            v = ch.choice(FORMULA_NAMES + STRINGS)
            members[0]["name"] = v
            m.note(f"member[0].name = {_short(v)}")
        elif isinstance(data.get("materials"), dict) and data["materials"]:
            k = ch.choice(list(data["materials"]))
            v = ch.choice(UNKNOWN_KEYS)
            data["materials"][v] = data["materials"].pop(k)
            m.note(f"rename material {k!r} -> {_short(v)}")


def mutate_text(ch, text: str, m: Mutation) -> bytes:
    """A mutation of the TOML text itself (a repeated key, a cut, bytes that are not UTF-8, ...)."""
    lines = text.splitlines(keepends=True)
    op = ch.choice(("duplicate", "truncate", "bad_bytes", "bom", "nul", "deep", "crlf", "garbage"))
    if op == "duplicate" and lines:
        i = ch.integer(0, len(lines) - 1)
        lines.insert(i, lines[i])
        m.note(f"text: duplicate line {i + 1}")
        return "".join(lines).encode()
    if op == "truncate":
        cut = ch.integer(0, len(text))
        m.note(f"text: cut at {cut}")
        return text[:cut].encode()
    if op == "bad_bytes":
        m.note("text: invalid UTF-8 appended")
        return text.encode() + b"\xff\xfe\x80 = 1\n"
    if op == "bom":
        m.note("text: BOM")
        return b"\xef\xbb\xbf" + text.encode()
    if op == "nul":
        m.note("text: NUL byte")
        return text.encode() + b"x = \"\x00\"\n"
    if op == "deep":
        d = ch.choice((100, 500, 5000))
        m.note(f"text: a value nested {d} deep")
        return (text + "deep = " + "[" * d + "]" * d + "\n").encode()
    if op == "crlf":
        m.note("text: CRLF and a bare CR")
        return text.replace("\n", "\r\n").encode() + b"x = 1\r"
    m.note("text: garbage line")
    return (text + "[[[ = ]]\n").encode()


def mutate_rows(ch, rows: list, m: Mutation, what: str):
    """A mutation of the rows (lists of cells) of a CSV input, in place."""
    op = ch.choice(("cell", "cell", "cell", "header", "columns", "many_columns", "drop_row", "extra_cells",
                    "name", "only_header", "decreasing"))
    data_rows = [i for i, r in enumerate(rows) if r and not r[0].startswith("#")]
    if not data_rows:
        return
    head = data_rows[0]
    body = data_rows[1:]
    if op == "cell" and body:
        i = ch.choice(body)
        j = ch.integer(0, max(0, len(rows[i]) - 1))
        v = ch.choice(BAD_CELLS)
        if rows[i]:
            rows[i][j] = v
        m.note(f"{what}: row {i + 1} cell {j + 1} = {_short(v)}")
    elif op == "header":
        j = ch.integer(0, len(rows[head]) - 1)
        v = ch.choice(BAD_CELLS + SCHEDULE_HEADERS)
        rows[head][j] = v
        m.note(f"{what}: header cell {j + 1} = {_short(v)}")
    elif op == "columns":
        v = ch.choice(SCHEDULE_HEADERS + ("extra", "=1+1"))
        for i in data_rows:
            rows[i].append(v if i == head else ch.choice(BAD_CELLS))
        m.note(f"{what}: a column {v!r}")
    elif op == "many_columns":
        n = ch.choice((50, 1000))
        for i in data_rows:
            rows[i].extend([f"c{k}" if i == head else "1" for k in range(n)])
        m.note(f"{what}: {n} more columns")
    elif op == "drop_row" and body:
        i = ch.choice(body)
        del rows[i]
        m.note(f"{what}: drop row {i + 1}")
    elif op == "extra_cells" and body:
        i = ch.choice(body)
        rows[i].extend(["1", "2"])
        m.note(f"{what}: row {i + 1} has two more cells")
    elif op == "name" and body and what == "schedule":
        v = ch.choice(FORMULA_NAMES + BAD_CELLS)
        j = rows[head].index("name") if "name" in rows[head] else 0
        rows[body[0]][j] = v
        m.note(f"{what}: first name = {_short(v)}")
    elif op == "only_header":
        del rows[head + 1:]
        m.note(f"{what}: header only")
    elif op == "decreasing" and len(body) >= 2:
        rows[body[0]], rows[body[-1]] = rows[body[-1]], rows[body[0]]
        m.note(f"{what}: first and last rows swapped")


def csv_text(rows) -> str:
    buf = io.StringIO()
    import csv

    csv.writer(buf, lineterminator="\n").writerows(rows)
    return buf.getvalue()


def parse_csv(text) -> list:
    import csv

    return [list(r) for r in csv.reader(io.StringIO(text))]


def build(ch, ws: Workspace) -> Mutation:
    """Draw one mutation, lay it out in ``ws`` and return it with its command line."""
    base = ch.choice(BASE_CASES)
    m = Mutation(base)
    data, files = load_base(base)
    fire = data.get("fire", {})
    schedule_name = data.get("members_file")
    fire_name = fire.get("file")
    # inputs may carry the names of output files, so that --out into the case's folder would hit them
    if schedule_name and ch.chance(0.3):
        new = ch.choice(("members.csv", "histories.csv"))
        files[new] = files.pop(schedule_name)
        data["members_file"] = schedule_name = new
        m.note(f"schedule named {new}")
    if fire_name and ch.chance(0.3):
        new = ch.choice(("histories.csv", "members.csv"))
        files[new] = files.pop(fire_name)
        fire["file"] = fire_name = new
        m.note(f"fire table named {new}")
    if not schedule_name and base == "warehouse_standard" and ch.chance(0.2):
        # the members of the bundled schedule under the standard fire
        lines = (CASES_DIR / "office_floor_schedule.csv").read_text(encoding="utf-8").splitlines()
        files["sched.csv"] = "\n".join(lines[:5]) + "\n"
        data.pop("member", None)
        data["members_file"] = schedule_name = "sched.csv"
        m.note("members from a schedule")

    what = ch.choice(("tree", "tree", "tree", "text", "schedule", "fire_table", "paths", "paths", "none", "none",
                      "benign"))
    if what == "schedule" and not schedule_name:
        what = "tree"
    if what == "fire_table" and not fire_name:
        what = "tree"
    if what == "tree":
        for _ in range(ch.integer(1, 3)):
            mutate_tree(ch, data, m, schedule_name, fire_name)
    elif what == "benign":
        # a number moved within reason: runs that reach the analysis and the outputs
        numbers = [(p, v) for p, v in _paths(data) if isinstance(v, (int, float)) and not isinstance(v, bool)
                   and p[0] not in ("analysis", "variability")]
        if numbers:
            path, value = ch.choice(numbers)
            f = ch.choice((0.5, 0.9, 1.1, 1.5, 2.0))
            _parent(data, path)[path[-1]] = value * f
            m.note(f"scale {_short(path)} by {f!r}")
    elif what == "schedule":
        rows = parse_csv(files[schedule_name])
        for _ in range(ch.integer(1, 2)):
            mutate_rows(ch, rows, m, "schedule")
        files[schedule_name] = csv_text(rows)
        if ch.chance(0.1):
            files[schedule_name] = files[schedule_name].encode() + b"\xff\n"
            m.note("schedule: invalid UTF-8")
    elif what == "fire_table":
        rows = parse_csv(files[fire_name])
        for _ in range(ch.integer(1, 2)):
            mutate_rows(ch, rows, m, "fire table")
        files[fire_name] = csv_text(rows)
    elif what == "paths":
        key = ch.choice(("members_file", "fire.file", "fire.heat_release_file"))
        kind = ch.choice(PATH_KINDS)
        real = schedule_name or fire_name or "retail_fire_curve.csv"
        if key == "members_file":
            data["members_file"] = ws.path_for(kind, schedule_name or "sched.csv")
            if ch.chance(0.5):
                data.pop("member", None)   # the schedule is then the only source of members
            m.note(f"members_file -> {kind}")
        elif key == "fire.file":
            fire["curve"] = "table"
            fire["file"] = ws.path_for(kind, fire_name or real)
            m.note(f"fire.file -> {kind}")
        else:
            fire["heat_release_file"] = ws.path_for(kind, real)
            m.note(f"fire.heat_release_file -> {kind}")
    for name, text in files.items():
        ws.write(name, text)
    text = toml_text(data)
    raw = mutate_text(ch, text, m) if what == "text" else text.encode()
    ws.case_path.write_bytes(raw)
    m.argv = command_line(ch, ws, m, data)
    return m


def command_line(ch, ws: Workspace, m: Mutation, data) -> list:
    """The command, the case path and the options, some of them mutated."""
    sample = "variability" in data
    command = ch.choice(("check", "check", "check", "size") + (("sample",) if sample else ()))
    argv = [command]
    case_arg = "case/case.toml"
    if ch.chance(0.15):
        kind = ch.choice(("missing", "absolute_real", "dotdot_inside", "folder", "fifo", "loop", "long_name",
                          "long_path", "proc_environ", "dev_null", "empty", "control", "nul", "under_file"))
        case_arg = ws.path_for(kind, "case.toml", relative=False)
        m.note(f"case path -> {kind}")
    argv.append(case_arg)
    if ch.chance(0.3):
        argv.append("--json")
    if ch.chance(0.1):
        argv.append("--wide")
    if ch.chance(0.2):
        argv.append("--allow-outside")
    if ch.chance(0.15):
        step = ch.choice(TIME_STEPS)
        argv += ["--time-step-s", step]
    if ch.chance(0.25):
        kind = ch.choice(("fresh", "fresh", "nested", "existing", "case_folder", "file", "fifo_inside", "empty",
                          "loop", "under_file", "long", "dir_in_place", "dot"))
        m.out = out_dir(ws, kind)
        argv += ["--out", m.out]
        if ch.chance(0.3):
            argv.append("--no-histories")
        m.note(f"--out -> {kind}")
    if command == "size" and ch.chance(0.5):
        kind = ch.choice(("file", "file", "stdout", "fifo", "folder", "case_file", "input", "empty", "missing_dir",
                          "long", "hardlink_case"))
        m.csv = csv_target(ws, kind, data)
        argv += ["--csv", m.csv]
        m.note(f"--csv -> {kind}")
    if command == "sample":
        argv += ["--fires", ch.choice(("8", "16", "0", "-1", "x"))]
    return argv


def out_dir(ws: Workspace, kind: str) -> str:
    if kind == "fresh":
        return "out"
    if kind == "nested":
        return "out/a/b"
    if kind == "existing":
        (ws.root / "out").mkdir()
        (ws.root / "out" / "results.json").write_text("{\"old\": true}\n")
        (ws.root / "out" / ".members.csv.0123456789ab.part").write_text("stale")
        return "out"
    if kind == "case_folder":
        return "case"
    if kind == "file":
        return "case/case.toml"
    if kind == "fifo_inside":
        (ws.root / "out").mkdir()
        os.mkfifo(ws.root / "out" / "members.csv")
        return "out"
    if kind == "empty":
        return ""
    if kind == "loop":
        return "case/loop"
    if kind == "under_file":
        return "case/case.toml/out"
    if kind == "long":
        return "o" * 300
    if kind == "dir_in_place":
        (ws.root / "out" / "results.json").mkdir(parents=True)
        return "out"
    if kind == "dot":
        return "."
    raise ValueError(kind)


def csv_target(ws: Workspace, kind: str, data) -> str:
    if kind == "file":
        return "schedule_out.csv"
    if kind == "stdout":
        return "-"
    if kind == "fifo":
        return "case/pipe"
    if kind == "folder":
        return "case/sub"
    if kind == "case_file":
        return "case/case.toml"
    if kind == "input":
        name = data.get("members_file") or data.get("fire", {}).get("file") or "case.toml"
        return f"case/{name}" if isinstance(name, str) else "case/case.toml"
    if kind == "empty":
        return ""
    if kind == "missing_dir":
        return "nowhere/schedule_out.csv"
    if kind == "long":
        return "s" * 300 + ".csv"
    if kind == "hardlink_case":
        os.link(ws.case_path, ws.root / "case_link.toml")
        return "case_link.toml"
    raise ValueError(kind)


# ----------------------------------------------------------------------------------------------
# running one mutation


class FuzzTimeout(BaseException):
    """Raised by the alarm when a mutation runs too long (a BaseException: the CLI does not catch it)."""


@contextlib.contextmanager
def alarm(seconds: float):
    """Raise :class:`FuzzTimeout` after ``seconds``; yields a list that holds True once the alarm has fired
    (inside a numba kernel the exception comes out as a SystemError, which the CLI reports as exit 3)."""
    fired = []

    def _raise(signum, frame):
        fired.append(True)
        raise FuzzTimeout()

    old = signal.signal(signal.SIGALRM, _raise)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield fired
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)


def listing(root: Path) -> dict:
    """Every entry under ``root`` (not following links): relative path -> (type, size, mtime_ns, inode)."""
    out = {}
    for dirpath, dirnames, filenames in os.walk(root, followlinks=False):
        for name in dirnames + filenames:
            p = os.path.join(dirpath, name)
            try:
                st = os.lstat(p)
            except OSError:
                continue
            out[os.path.relpath(p, root)] = (stat.S_IFMT(st.st_mode), st.st_size, st.st_mtime_ns, st.st_ino)
    return out


def changes_outside(before: dict, after: dict, allowed=()) -> list:
    """Paths created, removed or changed, except those under one of ``allowed`` (relative paths)."""
    allowed = [os.path.normpath(a) for a in allowed if a]

    def free(p):
        # the output itself, what is below it, and the folders made to hold it (new ancestors)
        return any(a == "." or p == a or p.startswith(a + os.sep)
                   or (a.startswith(p + os.sep) and p not in before) for a in allowed)

    changed = [p for p in set(before) | set(after) if before.get(p) != after.get(p) and not free(p)]
    return sorted(changed)


@dataclass
class Outcome:
    """What one run did."""

    code: object            # the exit code, or "timeout" / the name of an exception out of main
    stdout: str
    stderr: str
    outside: list            # paths changed outside --out
    inputs_changed: list = field(default_factory=list)   # input files changed (inside --out too)
    seconds: float = 0.0

    def problems(self) -> list:
        """The oracle: what is wrong with this run (empty when it is fine)."""
        out = []
        if self.code == "timeout":
            out.append("timeout")
        elif not isinstance(self.code, int):
            out.append(f"exception out of main: {self.code}")
        elif self.code not in (0, 1, 2):
            out.append(f"exit code {self.code}")
        if "Traceback" in self.stderr or "Traceback" in self.stdout:
            out.append("traceback")
        if self.code == 2:
            lines = self.stderr.strip("\n").split("\n")
            if len(lines) != 1 or not lines[0].startswith("steelfire: error:"):
                out.append(f"exit 2 with {len(lines)} stderr lines")
        if self.outside:
            out.append(f"written outside --out: {self.outside[:3]}")
        if self.inputs_changed:
            out.append(f"input replaced: {self.inputs_changed}")
        out += hotter_than_gas(self.code, self.stdout)
        return out

    def leaked(self) -> bool:
        return SECRET_MARKER in self.stdout or SECRET_MARKER in self.stderr


#: Fires every member sees alike: no steel may end above the hottest gas of the run (second law; the
#: guard of issue 15). Localised and travelling fires give each member its own exposure.
UNIFORM_CURVES = ("standard", "external", "hydrocarbon", "parametric", "table")


def hotter_than_gas(code, stdout: str) -> list:
    """A verdict with a member's steel (either model) above the design fire's hottest gas."""
    if code not in (0, 1) or not stdout.lstrip().startswith("{"):
        return []
    try:
        doc = json.loads(stdout)
    except ValueError:  # --csv - shares standard output
        return []
    fire = doc.get("fire") or {}
    gas = fire.get("peak_gas_temperature_C")
    if fire.get("curve") not in UNIFORM_CURVES or not isinstance(gas, (int, float)):
        return []
    bad = [m["name"] for m in doc.get("members", [])
           if any(isinstance(m.get(k), (int, float)) and m[k] > gas + 0.5
                  for k in ("peak_steel_temperature_C", "conduction_peak_C"))]
    return [f"steel above the hottest gas ({gas} C): {bad[:3]}"] if bad else []


class _Capture(io.TextIOWrapper):
    def __init__(self):
        super().__init__(io.BytesIO(), encoding="utf-8", errors="backslashreplace", write_through=True)

    def text(self) -> str:
        self.flush()
        return self.buffer.getvalue().decode("utf-8", errors="backslashreplace")


def run_cli(argv, cwd: Path, timeout_s: float = RUN_TIMEOUT_S) -> tuple:
    """``steelfire.cli.main(argv)`` in-process with ``cwd`` as the current folder; (code, stdout, stderr).
    ``code`` is the exit code, ``"timeout"``, or ``"raised <Exception>"`` where main let one out."""
    import traceback

    from steelfire import cli

    out, err = _Capture(), _Capture()
    here = os.getcwd()
    os.chdir(cwd)
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err), alarm(timeout_s) as fired:
            try:
                code = cli.main(list(argv))
            except FuzzTimeout:
                code = "timeout"
            except BaseException as exc:  # noqa: BLE001 - anything out of main is a finding
                code = f"raised {type(exc).__name__}"
                err.write("".join(traceback.format_exception(exc)))
            if fired:
                code = "timeout"
    finally:
        os.chdir(here)
    return code, out.text(), err.text()


def run_mutation(ch, workdir: Path, timeout_s: float = RUN_TIMEOUT_S) -> tuple:
    """Build one mutation in a fresh folder under ``workdir``, run it, check the folder; (Mutation, Outcome).
    The folder is removed afterwards."""
    import time

    root = Path(workdir)
    if root.exists():
        shutil.rmtree(root)
    root.mkdir(parents=True)
    try:
        ws = Workspace(root)
        m = build(ch, ws)
        before = listing(root)
        inputs = {p: p.read_bytes() for p in ws.case_dir.iterdir() if p.is_file() and not p.is_symlink()}
        t0 = time.perf_counter()
        code, stdout, stderr = run_cli(m.argv, root, timeout_s)
        seconds = time.perf_counter() - t0
        after = listing(root)
        allowed = [m.out] if m.out else []
        if m.csv and m.csv != "-":
            allowed.append(m.csv)
        outside = changes_outside(before, after, allowed)
        changed = [p.name for p, data in inputs.items()
                   if not p.is_file() or p.is_symlink() or p.read_bytes() != data]
        return m, Outcome(code, stdout, stderr, outside, changed, seconds)
    finally:
        shutil.rmtree(root, ignore_errors=True)


def warm_up(workdir: Path):
    """One plain run, so that the kernels' one-time compile notice is not taken for a second stderr line."""
    root = Path(workdir)
    root.mkdir(parents=True, exist_ok=True)
    run_cli(["check", str(CASES_DIR / "warehouse_standard.toml"), "--json"], root)
    shutil.rmtree(root, ignore_errors=True)


if __name__ == "__main__":  # pragma: no cover
    sys.exit("run benchmarks/fuzz.py, or the tests in tests/test_hardening.py")
