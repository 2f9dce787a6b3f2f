"""What ``pip install steelfire`` gives: every module the package imports is the standard library's, the
package's own, or declared in pyproject.toml. A module imported but not declared works in a developer's
environment and fails on a clean install (the CLI would then end in an internal error, exit code 3).

Rules: an import at module level must be a [project] dependency (or a requirement of one, as markupsafe
is of jinja2); an import inside a function may also come from an extra (``xlsx``, ``cluster``); an import
inside ``try: ... except ImportError`` is optional by construction.
"""

from __future__ import annotations

import ast
import re
import sys
try:
    import tomllib
except ImportError:  # pragma: no cover - Python 3.10
    import tomli as tomllib
from importlib import metadata
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

#: Import names that differ from their distribution names on PyPI.
DISTRIBUTION = {"yaml": "pyyaml", "PIL": "pillow", "sklearn": "scikit-learn"}


def _norm(name: str) -> str:
    return re.sub(r"[-_.]+", "_", name).lower()


def _names(reqs) -> set:
    return {_norm(re.split(r"[<>=!~;\[ (]", r, maxsplit=1)[0]) for r in reqs}


def declared():
    """(dependencies and their own requirements, names in any extra)."""
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    deps = _names(project["dependencies"])
    for d in list(deps):
        try:
            deps |= _names(r for r in (metadata.requires(d) or ()) if "extra ==" not in r)
        except metadata.PackageNotFoundError:
            pass
    extras = set().union(*(_names(v) for v in project.get("optional-dependencies", {}).values()))
    return deps, extras


def _guarded(node, parents) -> bool:
    for p in parents:
        if isinstance(p, ast.Try):
            for h in p.handlers:
                names = [h.type] if not isinstance(h.type, ast.Tuple) else list(h.type.elts)
                if any(isinstance(n, ast.Name) and n.id in ("ImportError", "ModuleNotFoundError", "Exception")
                       for n in names):
                    return True
    return False


def imports():
    """(top-level module, file, lazy, guarded) of every absolute import of the package."""
    out = []
    for path in sorted((ROOT / "steelfire").rglob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        stack = [(tree, ())]
        while stack:
            node, parents = stack.pop()
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                names = [node.module]
            else:
                names = []
            lazy = any(isinstance(p, (ast.FunctionDef, ast.AsyncFunctionDef)) for p in parents)
            for n in names:
                out.append((n.split(".")[0], str(path.relative_to(ROOT)), lazy, _guarded(node, parents)))
            stack.extend((c, parents + (node,)) for c in ast.iter_child_nodes(node))
    return out


def test_every_third_party_import_is_declared():
    own = set(sys.stdlib_module_names) | {"steelfire", "__future__", "tomllib"}   # tomllib: stdlib from 3.11 (tomli below)
    deps, extras = declared()
    missing = {}
    for module, file, lazy, guarded in imports():
        name = _norm(DISTRIBUTION.get(module, module))
        if module in own or guarded or name in deps or (lazy and name in extras):
            continue
        missing.setdefault(module, set()).add(file)
    assert not missing, f"imported by the package but not declared in pyproject.toml: {missing}"
