"""An invented scenario, worked through the Python API.

A station runs an off-centre-fed dipole on 3.5–30 MHz and wants at least 1 kΩ of resistive
common-mode impedance on its 5 mm coax. How many turns on two stacked 61 × 35.6 × 12.7 mm
rings of the generic NiZn µi ≈ 800 class, and how does an invented datasheet curve compare?
All numbers here are an invented example; measure what you build.

Run: python examples/feedline_choke.py
"""

from pathlib import Path

from cmcheck import Band, Cable, ChokeDesign, RingCore, Winding, get_material, load_material_csv, predict

band = Band.single(3.5e6, 30e6)
core = RingCore(od=61e-3, id=35.6e-3, height=12.7e-3, stack=2)
materials = [get_material("nizn-800"), load_material_csv(Path(__file__).with_name("invented-nizn-600.csv"))]

for material in materials:
    print(f"{material.name}: {material.description}")
    for turns in range(4, 13, 2):
        design = ChokeDesign(core, material, Winding(turns, Cable(5e-3)))
        s = predict(design, band).summary
        srf = s["self_resonance_hz"]
        print(
            f"  {turns:2d} turns: min R {s['min_resistance_ohm']:7.0f} Ω at {s['min_resistance_hz'] / 1e6:5.2f} MHz, "
            f"self-resonance {srf / 1e6 if srf else float('nan'):5.1f} MHz, "
            f"resistive over {100 * s['resistive_fraction']:3.0f} % of the band"
        )
