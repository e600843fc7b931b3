"""The house rules the layout keeps: modules under 500 lines, no import cycles among the
package's modules, and folders that match the contributor guide's architecture table.

The rules are the project's own (contributor guide; common practice, no published source).
"""

from __future__ import annotations

import ast
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "cmcheck"


def _modules() -> dict[str, Path]:
    out = {}
    for p in PACKAGE.rglob("*.py"):
        parts = p.relative_to(ROOT).with_suffix("").parts
        name = ".".join(parts[:-1] if parts[-1] == "__init__" else parts)
        out[name] = p
    return out


def _runtime_imports(name: str, path: Path, known: set[str]) -> set[str]:
    """Modules of the package that ``path`` imports when it runs (``if TYPE_CHECKING:`` blocks
    are annotations only and skipped)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    skip = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
            skip.update(id(n) for n in ast.walk(node))
    package = name if path.name == "__init__.py" else name.rsplit(".", 1)[0]
    found = set()
    for node in ast.walk(tree):
        if id(node) in skip:
            continue
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")[: len(package.split(".")) - (node.level - 1)]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            for alias in node.names:
                sub = f"{target}.{alias.name}"
                found.add(sub if sub in known else target)
        elif isinstance(node, ast.Import):
            found.update(a.name for a in node.names)
    return {m for m in found if m in known and m != name}


def test_no_module_over_500_lines():
    long = {str(p.relative_to(ROOT)): n for p in PACKAGE.rglob("*.py")
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > 500}
    assert not long, f"modules over 500 lines: {long}"


def test_no_import_cycles_among_modules():
    mods = _modules()
    known = set(mods)
    # A package's __init__ re-exports its modules; an edge to a package is an edge to its
    # __init__ only, which is how Python imports it.
    graph = {m: _runtime_imports(m, p, known) for m, p in mods.items()}
    cycles = []
    state: dict[str, int] = {}
    stack: list[str] = []

    def visit(m: str) -> None:
        state[m] = 1
        stack.append(m)
        for n in sorted(graph[m]):
            if state.get(n) == 1:
                cycles.append(stack[stack.index(n):] + [n])
            elif n not in state:
                visit(n)
        stack.pop()
        state[m] = 2

    for m in sorted(graph):
        if m not in state:
            visit(m)
    # Importing a module imports its package's __init__ first, so a package __init__ that
    # re-exports its own modules is not a cycle: drop edges from a module to its own package.
    real = [c for c in cycles if not any(b == a.rsplit(".", 1)[0] for a, b in zip(c, c[1:]))]
    assert not real, "import cycles: " + "; ".join(" → ".join(c) for c in real)


def test_contributor_guide_names_every_module():
    # The architecture table names each module file, so a newcomer finds the room for a change.
    guide = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    missing = [p.relative_to(ROOT).as_posix() for p in sorted(PACKAGE.rglob("*.py"))
               if p.name not in ("__init__.py", "__main__.py") and p.name not in guide]
    assert not missing, f"modules the contributor guide's architecture does not name: {missing}"
