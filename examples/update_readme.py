"""Re-run every `$ cmcheck …` block of README.md and rewrite its output in place.

Run from the repository root after changing anything cmcheck prints:

    python examples/update_readme.py          # rewrite README.md, list the blocks that changed
    python examples/update_readme.py --check  # only report; exit 1 when a block is out of date

Commands run in-process on this checkout, in a temporary folder holding the invented demo
sweeps in demo/ (see tests/readme_transcript.py for the rules); review the diff before
committing. tests/test_readme.py fails while the README and the program disagree.
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path[:0] = [str(ROOT), str(ROOT / "tests")]

import os  # noqa: E402

import readme_transcript as rt  # noqa: E402


def main(argv: list[str]) -> int:
    check = "--check" in argv
    text = rt.README.read_text(encoding="utf-8")
    here = Path.cwd()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        rt.prepare(folder)
        os.chdir(folder)
        try:
            new, changed, failed = rt.update(text, folder)
        finally:
            os.chdir(here)
    for command in changed:
        print(f"{'out of date' if check else 'updated'}: $ {command}")
    if not check and new != text:
        rt.README.write_text(new, encoding="utf-8")
    for problem in failed:
        print(f"FAILED (left as it was): {problem}", file=sys.stderr)
    print(f"{len(rt.blocks(text))} blocks, {len(changed)} {'out of date' if check else 'rewritten'}, {len(failed)} failed")
    return 1 if failed or (check and changed) else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
