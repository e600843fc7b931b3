"""The README's transcripts are the program's real output (project rule, contributor guide;
no published source): every ``$ cmcheck …`` block is run in-process and compared exactly,
after the normalisations stated in ``tests/readme_transcript.py`` (trailing blanks, elapsed
times). Regenerate with ``python examples/update_readme.py``; never edit outputs by hand.
"""

from __future__ import annotations

import difflib

import pytest

import readme_transcript as rt

# The exact text depends on the versions of rich and numpy: the main test job only (project rule).
pytestmark = pytest.mark.transcript

FIX = "run `python examples/update_readme.py` and review the diff"


def test_readme_blocks_parse():
    text = rt.README.read_text(encoding="utf-8")
    found = rt.blocks(text)
    assert len(found) >= 8 and len(rt.file_blocks(text)) == 1
    assert found[0].command.startswith("cmcheck demo --out demo")
    # The set-up commands are exactly the two the project promises, in plain shell blocks.
    head = text.split("## ", 1)[0]
    assert head.count("```sh") == 2
    assert "pip install . && cmcheck demo" in head
    assert "python -m pip install '.[test]' && python -m pytest -q" in head


def test_readme_transcripts_are_the_real_output(run_cli, tmp_path, monkeypatch):
    # A narrow terminal setting must not matter: piped output has a fixed width.
    monkeypatch.setenv("COLUMNS", "40")
    monkeypatch.chdir(tmp_path)
    rt.prepare(tmp_path)
    problems = []
    for block in rt.blocks(rt.README.read_text(encoding="utf-8")):
        code, out, err = run_cli(*rt.argv(block.command, tmp_path))
        assert "Traceback" not in err, block.command
        got, want = rt.transcript(out, err), rt.normalise(block.output)
        if got != want:
            diff = "\n".join(difflib.unified_diff(want, got, "README", "output", lineterm="", n=1))
            problems.append(f"$ {block.command}\n{diff}")
    for fb in rt.file_blocks(rt.README.read_text(encoding="utf-8")):
        got = rt.normalise((tmp_path / fb.path).read_text(encoding="utf-8").splitlines())
        if got != rt.normalise(fb.content):
            problems.append(f"file {fb.path}\n" + "\n".join(difflib.unified_diff(rt.normalise(fb.content), got, lineterm="")))
    assert not problems, f"README transcripts differ from the output ({FIX}):\n" + "\n\n".join(problems)


def test_normalisations_are_only_the_stated_ones():
    # Elapsed time and trailing blanks are forgiven; a changed word or number is not.
    assert rt.normalise(["searched 5 in 0.27 s: 3 meet  ", ""]) == rt.normalise(["searched 5 in 1.5 s: 3 meet"])
    assert rt.normalise(["min R 1,183 Ω"]) != rt.normalise(["min R 1,184 Ω"])
    assert rt.normalise(["result: pass"]) != rt.normalise(["result: PASS"])
    assert rt.normalise(["  indented"]) != rt.normalise(["indented"])


def test_wildcards_expand_like_a_shell(tmp_path):
    (tmp_path / "d").mkdir()
    for n in ("b.s2p", "a.s2p", "c.s1p"):
        (tmp_path / "d" / n).write_text("")
    assert rt.argv("cmcheck extract 'x y' d/*.s2p --band 1-2MHz", tmp_path) == ["extract", "x y", "d/a.s2p", "d/b.s2p",
                                                                               "--band", "1-2MHz"]


def test_update_rewrites_outputs_and_survives_a_crash(tmp_path):
    text = "intro\n```\n$ cmcheck a\nold\n```\nmid\n```\n$ cmcheck b\nkept\n```\n<!-- file: f.toml -->\n```toml\nx\n```\n"
    (tmp_path / "f.toml").write_text("y = 1\n")

    def fake(args):
        if args == ["b"]:
            raise RuntimeError("boom")
        return 0, "new line  \nsecond\n\n", "warning: w\n"

    new, changed, failed = rt.update(text, tmp_path, fake)
    assert new == ("intro\n```\n$ cmcheck a\nwarning: w\nnew line\nsecond\n```\nmid\n```\n$ cmcheck b\nkept\n```\n"
                   "<!-- file: f.toml -->\n```toml\ny = 1\n```\n")
    assert changed == ["cmcheck a", "file f.toml"] and failed == ["cmcheck b: RuntimeError: boom"]


def test_command_lines_never_wrap_even_on_a_narrow_terminal():
    import io

    from cmcheck.cli.render import PIPED_WIDTH, _Console
    from cmcheck.reporting.results import Column, Table
    from cmcheck.reporting.text import render_table

    line = "check #1 in full: cmcheck predict -m mnzn-8000 --od 50mm --id 30mm --height 12.5mm --turns 10 --band 1.8-30MHz"
    narrow = _Console(file=io.StringIO(), force_terminal=True, width=40, highlight=False, color_system=None)
    narrow.print(line, markup=False)
    assert narrow.file.getvalue().rstrip("\n") == line
    # Piped: tables are PIPED_WIDTH wide whatever the console was told.
    piped = _Console(file=io.StringIO(), width=40)
    render_table(Table((Column("a", "a"), Column("b", "b")), (("x" * 60, "y" * 60),)), piped)
    assert max(len(x) for x in piped.file.getvalue().splitlines()) > 40 and piped.width == PIPED_WIDTH
