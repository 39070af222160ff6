"""The layers depend one way: no module imports a module of a higher layer.

The import graph is read from the source with ``ast`` (imports inside functions
count as well), so a lazy import cannot hide an arrow that runs back up.
"""

from __future__ import annotations

import ast
from pathlib import Path

import bayesgrowth

PACKAGE = Path(bayesgrowth.__file__).parent

#: Lowest first; a module may import its own layer and the layers before it. The
#: same order is written out in DEVELOPERS.md ("Layout").
LAYERS = [
    ["bayesgrowth._version", "bayesgrowth.config", "bayesgrowth.seeds", "bayesgrowth.display",
     "bayesgrowth.lazy"],
    ["bayesgrowth.data"],
    ["bayesgrowth.priors"],
    ["bayesgrowth.scoring", "bayesgrowth.leastsq"],
    ["bayesgrowth.models"],
    ["bayesgrowth.inference"],
    ["bayesgrowth.forecast"],
    ["bayesgrowth.comparison", "bayesgrowth.model"],
    ["bayesgrowth.backtest"],
    ["bayesgrowth.select", "bayesgrowth.batch"],
    ["bayesgrowth.plots"],
    ["bayesgrowth.report"],
    ["bayesgrowth.cli", "bayesgrowth.__main__"],
]


def module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def is_module(name: str) -> bool:
    base = PACKAGE.parent / Path(*name.split("."))
    return base.with_suffix(".py").is_file() or (base / "__init__.py").is_file()


def imported_modules(tree: ast.AST) -> list[tuple[str, int]]:
    """Every module of ours an ``import`` names, with its line, at any depth."""
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out += [(a.name, node.lineno) for a in node.names]
        elif isinstance(node, ast.ImportFrom) and node.module:
            subs = [f"{node.module}.{a.name}" for a in node.names]
            found = [s for s in subs if is_module(s)]
            out += [(s, node.lineno) for s in found] or [(node.module, node.lineno)]
    return [(m, line) for m, line in out if m.split(".")[0] == "bayesgrowth"]


def layer_of(name: str) -> int:
    for i, layer in enumerate(LAYERS):
        if any(name == p or name.startswith(p + ".") for p in layer):
            return i
    raise LookupError(f"{name} is in no layer: add it to LAYERS and to DEVELOPERS.md")


def import_graph() -> dict[str, list[tuple[str, int]]]:
    graph = {}
    for path in sorted(PACKAGE.rglob("*.py")):
        name = module_name(path)
        if name != "bayesgrowth":  # the package itself is the public front: it names all
            graph[name] = imported_modules(ast.parse(path.read_text(encoding="utf-8")))
    return graph


def test_every_module_is_in_a_layer():
    for name in import_graph():
        layer_of(name)


def test_no_import_runs_from_a_lower_layer_to_a_higher_one():
    upward = [
        f"{name}:{line} imports {target}"
        for name, targets in import_graph().items()
        for target, line in targets
        if target != "bayesgrowth" and layer_of(target) > layer_of(name)
    ]
    assert not upward, "\n".join(upward)


def test_the_graph_sees_imports_inside_functions():
    tree = ast.parse("def f():\n    from bayesgrowth.cli.main import main\n")
    assert imported_modules(tree) == [("bayesgrowth.cli.main", 2)]


def test_nothing_imports_the_package_front_for_a_name():
    # ``from bayesgrowth import X`` in the package reaches every layer through the
    # front's lazy names; modules import from where a name lives.
    front = [
        f"{name}:{line}" for name, targets in import_graph().items()
        for target, line in targets if target == "bayesgrowth"
    ]
    assert not front, "\n".join(front)
