"""Sizes a reader can hold: modules up to about 400 lines, functions up to 60 lines of code.

A function's docstring does not count (a public function's numpydoc may be long); its
signature and body do. Measured from the source with ``ast``.
"""

from __future__ import annotations

import ast
from pathlib import Path

import bayesgrowth

PACKAGE = Path(bayesgrowth.__file__).parent
MAX_MODULE_LINES = 400
MAX_FUNCTION_LINES = 60
#: Waiting for a split, each with its reason; nothing new goes here.
EXEMPT = {
    "inference/kalman.py:_gram_kernel": "one compiled loop of the exact engine's filter",
}


def _sources():
    for path in sorted(PACKAGE.rglob("*.py")):
        yield path.relative_to(PACKAGE).as_posix(), path.read_text(encoding="utf-8")


def code_lines(node: ast.FunctionDef | ast.AsyncFunctionDef) -> int:
    """Lines of a function from ``def`` to its end, less its docstring."""
    lines = node.end_lineno - node.lineno + 1
    first = node.body[0]
    if isinstance(first, ast.Expr) and isinstance(first.value, ast.Constant) and isinstance(
            first.value.value, str):
        lines -= first.end_lineno - first.lineno + 1
    return lines


def test_modules_stay_under_the_line_limit():
    long = [f"{name}: {text.count(chr(10))} lines" for name, text in _sources()
            if text.count("\n") > MAX_MODULE_LINES and name not in EXEMPT]
    assert not long, "split these modules:\n" + "\n".join(long)


def test_functions_stay_under_the_line_limit():
    long = []
    for name, text in _sources():
        for node in ast.walk(ast.parse(text)):
            if isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef):
                n = code_lines(node)
                if n > MAX_FUNCTION_LINES and f"{name}:{node.name}" not in EXEMPT:
                    long.append(f"{name}:{node.lineno} {node.name}: {n} lines")
    assert not long, "split these functions:\n" + "\n".join(long)


def test_the_measure_leaves_out_the_docstring():
    tree = ast.parse('def f():\n    """Doc\n\n    more.\n    """\n    return 1\n')
    assert code_lines(tree.body[0]) == 2
