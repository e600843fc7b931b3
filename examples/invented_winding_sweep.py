"""Write an INVENTED reflection sweep of a winding (not measured, not any product) to try
``cmcheck identify`` without a network analyser:

    python examples/invented_winding_sweep.py invented-winding.s1p
    cmcheck identify invented-winding.s1p --od 9.55mm --id 4.75mm --height 3.2mm --turns 12

The winding: 12 turns on a 9.55 × 4.75 × 3.2 mm ring of an invented two-component material
(µi = 771), Cp = 3 pF, 0.05 Ω of wire, 0.1 MHz … 60 MHz, with −70 dB of trace noise.
"""

import math
import sys

import numpy as np
import skrf

MU0 = 4e-7 * math.pi
C1 = 2 * math.pi / (3.2e-3 * math.log(9.55 / 4.75))  # ring core factor (IEC 60205)
TURNS, CP, RC = 12, 3.0e-12, 0.05

f = np.linspace(0.1e6, 60e6, 600)
mu = 1 + 560 * 25e6**2 / (25e6**2 - f**2 + 1j * f * 85e6) + 210 / (1 + 1j * f / 75e6)
w = 2 * np.pi * f
z = 1 / (1 / (1j * w * MU0 * TURNS**2 / C1 * mu + RC) + 1j * w * CP)
s = (z - 50) / (z + 50)
rng = np.random.default_rng(1)
s = s + 10 ** (-70 / 20) * (rng.standard_normal(f.size) + 1j * rng.standard_normal(f.size)) / np.sqrt(2)
name = sys.argv[1] if len(sys.argv) > 1 else "invented-winding.s1p"
net = skrf.Network(frequency=skrf.Frequency.from_f(f, unit="hz"), s=s, z0=50, name=name.rsplit(".", 1)[0])
net.write_touchstone(name.rsplit(".", 1)[0])
print(f"wrote {name}")
