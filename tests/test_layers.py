"""The package's import layers: imports flow one way, with no cycles and no private names.

Analytic check of the source tree (no physics): every ``import`` in ``hcfplan/`` is read with
:mod:`ast` (also those inside functions) and compared with the layer order of DEVELOPERS.md.
"""

from __future__ import annotations

import ast
import pathlib

import pytest

PACKAGE = pathlib.Path(__file__).resolve().parents[1] / "hcfplan"

#: Layer of each top-level name below ``hcfplan``: a module may import its own layer and the
#: layers below it, never one above. The order is the one in DEVELOPERS.md ("Layout").
LAYERS = {
    "constants": 0, "units": 0, "errors": 0, "version": 0,
    "numerics": 1,
    "materials": 2, "_gases": 2,
    "fibers": 3, "pulse": 3, "ionization": 3,
    "propagation": 4, "compression": 4, "thz": 4, "limits": 4,
    "io": 5,
    "planning": 6,
    "plotting": 7, "styles": 7, "report": 7,
    "cli": 8,
    "__init__": 9, "__main__": 9, "api": 9,
}
PHYSICS = {name for name, layer in LAYERS.items() if 1 <= layer <= 4}


def _module_name(path: pathlib.Path) -> tuple[str, bool]:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    is_package = parts[-1] == "__init__"
    if is_package:
        parts = parts[:-1]
    return ".".join(parts), is_package


def _modules() -> dict[str, pathlib.Path]:
    return {_module_name(p)[0]: p for p in sorted(PACKAGE.rglob("*.py"))}


MODULES = _modules()


def _imports(path: pathlib.Path) -> list[tuple[str, str | None, int]]:
    """(imported module, imported name or None, line) for every hcfplan import in ``path``."""
    name, is_package = _module_name(path)
    found = []
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = name.split(".")[: None if is_package else -1]
                base = base[: len(base) - (node.level - 1)]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            if target.split(".")[0] != "hcfplan":
                continue
            for alias in node.names:
                if f"{target}.{alias.name}" in MODULES:
                    found.append((f"{target}.{alias.name}", None, node.lineno))
                else:
                    found.append((target, alias.name, node.lineno))
        elif isinstance(node, ast.Import):
            found += [(a.name, None, node.lineno) for a in node.names
                      if a.name.split(".")[0] == "hcfplan"]
    return found


def _layer(module: str) -> tuple[str, int]:
    parts = module.split(".")
    top = parts[1] if len(parts) > 1 else "__init__"
    return top, LAYERS[top]


def test_every_top_level_name_has_a_layer():
    tops = {_layer(m)[0] if len(m.split(".")) > 1 else "__init__" for m in MODULES
            if m.split(".")[1:2] and m.split(".")[1] in LAYERS} | {"__init__"}
    unknown = {m.split(".")[1] for m in MODULES if "." in m} - set(LAYERS)
    assert not unknown, f"add these to LAYERS and to DEVELOPERS.md: {sorted(unknown)}"
    assert tops


@pytest.mark.parametrize("module", sorted(MODULES))
def test_imports_flow_down_the_layers(module):
    top, layer = _layer(module)
    wrong = []
    for target, _, line in _imports(MODULES[module]):
        target_top, target_layer = _layer(target)
        if target_layer > layer:
            wrong.append(f"line {line}: {target} (layer {target_top}={target_layer})")
        if top in PHYSICS and target_top in {"io", "planning", "plotting", "cli"}:
            wrong.append(f"line {line}: physics imports {target}")
    assert not wrong, f"{module} (layer {top}={layer}) imports upwards: {wrong}"


def test_no_import_cycles():
    graph = {m: {t for t, _, _ in _imports(p) if t in MODULES} for m, p in MODULES.items()}
    state: dict[str, int] = {}
    cycles = []

    def visit(node, stack):
        state[node] = 1
        for nxt in sorted(graph[node]):
            if state.get(nxt) == 1:
                cycles.append(stack[stack.index(nxt):] + [nxt] if nxt in stack else [node, nxt])
            elif nxt not in state:
                visit(nxt, stack + [nxt])
        state[node] = 2

    for m in sorted(graph):
        if m not in state:
            visit(m, [m])
    assert not cycles, f"import cycles: {cycles[:5]}"


def _private_uses(path: pathlib.Path) -> list[str]:
    """Private names taken from another module: imported, or read as ``module._name``."""
    name, _ = _module_name(path)
    tree = ast.parse(path.read_text())
    imported_modules = {}
    uses = []
    for target, imported, line in _imports(path):
        if imported and imported.startswith("_") and not imported.startswith("__"):
            if target != name:
                uses.append(f"line {line}: from {target} import {imported}")
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom | ast.Import):
            for alias in node.names:
                full = None
                if isinstance(node, ast.ImportFrom):
                    for target, imported, _ in _imports(path):
                        if imported is None and target.endswith("." + alias.name):
                            full = target
                elif alias.name in MODULES:
                    full = alias.name
                if full:
                    imported_modules[alias.asname or alias.name.split(".")[-1]] = full
    for node in ast.walk(tree):
        if (isinstance(node, ast.Attribute) and isinstance(node.value, ast.Name)
                and node.value.id in imported_modules and node.attr.startswith("_")
                and not node.attr.startswith("__")
                and imported_modules[node.value.id] != name):
            uses.append(f"line {node.lineno}: {node.value.id}.{node.attr}")
    return uses


@pytest.mark.parametrize("module", sorted(MODULES))
def test_no_private_name_crosses_a_module(module):
    uses = _private_uses(MODULES[module])
    assert not uses, f"{module} uses private names of other modules: {uses}"


@pytest.mark.parametrize("module", sorted(MODULES))
def test_no_module_over_600_lines(module):
    lines = len(MODULES[module].read_text().splitlines())
    assert lines <= 600, f"{module} has {lines} lines; split it by responsibility"
