"""The map is true: imports point one way, the engine imports no user interface, and there are no cycles.

The import graph is read from the source with ``ast`` (every ``import`` and ``from ... import``,
including the ones inside functions), so a lazy import counts too.
"""
from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
PACKAGES = ("heatbalance", "webapp")


def module_name(path: Path) -> str:
    parts = path.relative_to(ROOT).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def imports_of(path: Path) -> set[str]:
    """Every module a file imports (absolute names; relative imports resolved)."""
    name = module_name(path)
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            found.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = package.split(".")[: len(package.split(".")) - node.level + 1]
                base = ".".join([*anchor, base] if base else anchor)
            found.add(base)
            found.update(f"{base}.{alias.name}" for alias in node.names)
    return found


def graph() -> dict[str, set[str]]:
    files = [p for package in PACKAGES for p in (ROOT / package).rglob("*.py")]
    modules = {module_name(p): p for p in files}
    return {name: {m for m in imports_of(path) if m in modules and m != name} for name, path in modules.items()}


#: the command line sits on top, beside the page: it may use the presentation
USER_INTERFACES = ("heatbalance.cli", "heatbalance.__main__")


def engine_modules() -> list[str]:
    return sorted(m for m in graph() if m.startswith("heatbalance") and not m.startswith("heatbalance.present")
                  and m not in USER_INTERFACES)


@pytest.mark.parametrize("module", engine_modules())
def test_the_engine_imports_no_user_interface_and_no_presentation(module):
    path = next(p for p in (ROOT / "heatbalance").rglob("*.py") if module_name(p) == module)
    imported = imports_of(path)
    assert not {m for m in imported if m.split(".")[0] in ("streamlit", "plotly", "webapp")}
    assert not {m for m in imported if m.startswith("heatbalance.present")}


def test_nothing_in_heatbalance_imports_streamlit():
    for path in (ROOT / "heatbalance").rglob("*.py"):
        assert not {m for m in imports_of(path) if m.split(".")[0] in ("streamlit", "webapp")}, path


def test_the_solver_does_not_import_the_analyses():
    for module in ("heatbalance.balance", "heatbalance.problem", "heatbalance.results"):
        assert not {m for m in graph()[module] if m.startswith("heatbalance.analyses")}, module


def test_only_the_problem_module_reads_typed_units():
    """``to_si`` (typed unit -> SI float) is called by the problem builder and the unit layer, nowhere else
    in the solve path; the presentation writes with ``from_si``."""
    callers = set()
    for path in (ROOT / "heatbalance").rglob("*.py"):
        if "to_si(" in path.read_text(encoding="utf-8"):
            callers.add(module_name(path))
    assert callers == {"heatbalance.problem", "heatbalance.units"}


def test_there_are_no_import_cycles():
    edges = graph()
    visiting, done, cycles = set(), set(), []

    def visit(node: str, trail: list[str]) -> None:
        if node in done:
            return
        if node in visiting:
            cycles.append(trail[trail.index(node):] + [node])
            return
        visiting.add(node)
        for child in sorted(edges[node]):
            # a package's __init__ importing its own submodule is not a cycle of the design
            if not child.startswith(node + "."):
                visit(child, trail + [child])
        visiting.discard(node)
        done.add(node)

    for start in sorted(edges):
        visit(start, [start])
    assert cycles == []


def test_the_layout_in_the_developers_guide_names_every_module():
    guide = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    layout = guide[guide.index("## Layout"):guide.index("## Run")]
    for path in sorted((ROOT / "heatbalance").rglob("*.py")) + sorted((ROOT / "webapp").rglob("*.py")):
        if path.name in ("__init__.py", "__main__.py"):
            continue
        assert path.name in layout, f"{path.relative_to(ROOT)} is missing from DEVELOPERS.md's layout"


def layout_order() -> list[str]:
    """The engine's modules in the order DEVELOPERS.md lists them (folders as packages)."""
    guide = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    block = guide[guide.index("heatbalance/ "):guide.index("tests/ ")]
    order, folder = [], None
    for line in block.splitlines()[1:]:
        indent = len(line) - len(line.lstrip(" "))
        entry = line.strip().split(" ")[0].rstrip(",")
        if indent == 2 and entry.endswith("/") and entry != "data/":
            folder = entry.rstrip("/")
            order.append(f"heatbalance.{folder}")
        elif indent == 2 and entry.endswith(".py"):
            folder = None
            order.append(f"heatbalance.{entry.removesuffix('.py')}")
        elif indent == 4 and entry.endswith(".py") and folder:
            order.append(f"heatbalance.{folder}.{entry.removesuffix('.py')}")
    return order


def test_each_engine_module_imports_only_modules_listed_above_it():
    order = layout_order()
    edges = graph()
    assert {m for m in edges if m.startswith("heatbalance.")} - {"heatbalance.__main__"} <= set(order)
    for position, module in enumerate(order):
        above = set(order[:position]) | {module}
        package = module if any(m.startswith(module + ".") for m in order) else None
        late = {m for m in edges.get(module, ()) if m.startswith("heatbalance.") and m not in above
                and not (package and m.startswith(package + "."))}
        assert not late, f"{module} imports {sorted(late)}, listed below it in DEVELOPERS.md"
