"""Layering rules of the code base (the project's own, contributor guide; no published source):
the library speaks in parameters, only cmcheck/cli/ knows option names, and the command line
only parses, calls the library and renders reports.
"""

from __future__ import annotations

import ast
import io
import re
import tokenize
from pathlib import Path

import pytest

from cmcheck.cli.flags import FLAGS, names_table, option_message
from cmcheck.errors import CmcheckError

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "cmcheck"
CLI = PACKAGE / "cli"
OPTION = re.compile(r"--[a-z]")


def _library_modules():
    return [p for p in PACKAGE.rglob("*.py") if CLI not in p.parents]


def _strings(path: Path):
    """Every string literal of a module (docstrings and f-string parts included), with its line."""
    text = path.read_text(encoding="utf-8")
    for tok in tokenize.generate_tokens(io.StringIO(text).readline):
        if tok.type == tokenize.STRING or tok.type == getattr(tokenize, "FSTRING_MIDDLE", -1):
            yield tok.start[0], tok.string


def test_no_library_string_names_an_option():
    found = [f"{p.relative_to(ROOT)}:{line}: {s.strip()[:60]}"
             for p in _library_modules() for line, s in _strings(p) if OPTION.search(s)]
    assert not found, "library strings name command-line options:\n" + "\n".join(found)


def _parameters_named_in_errors():
    """Every ``parameter=`` given to an error in the library: constants, tuples, and the keys
    of ``given`` lists whose names it may carry (read from the source, so a new one is seen)."""
    names: set[str] = set()
    for path in _library_modules():
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.keyword) and node.arg == "parameter":
                values = [node.value.body, node.value.orelse] if isinstance(node.value, ast.IfExp) else [node.value]
                for value in values:
                    for sub in ast.walk(value):
                        if isinstance(sub, ast.Constant) and isinstance(sub.value, str):
                            names.add(sub.value)
            # Remedies name the parameter they change (second positional argument).
            if isinstance(node, ast.Call) and getattr(node.func, "id", None) == "Remedy" and len(node.args) > 1:
                if isinstance(node.args[1], ast.Constant) and isinstance(node.args[1].value, str):
                    names.add(node.args[1].value)
    return names


def test_every_parameter_the_library_names_has_an_option():
    names = _parameters_named_in_errors()
    # The heat check names the drive's parameters through a variable: they are read here too.
    assert {"max_cores", "line_r_max", "power_w", "z0", "method", "sizes"} <= names
    assert {"cm_voltage_v", "cm_current_a", "feed_impedance_ohm"} <= names
    missing = sorted(names - FLAGS.keys())
    assert not missing, f"parameters without an option in cmcheck/cli/flags.py: {missing}"


@pytest.mark.parametrize("parameter", sorted(FLAGS))
def test_each_parameter_error_reads_as_its_option(parameter):
    msg = option_message(str(CmcheckError(f"{parameter} must be positive, got 0", parameter=parameter)), parameter)
    assert msg.startswith(FLAGS[parameter].option)
    assert not re.search(rf"(?<![\w-]){re.escape(parameter)}(?![\w-])", msg.replace(FLAGS[parameter].option, ""))


def test_option_message_keeps_other_words():
    # "points" is also an English word: only the parameter named by the error is rewritten,
    # and only where it stands alone.
    assert option_message("points must be at least 2, got 1", "points") == "--points must be at least 2, got 1"
    assert option_message("f.s1p: method series needs a 2-port file", "method") == "f.s1p: --method series needs a 2-port file"
    assert option_message("the table is empty", "sizes") == "--sizes: the table is empty"
    assert option_message("max_cores_x is fine", "max_cores") == "--max-cores: max_cores_x is fine"


@pytest.mark.parametrize(
    "args, option",
    [
        (["size", "--band", "1.8-30MHz", "--max-rise", "0"], "--max-rise must be above 0 K, got 0 K"),
        (["size", "--band", "1.8-30MHz", "--materials", "nizn-800,nizn-800"], "--materials: nizn-800 given more than once"),
        (["size", "--band", "1.8-30MHz", "--power", "0W", "--cm-current", "1A"], "--power must be above 0 W"),
        (["size", "--band", "1.8-30MHz", "--power", "100W", "--cm-current", "0A"], "--cm-current must be above 0 A"),
        (["compare", "--materials", "nizn-800", "--od", "61mm", "--id", "35mm", "--height", "12mm", "--turns", "8",
          "--line-r-max", "-1"], "--line-r-max must be ≥ 0 Ω"),
        (["compare", "--materials", "nizn-800", "--od", "61mm", "--id", "35mm", "--height", "12mm", "--turns", "8",
          "--line-r-max", "0", "--line-x-max", "0"], "--line-r-max and --line-x-max cannot both be 0"),
        (["extract", "x.s2p", "--floor-db", "3"], "--floor-db must be below 0 dB"),
        (["extract", "x.s2p", "--method", "sideways"], "--method 'sideways': choose one of"),
    ],
)
def test_cli_errors_name_the_option(run_cli, tmp_path, monkeypatch, args, option):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "x.s2p").write_text("# Hz S RI R 50\n1e6 0.1 0 0.9 0 0.9 0 0.1 0\n2e6 0.1 0 0.9 0 0.9 0 0.1 0\n")
    code, out, err = run_cli(*args)
    assert code == 2, err
    assert option in err and err.count("\n") == 1


def test_developers_names_table_is_the_flags_table():
    guide = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    assert names_table() in guide, "regenerate the names table: python -c 'from cmcheck.cli.flags import names_table; print(names_table())'"


_FORBIDDEN_IMPORTS = {"matplotlib", "csv", "json", "tempfile", "shutil"}
_FORBIDDEN_CALLS = {"open", "write_text", "write_bytes", "savefig", "dump", "mkstemp", "rename", "unlink"}


def _to_devnull(node: ast.Call) -> bool:
    # A closed pipe sends stdout to the null device: not an output file.
    return bool(node.args) and ast.unparse(node.args[0]) == "os.devnull"


def test_cli_neither_plots_nor_writes_files():
    problems = []
    for path in CLI.rglob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, (ast.Import, ast.ImportFrom)):
                mods = [a.name for a in node.names] if isinstance(node, ast.Import) else [node.module or ""]
                for m in mods:
                    if m.split(".")[0] in _FORBIDDEN_IMPORTS or "plots" in m.split("."):
                        problems.append(f"{path.name}:{node.lineno} imports {m}")
            if isinstance(node, ast.Call):
                name = getattr(node.func, "id", None) or getattr(node.func, "attr", None)
                moves = name == "replace" and ast.unparse(node.func) == "os.replace"
                if (name in _FORBIDDEN_CALLS and not _to_devnull(node)) or moves:
                    problems.append(f"{path.name}:{node.lineno} calls {name}")
    assert not problems, "cli/ must write files and plots through cmcheck.reporting:\n" + "\n".join(problems)


def test_remedies_speak_parameters_in_python_and_options_on_the_command_line():
    from cmcheck.cli.flags import option_phrase
    from cmcheck.design.diagnosis import Diagnosis, Remedy

    more = Remedy("more_cores", "max_cores", 8, template="allow more stacked cores ({set} 8)")
    lower_r = Remedy("lower_target", "target_ohm", 900.0, {"criterion": "resistance"}, template="lower {set} to 900 Ω")
    lower_z = Remedy("lower_target", "target_ohm", 900.0, {"criterion": "impedance"}, template="lower {set} to 900 Ω")
    plain = Remedy("thinner_conductor", template="a thinner cable or wire")
    d = Diagnosis("why", (more, lower_r, lower_z, plain))
    assert d.sentences() == ["allow more stacked cores (max_cores 8)", "lower target_ohm to 900 Ω",
                             "lower target_ohm to 900 Ω", "a thinner cable or wire"]
    assert d.sentences(option_phrase) == ["allow more stacked cores (--max-cores 8)", "lower --target-r to 900 Ω",
                                          "lower --target-z to 900 Ω", "a thinner cable or wire"]
    j = d.to_dict(option_phrase)
    assert j["remedies"][0] == {"kind": "more_cores", "parameter": "max_cores", "value": 8, "facts": {}}
    assert j["relax"][1] == "lower --target-r to 900 Ω"


def test_cli_no_solution_words_remedies_as_options(run_cli):
    # 5 kΩ: beyond every design of the default space whatever the Cp estimate, so the test
    # depends on no physics (it checks wording).
    code, out, err = run_cli("size", "--band", "3.5-30MHz", "--target-r", "5k", "--cable-od", "5mm")
    assert code == 1
    relax = out.split("to relax:")[1]
    assert "--target-r" in relax and "target_ohm" not in relax
