"""The command line's contract: one-line errors, exit statuses, outputs all or nothing.

No physical values are checked here (their sources are named in the physics tests); the
rules come from the project's contributor guide (no published source).
"""

import subprocess
import sys

import pytest

DESIGN = ["-m", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height", "12.7mm", "-n", "8", "--cable-od", "5mm"]


@pytest.mark.parametrize(
    "args, needle",
    [
        (["predict", *DESIGN, "--turns", "abc"], "--turns"),
        (["predict", *DESIGN, "--bogus"], "--bogus"),
        (["size"], "--band"),
        (["size", "--band", "1-30MHz", "--max-cores", "0"], "--max-cores"),
        (["extract"], "FILES"),
    ],
)
def test_usage_errors_are_one_line(run_cli, args, needle):
    # Project rule (DEVELOPERS.md): bad input gives one `error: …` line and exit status 2.
    code, out, err = run_cli(*args)
    assert code == 2
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and needle.lower() in lines[0].lower()


def test_outputs_all_or_nothing(run_cli, tmp_path):
    # A later output that cannot be written leaves no earlier one behind, and the error names
    # the file the user gave, not a temporary name.
    good = tmp_path / "good.json"
    bad = "/proc/x.csv"  # passes the up-front checks, fails when written (Linux)
    code, _, err = run_cli("predict", *DESIGN, "--json", good, "--csv", bad)
    assert code == 2 and bad in err and ".x.csv." not in err
    assert not good.exists()
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".")]


def test_closed_pipe_keeps_files(tmp_path):
    # `cmcheck … | head -1`: the files are written before the tables, and the exit status is
    # the shell's SIGPIPE status (128 + 13), not 1, which means "a limit failed".
    out = tmp_path / "p.json"
    proc = subprocess.Popen([sys.executable, "-m", "cmcheck", "predict", *DESIGN, "--rows", "400", "--json", str(out)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    proc.stdout.read(20)
    proc.stdout.close()
    assert proc.wait(timeout=60) == 141
    assert out.exists() and out.stat().st_size > 1000
