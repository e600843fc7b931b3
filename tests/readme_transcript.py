"""README transcripts: every fenced block whose first line is ``$ cmcheck …`` is a command and
its exact output. Shared by ``tests/test_readme.py`` (compares) and ``examples/update_readme.py``
(re-runs every command and rewrites the outputs).

A block shows standard error first, then standard output, as piped output (fixed width).
Commands run in-process, one after another, in one working folder that starts with the
invented demo sweeps in ``demo/`` (the ``cmcheck demo --out demo`` block adds its outputs
there). Arguments with ``*`` or ``?`` are expanded as a shell would (sorted, relative to that
folder).

A fenced block right after the line ``<!-- file: demo/NAME -->`` shows that file as the
commands left it (the demo's design file) and is compared and rewritten the same way.

Normalisations, the only ones (both sides): trailing blanks of each line are dropped, and an
elapsed time ``in 0.42 s`` reads ``in … s``.

Sources: no physical values here. The transcript format (prompt ``$ cmcheck ``, stderr before
stdout, the ``<!-- file: … -->`` marker) and the two normalisations are the project's own
conventions for its README (README.md, examples/update_readme.py); the expected outputs are the
README's own text, and the demo sweeps it starts from are invented (examples/make_demo_data.py).
"""

from __future__ import annotations

import contextlib
import glob
import io
import re
import shlex
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

ROOT = Path(__file__).resolve().parents[1]
README = ROOT / "README.md"
PROMPT = "$ cmcheck "  # the README's own transcript prompt (project convention)
# Markdown fences (``` or ~~~, three or more): CommonMark spec, "Fenced code blocks".
_FENCE = re.compile(r"^(```+|~~~+)")
_ELAPSED = re.compile(r"\bin \d+(?:\.\d+)? s\b")  # the project's own normalisation (run times vary)


@dataclass(frozen=True)
class Block:
    """One transcript: the README lines [start, end) between its fences."""

    start: int  # index of the command line
    end: int  # index of the closing fence
    command: str  # without the prompt's "$ "
    output: tuple[str, ...]


def blocks(text: str) -> list[Block]:
    """Every fenced block of ``text`` whose first line starts with ``$ cmcheck ``."""
    lines = text.split("\n")
    found, i = [], 0
    while i < len(lines):
        m = _FENCE.match(lines[i])
        if not m:
            i += 1
            continue
        fence = m.group(1)
        j = i + 1
        while j < len(lines) and not lines[j].startswith(fence):
            j += 1
        if j < len(lines) and i + 1 < j and lines[i + 1].startswith(PROMPT):
            found.append(Block(i + 1, j, lines[i + 1][2:], tuple(lines[i + 2:j])))
        i = j + 1
    return found


_FILE_MARK = re.compile(r"^<!-- file: (\S+) -->$")


@dataclass(frozen=True)
class FileBlock:
    """A fenced block showing a file the commands wrote: README lines [start, end) inside the fences."""

    start: int
    end: int
    path: str
    content: tuple[str, ...]


def file_blocks(text: str) -> list[FileBlock]:
    """Every fenced block announced by ``<!-- file: PATH -->`` on the line before it."""
    lines = text.split("\n")
    found = []
    for i, line in enumerate(lines[:-1]):
        m = _FILE_MARK.match(line.strip())
        fence = _FENCE.match(lines[i + 1])
        if m and fence:
            j = i + 2
            while j < len(lines) and not lines[j].startswith(fence.group(1)):
                j += 1
            found.append(FileBlock(i + 2, j, m.group(1), tuple(lines[i + 2:j])))
    return found


def normalise(lines) -> list[str]:
    """The stated normalisations: trailing blanks, elapsed times; trailing empty lines."""
    out = [_ELAPSED.sub("in … s", line.rstrip()) for line in lines]
    while out and not out[-1]:
        out.pop()
    return out


def argv(command: str, cwd: Path) -> list[str]:
    """The arguments after ``cmcheck``, with shell-style wildcards expanded in ``cwd``."""
    words = shlex.split(command)
    assert words[0] == "cmcheck", command
    args = []
    for w in words[1:]:
        if any(c in w for c in "*?["):
            matches = sorted(glob.glob(w, root_dir=cwd))
            args += matches or [w]
        else:
            args.append(w)
    return args


def prepare(folder: Path) -> None:
    """The working folder a fresh reader has after the README's first step: the demo sweeps in demo/."""
    from cmcheck.demo.outputs import copy_sweeps

    copy_sweeps(folder / "demo")


def run_in_process(args: list[str]) -> tuple[int, str, str]:
    """Run ``cmcheck args`` here; (exit status, stdout, stderr)."""
    from cmcheck.cli import main

    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(args)
    return code, out.getvalue(), err.getvalue()


def transcript(stdout: str, stderr: str) -> list[str]:
    """What a block shows: standard error, then standard output."""
    return normalise(stderr.splitlines() + stdout.splitlines())


def update(text: str, cwd: Path, run: Callable[[list[str]], tuple[int, str, str]] = run_in_process):
    """``text`` with every block's output replaced by the command's.

    Returns (new text, changed blocks, failures); a command that crashes or a file block whose
    file was not written is left as it was and listed in the failures."""
    lines = text.split("\n")
    changed = []
    results = []
    failed = []
    for b in blocks(text):
        try:
            _, out, err = run(argv(b.command, cwd))
        except Exception as exc:  # a crash leaves the block as it was and is reported
            failed.append(f"{b.command}: {type(exc).__name__}: {exc}")
            continue
        results.append((b, out, err))
    edits = []
    for b, out, err in results:
        shown = [line.rstrip() for line in (err.splitlines() + out.splitlines())]
        if transcript(out, err) != normalise(b.output):
            changed.append(b.command)
        edits.append((b.start + 1, b.end, shown))
    for fb in file_blocks(text):
        if not (cwd / fb.path).is_file():
            failed.append(f"file {fb.path}: not written by the commands above it")
            continue
        content = (cwd / fb.path).read_text(encoding="utf-8").splitlines()
        if normalise(content) != normalise(fb.content):
            changed.append(f"file {fb.path}")
        edits.append((fb.start, fb.end, content))
    for start, end, shown in sorted(edits, reverse=True):
        while shown and not shown[-1]:
            shown.pop()
        lines[start:end] = shown
    return "\n".join(lines), changed, failed
