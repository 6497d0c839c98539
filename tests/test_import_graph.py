"""The package's import graph: layers point one way and no module imports itself round a circle.

Read from the source with Python's own parser (ast), counting imports at module level and inside
functions alike (a function-level import is still a dependency).
"""

import ast
from pathlib import Path

import profilebench

ROOT = Path(profilebench.__file__).parent
# a layer may import only the layers listed for it (and itself); DESIGN of this project
LOWER = {
    "geometry": set(),
    "flow": {"geometry"},
    "assess": {"geometry", "flow"},
    "io": {"geometry", "flow", "assess"},
    "plotting": {"geometry", "flow", "assess", "io"},
    "studies": {"geometry", "flow", "assess", "io"},
    "editor": {"geometry", "flow", "assess", "io", "plotting"},
}


def _module_name(path):
    rel = path.relative_to(ROOT.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _graph():
    graph = {}
    for path in ROOT.rglob("*.py"):
        name = _module_name(path)
        deps = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
                if node.module.startswith("profilebench"):
                    deps.add(node.module)
            elif isinstance(node, ast.Import):
                deps.update(a.name for a in node.names if a.name.startswith("profilebench"))
        graph[name] = deps
    return graph


def _resolve(dep, graph):
    """A dependency as a module of the graph (``from profilebench.x import y`` names module x)."""
    while dep not in graph and "." in dep:
        dep = dep.rsplit(".", 1)[0]
    return dep


def test_no_import_circle_between_modules():
    graph = _graph()
    edges = {m: {_resolve(d, graph) for d in deps} - {m} for m, deps in graph.items()}
    # package __init__ files that only re-export are left out of the circle search
    edges = {
        m: {d for d in ds if d != "profilebench"} for m, ds in edges.items() if m != "profilebench"
    }
    state, stack, circles = {}, [], []

    def visit(m):
        state[m] = 1
        stack.append(m)
        for d in sorted(edges.get(m, ())):
            if state.get(d) == 1:
                circles.append(stack[stack.index(d) :] + [d])
            elif d not in state:
                visit(d)
        stack.pop()
        state[m] = 2

    for m in sorted(edges):
        if m not in state:
            visit(m)
    assert circles == [], f"import circles: {circles}"


def test_layers_import_only_lower_layers_and_never_qt():
    graph = _graph()
    bad = []
    for m, deps in graph.items():
        parts = m.split(".")
        layer = parts[1] if len(parts) > 1 else None
        if layer not in LOWER:
            continue
        for d in deps:
            dl = d.split(".")[1] if d.count(".") else None
            if dl is not None and dl != layer and dl in {"gui", *LOWER} and dl not in LOWER[layer]:
                bad.append((m, d))
        src = (ROOT / Path(*parts[1:])).with_suffix(".py")
        if not src.exists():
            src = ROOT / Path(*parts[1:]) / "__init__.py"
        if "PySide6" in src.read_text(encoding="utf-8"):
            bad.append((m, "PySide6"))
    assert bad == [], f"upward or Qt imports: {bad}"
