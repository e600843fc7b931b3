"""Make the invented Touchstone files of `cmcheck demo` (cmcheck/demo/data/).

Everything here is INVENTED: a club's batch of member-wound feedline chokes and an unmarked
core from its drawer, computed from the parameters below with a fixed random seed. They are
not measurements of anything. The winding model is written out here (not taken from
cmcheck) so the files stay the same when the library's models improve:

    Z = (jωL0·µ(f) + Rc) ∥ 1/(jωCp),  L0 = µ0·N²/C1,  C1 = 2π/(h·ln(OD/ID))  (IEC 60205 ring)
    µ(f) = 1 + (µi − 1)/(1 + j·f/fr)                                       (Debye relaxation)

Series-through two-port (choke between the port centre pins): S21 = 2·Z0/(2·Z0 + Z),
S11 = Z/(2·Z0 + Z); reflection one-port: S11 = (Z − Z0)/(Z + Z0). Trace noise: complex
Gaussian at −70 dB re 1 on every S-parameter (a bench analyser, common practice).

Run: python examples/make_demo_data.py [OUT_DIR]   (default: cmcheck/demo/data)
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np

SEED = 20261202
Z0 = 50.0
MU0 = 4e-7 * math.pi
NOISE = 10 ** (-70 / 20)
HEADER = "! INVENTED demo data for `cmcheck demo`, made by examples/make_demo_data.py (seed {seed}): not a measurement.\n"

# The batch: 9 turns of 5 mm coax on a 47 x 27 x 15 mm ring of an invented MnZn-like material.
CHOKE_RING = (47e-3, 27e-3, 15e-3)  # OD, ID, height [m]
CHOKE_MATERIAL = (1500.0, 2.0e6)  # µi, relaxation frequency fr [Hz]
UNITS = [  # (turns, Cp [F], conductor resistance [Ω]) of each member's unit
    (9, 2.0e-12, 0.10),
    (9, 2.3e-12, 0.10),
    (7, 1.8e-12, 0.08),  # two turns short: too little resistance at the low end
    (9, 2.1e-12, 0.10),
    (9, 9.0e-12, 0.10),  # turns bunched over each other: Cp high, resonance pulled into the band
    (10, 2.4e-12, 0.11),
    (9, 2.2e-12, 0.10),
    (9, 1.9e-12, 0.10),
]
CHOKE_SWEEP = np.linspace(1e6, 60e6, 296)  # 200 kHz steps [Hz]

# The drawer core: 10 turns of thin wire on a 23 x 14 x 7.5 mm ring of an invented NiZn-like material.
DRAWER_RING = (23e-3, 14e-3, 7.5e-3)
DRAWER_MATERIAL = (250.0, 12e6)
DRAWER_WINDING = (10, 2.5e-12, 0.05)
DRAWER_SWEEP = np.linspace(0.3e6, 100e6, 499)


def winding_z(f, ring, material, turns, cp, rc):
    od, id_, h = ring
    c1 = 2 * math.pi / (h * math.log(od / id_))
    mu_i, fr = material
    mu = 1 + (mu_i - 1) / (1 + 1j * f / fr)
    zw = 1j * 2 * math.pi * f * MU0 * turns**2 / c1 * mu + rc
    return zw / (1 + 1j * 2 * math.pi * f * cp * zw)


def _noise(rng, shape):
    return NOISE * (rng.standard_normal(shape) + 1j * rng.standard_normal(shape)) / math.sqrt(2)


def touchstone(f, s, comment: str) -> str:
    """Plain version-1 Touchstone text, RI format, written here so the bytes never depend on a library."""
    n = s.shape[1]
    lines = [HEADER.format(seed=SEED) + f"! {comment}\n", f"# Hz S RI R {Z0:g}\n"]
    for i, fi in enumerate(f):
        # Two-port order is S11 S21 S12 S22 (Touchstone 1.1); one-port just S11.
        cells = [s[i, 0, 0]] if n == 1 else [s[i, 0, 0], s[i, 1, 0], s[i, 0, 1], s[i, 1, 1]]
        lines.append(f"{fi:.6e} " + " ".join(f"{c.real:.9e} {c.imag:.9e}" for c in cells) + "\n")
    return "".join(lines)


def make(out: Path) -> list[Path]:
    rng = np.random.default_rng(SEED)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    f = CHOKE_SWEEP
    for k, (turns, cp, rc) in enumerate(UNITS, 1):
        z = winding_z(f, CHOKE_RING, CHOKE_MATERIAL, turns, cp, rc)
        s = np.empty((f.size, 2, 2), complex)
        s[:, 1, 0] = s[:, 0, 1] = 2 * Z0 / (2 * Z0 + z)
        s[:, 0, 0] = s[:, 1, 1] = z / (2 * Z0 + z)
        s = s + _noise(rng, s.shape)
        p = out / f"unit-{k:02d}.s2p"
        p.write_text(touchstone(f, s, f"series-through sweep of invented choke unit {k}"), encoding="utf-8")
        written.append(p)
    f = DRAWER_SWEEP
    z = winding_z(f, DRAWER_RING, DRAWER_MATERIAL, *DRAWER_WINDING)
    s = ((z - Z0) / (z + Z0))[:, None, None] + _noise(rng, (f.size, 1, 1))
    p = out / "drawer-core.s1p"
    p.write_text(touchstone(f, s, "reflection sweep of 10 turns on an invented unmarked 23 x 14 x 7.5 mm ring"),
                 encoding="utf-8")
    written.append(p)
    return written


if __name__ == "__main__":
    target = Path(sys.argv[1]) if len(sys.argv) > 1 else Path(__file__).resolve().parents[1] / "cmcheck" / "demo" / "data"
    for path in make(target):
        print(path)
