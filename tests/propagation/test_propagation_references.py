"""Every public function of the solver, fiber and derivative/FFT modules names its source.

Kind: contract (house style: a numpy-style ``References`` section in the function's own
docstring, naming the published source with its year, or saying ``none: ...`` for a numerical
helper with no published model). Read with :mod:`ast`, nothing is imported.
"""

from __future__ import annotations

import ast
import pathlib
import re

import pytest

PACKAGE = pathlib.Path(__file__).resolve().parents[2] / "hcfplan"
MODULES = sorted(
    [p for p in (PACKAGE / "propagation").glob("*.py") if p.name != "warmup.py"]
    + list((PACKAGE / "fibers").glob("*.py"))
    + [PACKAGE / "numerics" / "derivatives.py", PACKAGE / "numerics" / "fft.py"]
)
SECTION = re.compile(r"\nReferences\n-{10}\n(?P<body>.+)", re.DOTALL)
YEAR = re.compile(r"\((1[89]|20)\d\d\)")


def _public_functions(path: pathlib.Path):
    """(name, docstring) of the public module-level functions and of the public methods
    (properties included) of the public classes."""
    tree = ast.parse(path.read_text())
    for node in tree.body:
        if isinstance(node, ast.FunctionDef) and not node.name.startswith("_"):
            yield node.name, ast.get_docstring(node) or ""
        if isinstance(node, ast.ClassDef) and not node.name.startswith("_"):
            for item in node.body:
                if isinstance(item, ast.FunctionDef) and not item.name.startswith("_"):
                    yield f"{node.name}.{item.name}", ast.get_docstring(item) or ""


CASES = [(path.relative_to(PACKAGE.parent).as_posix(), name, doc)
         for path in MODULES for name, doc in _public_functions(path)]


def test_the_modules_are_found():
    # the check is not void: the modules and a fair number of functions are seen
    assert len(MODULES) >= 15 and len(CASES) >= 100


@pytest.mark.parametrize(("module", "name", "doc"), CASES,
                         ids=[f"{m}:{n}" for m, n, _ in CASES])
def test_public_function_names_its_source(module, name, doc):
    found = SECTION.search(doc)
    assert found, f"{module}: {name} has no References section"
    body = found.group("body").strip()
    assert body.startswith("none: ") or YEAR.search(body), (
        f"{module}: {name}: References neither cite a source with its year nor say 'none: ...'")
