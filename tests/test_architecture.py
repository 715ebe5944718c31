"""The arrows of the architecture, checked on the source: engines know nothing of Django, nothing below a view
imports a view, no module imports itself back through a cycle, and no project import hides behind ImportError.

docs/architecture.md draws the same picture in words. A failure here names the module and the import.
"""

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
PACKAGES = ("core", "procedures", "inspections", "demo", "legwork")

# Plain-Python engines: they must import without Django settings (checks outside the repository call them).
ENGINES = [
    "core/units.py", "procedures/electrodes.py", "procedures/prequalified.py", "procedures/qualification.py",
    "procedures/heat_input.py", "procedures/support.py", "procedures/applicability.py", "procedures/base_metals.py",
    "procedures/electrode_list.py",
    "inspections/acceptance.py", "inspections/strength.py", "inspections/observations.py", "inspections/fit_up.py",
    "inspections/visual_timing.py", "core/notation.py", "core/charts.py",
    "inspections/credentials.py", "inspections/calibration.py", "inspections/preheat.py", "inspections/consumables.py",
    "inspections/weld_symbols.py", "inspections/criteria/__init__.py", "inspections/criteria/base.py",
    "inspections/criteria/aws_d1_1_2020.py", "inspections/criteria/iso_5817_2014.py",
]


def _modules():
    for package in PACKAGES:
        for path in (ROOT / package).rglob("*.py"):
            if "migrations" not in path.parts:
                yield path


def _name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _imports(path: Path, *, top_level_only=False):
    """(imported module, line) for every import in the file; relative imports resolved."""
    tree = ast.parse(path.read_text(), filename=str(path))
    package = _name(path) if path.name == "__init__.py" else _name(path).rpartition(".")[0]
    nodes = tree.body if top_level_only else ast.walk(tree)
    for node in nodes:
        if isinstance(node, ast.Import):
            for alias in node.names:
                yield alias.name, node.lineno
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = package.split(".")
                anchor = anchor[: len(anchor) - node.level + 1]
                base = ".".join([*anchor, base] if base else anchor)
            yield base, node.lineno
            for alias in node.names:  # "from inspections import packets" imports a module too
                yield f"{base}.{alias.name}", node.lineno


def _project(name: str) -> bool:
    return name.split(".")[0] in PACKAGES


@pytest.mark.parametrize("engine", ENGINES)
def test_engines_import_nothing_of_django(engine):
    bad = [(name, line) for name, line in _imports(ROOT / engine)
           if name.split(".")[0] == "django" or (_project(name) and name.split(".")[0] in ("core",)
                                                  and not name.startswith("core.units"))]
    assert not bad, f"{engine} imports {bad}: an engine is plain Python (docs/architecture.md)"


def test_engines_import_only_engines():
    engine_names = {_name(ROOT / e) for e in ENGINES} | {"inspections.criteria"}
    for engine in ENGINES:
        for name, line in _imports(ROOT / engine):
            module = name if name in engine_names else name.rpartition(".")[0]
            if _project(name) and name not in PACKAGES:  # a bare package (empty __init__) is fine
                assert name in engine_names or module in engine_names, f"{engine}:{line} imports {name}"


def test_nothing_but_urls_and_views_imports_a_view():
    for path in _modules():
        me = _name(path)
        if ".views" in me or me.endswith("urls"):
            continue
        for name, line in _imports(path):
            assert ".views" not in f"{name}." or not _project(name), f"{me}:{line} imports the view {name}"


def test_no_project_import_hides_behind_import_error():
    for path in _modules():
        tree = ast.parse(path.read_text())
        for node in ast.walk(tree):
            if isinstance(node, ast.Try) and any(
                    isinstance(h.type, ast.Name) and h.type.id in ("ImportError", "ModuleNotFoundError")
                    for h in node.handlers):
                hidden = [n for n in ast.walk(node) if isinstance(n, (ast.Import, ast.ImportFrom))
                          and _project(getattr(n, "module", None) or n.names[0].name)]
                assert not hidden, f"{_name(path)}:{node.lineno} hides a project import behind ImportError"


def test_no_import_cycles_between_modules():
    """Module-level imports form no cycle (imports inside functions are allowed, and should be rare)."""
    modules = {_name(p): p for p in _modules()}
    graph = {}
    for me, path in modules.items():
        targets = set()
        for name, _line in _imports(path, top_level_only=True):
            while name and name not in modules:
                name = name.rpartition(".")[0]
            if name and name != me and not me.startswith(name + "."):
                targets.add(name)
        graph[me] = targets
    seen, on_path, cycles = set(), [], []

    def visit(node):
        if node in on_path:
            cycles.append(on_path[on_path.index(node):] + [node])
            return
        if node in seen:
            return
        seen.add(node)
        on_path.append(node)
        for target in sorted(graph.get(node, ())):
            visit(target)
        on_path.pop()

    for node in sorted(graph):
        visit(node)
    assert not cycles, "import cycles: " + "; ".join(" -> ".join(c) for c in cycles)
