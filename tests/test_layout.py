"""The package's layout rules, read from its source with ``ast`` (common practice for enforcing layering).

* No import cycle between meltzone's modules (imports inside functions count too).
* The consumers of an evolution (results, layers, plot, report, the sweep package) import no kernel module:
  they see only the History contract and the Result.
* numba is imported only by the numba-only package (and the jit-options module).
* No module is longer than MAX_LINES lines.
"""

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1] / "meltzone"
MAX_LINES = 650
#: Modules that hold numba kernels or their layout; nothing downstream of the History may import them.
KERNEL_PREFIXES = ("meltzone._core", "meltzone.evolution.boundary_layer", "meltzone.evolution.mixing_length")
#: What consumers may import of the evolution package: the contract and the scheme table.
ALLOWED_EVOLUTION = ("meltzone.evolution.contract", "meltzone.evolution.schemes")
CONSUMERS = ("meltzone.results", "meltzone.layers", "meltzone.plot", "meltzone.report", "meltzone.sweep")


def _module_name(path: Path) -> str:
    parts = path.relative_to(ROOT.parent).with_suffix("").parts
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _modules():
    return {_module_name(p): p for p in ROOT.rglob("*.py")}


def _imports(name: str, path: Path) -> set[str]:
    """Absolute names of the meltzone modules ``name`` imports (anywhere in the file)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    package = name if path.name == "__init__.py" else name.rsplit(".", 1)[0]
    out = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out |= {a.name for a in node.names if a.name.startswith("meltzone")}
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[:len(base) - (node.level - 1)]
                mod = ".".join(base + ([node.module] if node.module else []))
            else:
                mod = node.module or ""
            if not mod.startswith("meltzone"):
                continue
            out.add(mod)
            for a in node.names:  # "from . import kernel" imports a module
                out.add(f"{mod}.{a.name}")
    return out


def _graph():
    mods = _modules()
    return {name: {m for m in _imports(name, path) if m in mods and m != name} for name, path in mods.items()}


def test_no_import_cycle():
    graph = _graph()
    # a package's __init__ importing its own submodules is how packages re-export; not a cycle
    edges = {a: {b for b in bs if not b.startswith(a + ".")} for a, bs in graph.items()}
    state, stack = {}, []

    def visit(node):
        state[node] = 1
        stack.append(node)
        for nxt in sorted(edges[node]):
            if state.get(nxt) == 1:
                cycle = stack[stack.index(nxt):] + [nxt]
                pytest.fail("import cycle: " + " -> ".join(cycle))
            if nxt not in state:
                visit(nxt)
        stack.pop()
        state[node] = 2

    for node in sorted(edges):
        if node not in state:
            visit(node)


def test_consumers_import_no_kernel():
    graph = _graph()
    consumers = [m for m in graph if any(m == c or m.startswith(c + ".") for c in CONSUMERS)]
    assert "meltzone.results" in consumers and "meltzone.layers" in consumers
    bad = {m: sorted(i for i in graph[m] if i.startswith(KERNEL_PREFIXES)
                     or (i.startswith("meltzone.evolution") and i not in ALLOWED_EVOLUTION)) for m in consumers}
    assert not {m: v for m, v in bad.items() if v}


def test_numba_only_in_the_kernel_package():
    offenders = []
    for name, path in _modules().items():
        if name.startswith("meltzone._core"):
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            names = ([a.name for a in node.names] if isinstance(node, ast.Import)
                     else [node.module or ""] if isinstance(node, ast.ImportFrom) and not node.level else [])
            if any(n == "numba" or n.startswith("numba.") for n in names):
                offenders.append(name)
    assert not offenders


def test_no_module_over_the_size_limit():
    long = {name: n for name, path in _modules().items()
            if (n := len(path.read_text(encoding="utf-8").splitlines())) > MAX_LINES}
    assert not long
