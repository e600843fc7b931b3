"""Declared dependencies: every third-party import is declared, with a floor that .ci/run tests.

The rules are the project's own (contributor guide; no published source): a floor in
pyproject.toml is only honest if CI installs exactly it and runs the suite, which .ci/run does
from .ci/constraints-lowest.txt.
"""

import ast
import re
import sys
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
# Import name → distribution name where the two differ.
DISTRIBUTION = {"skrf": "scikit-rf"}


def _floors(requirements):
    out = {}
    for req in requirements:
        m = re.fullmatch(r"([A-Za-z0-9_.-]+)\s*>=\s*([0-9][0-9.]*)", req.strip())
        assert m, f"{req!r}: every dependency needs a plain >= floor"
        out[m.group(1).lower()] = m.group(2)
    return out


def _project():
    return tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]


def _pins():
    pins = {}
    for line in (ROOT / ".ci" / "constraints-lowest.txt").read_text(encoding="utf-8").splitlines():
        line = line.split("#", 1)[0].strip()
        if line:
            name, _, version = line.partition("==")
            pins[name.strip().lower()] = version.strip()
    return pins


def _third_party_imports(folder):
    names = set()
    for path in folder.rglob("*.py"):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Import):
                names.update(a.name.split(".")[0] for a in node.names)
            elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                names.add(node.module.split(".")[0])
    # Scripts of our own (examples/, benchmarks/) that a test loads are first-party too.
    local = {p.stem for d in ("examples", "benchmarks", "tests") for p in (ROOT / d).glob("*.py")}
    return {DISTRIBUTION.get(n, n) for n in names
            if n not in sys.stdlib_module_names and n != "cmcheck" and n not in local}


def test_every_import_of_the_package_is_declared():
    declared = set(_floors(_project()["dependencies"]))
    assert _third_party_imports(ROOT / "cmcheck") <= declared


def test_every_import_of_the_tests_is_declared():
    project = _project()
    declared = set(_floors(project["dependencies"])) | set(_floors(project["optional-dependencies"]["test"]))
    assert _third_party_imports(ROOT / "tests") <= declared


def test_lowest_constraints_pin_exactly_the_floors():
    project = _project()
    floors = _floors(project["dependencies"]) | _floors(project["optional-dependencies"]["test"])
    assert _pins() == floors
