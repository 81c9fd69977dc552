"""The layout rules of docs/architecture.md, enforced on the source with ``ast``.

Imports run one way, from the command line down to the contract's words:

    cli -> repair -> generate -> judge | report -> read -> perceive -> config -> color -> terms | errors

Every import counts, at module level or inside a function, so an import moved into a
function cannot hide a cycle. No private name (``_x``) is imported across modules.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "palettecheck"

#: Stage of each top-level module or package; a module may import only lower stages,
#: or modules of its own package. judge and report share a stage and never import
#: each other.
RANK = {"terms": 0, "errors": 0, "color": 1, "config": 2, "perceive": 3, "read": 4, "judge": 5,
        "report": 5, "generate": 6, "repair": 7, "cli": 8, "__main__": 9, "": 9}


def module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def modules() -> dict[str, Path]:
    return {module_name(p): p for p in PACKAGE.rglob("*.py")}


def imports(name: str, path: Path):
    """``(imported module, imported names, line)`` for every palettecheck import in a file."""
    is_package = path.name == "__init__.py"
    here = name.split(".") if is_package else name.split(".")[:-1]
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = here[: len(here) - node.level + 1]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            if target.split(".")[0] != "palettecheck":
                continue
            names = [a.name for a in node.names]
            # ``from . import x`` imports the submodule x when there is one
            subs = [f"{target}.{n}" for n in names if f"{target}.{n}" in MODULES]
            for sub in subs:
                yield sub, [], node.lineno
            if not subs or len(subs) < len(names):
                yield target, [n for n in names if f"{target}.{n}" not in MODULES], node.lineno
        elif isinstance(node, ast.Import):
            for a in node.names:
                if a.name.split(".")[0] == "palettecheck":
                    yield a.name, [], node.lineno


MODULES = modules()
GRAPH = {name: sorted({t for t, _, _ in imports(name, path)} - {name}) for name, path in MODULES.items()}


def stage(name: str) -> str:
    parts = name.split(".")
    return parts[1] if len(parts) > 1 else ""


def test_every_import_resolves_to_a_module():
    missing = [(m, t) for m, targets in GRAPH.items() for t in targets if t not in MODULES]
    assert missing == []


def test_no_import_cycle():
    """Depth-first search over every import, function-level ones included."""
    state, cycles = {}, []

    def visit(node, trail):
        state[node] = "open"
        for nxt in GRAPH[node]:
            if state.get(nxt) == "open":
                cycles.append(trail[trail.index(nxt):] + [nxt] if nxt in trail else [node, nxt])
            elif nxt not in state:
                visit(nxt, trail + [nxt])
        state[node] = "done"

    for name in sorted(GRAPH):
        if name not in state:
            visit(name, [name])
    assert cycles == []


def test_imports_run_one_way():
    upward = []
    for name, targets in GRAPH.items():
        if name == "palettecheck":
            continue  # the lazy facade (its imports are under TYPE_CHECKING or in __getattr__)
        for t in targets:
            a, b = stage(name), stage(t)
            if a == b:
                continue
            if RANK[b] >= RANK[a]:
                upward.append(f"{name} imports {t}")
    assert upward == []


def test_no_private_name_crosses_a_module_boundary():
    crossing = [f"{name}:{line} takes {n} from {target}"
                for name, path in MODULES.items()
                for target, names, line in imports(name, path)
                for n in names if n.startswith("_") and target != name]
    assert crossing == []


def test_listing_reads_as_the_pipeline():
    folders = sorted(p.name for p in PACKAGE.iterdir() if p.is_dir() and (p / "__init__.py").exists())
    assert folders == ["generate", "judge", "perceive", "read", "report"]
    loose = sorted(p.stem for p in PACKAGE.glob("*.py"))
    assert loose == ["__init__", "__main__", "cli", "color", "config", "errors", "repair", "terms"]


@pytest.mark.parametrize("module", ["palettecheck", "palettecheck.terms", "palettecheck.errors",
                                    "palettecheck.cli"])
def test_cheap_modules_load_without_numpy(module):
    """The command line builds its options from terms without loading numpy (start-up time)."""
    code = f"import sys; import {module}; assert 'numpy' not in sys.modules, sorted(sys.modules)"
    subprocess.run([sys.executable, "-c", code], check=True)
