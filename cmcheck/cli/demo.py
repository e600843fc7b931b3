"""``cmcheck demo``: an invented club station worked through sizing, comparison, a balun,
batch QA and core identification, with every output written into one folder."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from .app import app
from .render import console, show


@app.command()
def demo(
    out: Annotated[Path, typer.Option("--out", help="Folder for the demo's sweeps, JSON, CSV, plots and HTML page.")] = Path("cmcheck-demo"),
    path: Annotated[bool, typer.Option("--path", help="Only print the folder of the packaged demo sweeps.")] = False,
) -> None:
    """Run an invented example through every part of cmcheck and write the results.

    A made-up hilltop club station on 1.8-30 MHz at 100 W: size a feedline choke, compare
    materials for a noisy supply lead, check a 4:1 balun into 200 Ω, test a batch of
    members' chokes against 1 kΩ, and identify an unmarked core. The invented sweeps are
    copied into --out, so `cmcheck extract` can be tried on them next.
    """
    from ..demo import demo_reports, data_dir
    from ..demo.outputs import copy_sweeps, write_outputs

    if path:
        console.print(str(data_dir()), markup=False, highlight=False, soft_wrap=True)
        return
    copy_sweeps(out)
    parts = demo_reports(out)
    written = write_outputs(parts, out)
    for i, part in enumerate(parts):
        console.print(f"{'' if i == 0 else chr(10)}[{chr(ord('a') + i)}] {part.question}", style="bold", markup=False)
        show(part.report)
    sweeps = sorted(p.name for p in out.iterdir() if p.suffix in (".s1p", ".s2p"))
    console.print(f"\nwrote into {out}/: {', '.join(p.name for p in written)}", markup=False, soft_wrap=True)
    console.print(f"invented sweeps to try: {', '.join(sweeps)} (e.g. cmcheck extract {out / sweeps[0]})",
                  markup=False, soft_wrap=True)
