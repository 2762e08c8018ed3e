"""The package's layers, read from its source with ``ast`` (nothing is imported).

Each layer imports only the layers below it::

    tinfer/__init__.py, scale/, records.py    the top: public names, Dask, notebook records
    frames/                                  the only code that reads pandas
    analyses/   display/                     side by side: neither imports the other
    results/                                 result types and their words
    core/                                    numpy/scipy on summaries; imports only errors
    errors, checks, optional, docstrings     shared by every layer

Results may reach display/ and analyses/ only lazily, inside the methods of their classes
(``chart()``, ``explore()``, ``check()``, ``plan()``, ...). No module imports another
module's private names. Only :mod:`tinfer.optional` imports the optional packages. No module
is over 400 lines and no function over 80 lines. The rules are the project's own (see the
contributor guide), common practice, no source.
"""

from __future__ import annotations

import ast
from dataclasses import dataclass
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "tinfer"

#: Rank of each top-level part of the package: a module may import only lower ranks
#: (and its own part). analyses and display share a rank and may not import each other.
RANKS = {
    "errors": 0,
    "docstrings": 0,
    "checks": 1,
    "optional": 1,
    "core": 1,
    "results": 2,
    "analyses": 3,
    "display": 3,
    "frames": 4,
    "scale": 5,
    "records": 5,
    "__init__": 6,
}
OPTIONAL = {"altair", "vl_convert", "ipywidgets", "nbclient", "nbformat", "nbconvert"}
MAX_MODULE_LINES = 400
MAX_FUNCTION_LINES = 80


@dataclass(frozen=True)
class Import:
    """One import statement: who imports what, where, and which names."""

    source: str  # dotted module name of the importer, e.g. "tinfer.results.ttest"
    target: str  # dotted module imported from, e.g. "tinfer.display.render"
    names: tuple[str, ...]
    line: int
    lazy: bool  # inside a function
    in_method: bool  # inside a function defined in a class body
    type_only: bool = False  # under ``if TYPE_CHECKING:`` (never runs)


def _module_name(path: Path) -> str:
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _resolve(source: str, is_package: bool, node: ast.ImportFrom) -> str:
    if node.level == 0:
        return node.module or ""
    base = source.split(".")
    if not is_package:
        base = base[:-1]
    base = base[: len(base) - (node.level - 1)]
    return ".".join(base + ([node.module] if node.module else []))


class _Collector(ast.NodeVisitor):
    def __init__(self, source: str, is_package: bool) -> None:
        self.source, self.is_package = source, is_package
        self.stack: list[str] = []  # "class", "def" or "typing"
        self.imports: list[Import] = []
        self.private_attrs: list[tuple[str, int]] = []
        self.aliases: dict[str, str] = {}  # local name -> tinfer module it names

    def _add(self, target: str, names: tuple[str, ...], line: int) -> None:
        lazy = "def" in self.stack
        in_method = lazy and len(self.stack) >= 2 and self.stack[-2:] == ["class", "def"]
        typing = "typing" in self.stack
        self.imports.append(Import(self.source, target, names, line, lazy, in_method, typing))

    def visit_Import(self, node: ast.Import) -> None:
        for a in node.names:
            self._add(a.name, (), node.lineno)
            if a.name.startswith("tinfer"):
                self.aliases[a.asname or a.name.split(".")[0]] = a.name

    def visit_ImportFrom(self, node: ast.ImportFrom) -> None:
        target = _resolve(self.source, self.is_package, node)
        self._add(target, tuple(a.name for a in node.names), node.lineno)
        for a in node.names:  # "from . import charts": a module bound to a name
            if target.startswith("tinfer"):
                self.aliases[a.asname or a.name] = f"{target}.{a.name}"

    def visit_Attribute(self, node: ast.Attribute) -> None:
        if (
            isinstance(node.value, ast.Name)
            and node.value.id in self.aliases
            and node.attr.startswith("_")
            and not node.attr.startswith("__")
        ):
            self.private_attrs.append((f"{node.value.id}.{node.attr}", node.lineno))
        self.generic_visit(node)

    def _scoped(self, kind: str, node: ast.AST) -> None:
        self.stack.append(kind)
        self.generic_visit(node)
        self.stack.pop()

    def visit_If(self, node: ast.If) -> None:
        test = node.test
        if isinstance(test, ast.Name) and test.id == "TYPE_CHECKING":
            self._scoped("typing", node)
        else:
            self.generic_visit(node)

    def visit_ClassDef(self, node: ast.ClassDef) -> None:
        self._scoped("class", node)

    def visit_FunctionDef(self, node: ast.FunctionDef) -> None:
        self._scoped("def", node)

    visit_AsyncFunctionDef = visit_FunctionDef


def _modules() -> list[Path]:
    return sorted(PACKAGE.rglob("*.py"))


def _collect() -> tuple[list[Import], list[tuple[str, str, int]]]:
    imports, private = [], []
    for path in _modules():
        name = _module_name(path)
        c = _Collector(name, path.name == "__init__.py")
        c.visit(ast.parse(path.read_text(encoding="utf-8")))
        imports += c.imports
        private += [(name, attr, line) for attr, line in c.private_attrs]
    return imports, private


def _part(module: str) -> str:
    """The top-level part of a tinfer module: "tinfer.results.ttest" -> "results"."""
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else "__init__"


def _own_imports() -> list[Import]:
    return [i for i in _collect()[0] if i.target.split(".")[0] == "tinfer"]


def _upward(imp: Import) -> bool:
    src, dst = _part(imp.source), _part(imp.target)
    if src == dst:
        return False
    if src == "core":
        return dst != "errors"
    if RANKS[dst] < RANKS[src]:
        return False
    lazy_ok = src == "results" and dst in ("display", "analyses") and imp.in_method
    return not lazy_ok


# ---------------------------------------------------------------------------- the rules
class TestLayers:
    def test_every_part_has_a_rank(self):
        """Every module of the package belongs to a part listed in RANKS."""
        parts = {_part(_module_name(p)) for p in _modules()}
        assert parts <= set(RANKS), sorted(parts - set(RANKS))

    def test_no_import_runs_upward(self):
        """No module imports a higher layer, nor its sibling layer (analyses <-> display)."""
        bad = [f"{i.source}:{i.line} imports {i.target}" for i in _own_imports() if _upward(i)]
        assert not bad, "\n".join(bad)

    def test_results_reach_up_only_inside_methods(self):
        """results/ imports display/ or analyses/ only inside methods (convenience methods)."""
        ups = [
            i
            for i in _own_imports()
            if _part(i.source) == "results" and _part(i.target) in ("display", "analyses")
        ]
        assert ups, "the convenience methods import display/ and analyses/ lazily"
        assert all(i.lazy and i.in_method for i in ups)

    def test_core_imports_only_errors(self):
        """core/ knows nothing of the package but its error classes."""
        outside = {
            i.target
            for i in _own_imports()
            if _part(i.source) == "core" and _part(i.target) != "core"
        }
        assert outside <= {"tinfer.errors"}, outside

    def test_no_private_names_across_modules(self):
        """No `from x import _name` of another module, and no `module._name` on a tinfer module."""
        imports, attrs = _collect()
        bad = [
            f"{i.source}:{i.line} takes {n} from {i.target}"
            for i in imports
            if i.target.startswith("tinfer") and i.target != i.source
            for n in i.names
            if n.startswith("_") and not n.startswith("__")
        ]
        bad += [f"{src}:{line} reads {attr}" for src, attr, line in attrs]
        bad += [
            f"{i.source}:{i.line} imports the private module {i.target}"
            for i in imports
            if any(p.startswith("_") and not p.startswith("__") for p in i.target.split("."))
        ]
        assert not bad, "\n".join(bad)

    def test_optional_packages_only_through_one_helper(self):
        """Only tinfer/optional.py imports altair, vl-convert, ipywidgets or the notebook tools."""
        bad = [
            f"{i.source}:{i.line} imports {i.target}"
            for i in _collect()[0]
            if i.target.split(".")[0] in OPTIONAL
            and i.source != "tinfer.optional"
            and not i.type_only
        ]
        assert not bad, "\n".join(bad)

    def test_the_checker_sees_an_upward_import(self):
        """The rule itself: a module-level import of display from results would be refused."""
        assert _upward(Import("tinfer.results.ttest", "tinfer.display.render", (), 1, False, False))
        assert _upward(Import("tinfer.analyses.plan", "tinfer.display.plan", (), 1, True, False))
        assert _upward(Import("tinfer.core.power", "tinfer.checks", (), 1, False, False))
        assert not _upward(Import("tinfer.frames.batch", "tinfer.analyses", (), 1, False, False))
        assert not _upward(
            Import("tinfer.results.ttest", "tinfer.display.render", (), 1, True, True)
        )


# ---------------------------------------------------------------------------- sizes
def _code_lines(node: ast.FunctionDef | ast.AsyncFunctionDef) -> int:
    """Lines of a function from its ``def`` to its end, its docstring left out."""
    lines = node.end_lineno - node.lineno + 1
    first = node.body[0]
    if isinstance(first, ast.Expr) and isinstance(first.value, ast.Constant):
        if isinstance(first.value.value, str):
            lines -= first.end_lineno - first.lineno + 1
    return lines


def _long_functions() -> list[str]:
    out = []
    for path in _modules():
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef):
                lines = _code_lines(node)
                if lines > MAX_FUNCTION_LINES:
                    out.append(f"{_module_name(path)}.{node.name}: {lines} lines")
    return out


@pytest.mark.parametrize("path", _modules(), ids=lambda p: _module_name(p))
def test_module_size(path):
    """No module is over 400 lines: a longer one holds more than one concept."""
    lines = len(path.read_text(encoding="utf-8").splitlines())
    assert lines <= MAX_MODULE_LINES, f"{lines} lines"


def test_function_size():
    """No function is over 80 lines of code (its docstring not counted)."""
    assert not _long_functions(), "\n".join(_long_functions())
