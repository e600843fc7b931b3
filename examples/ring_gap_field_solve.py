"""Our own 2-D field solve behind the gap constant k of cmcheck.model.selfcapacitance.

What it solves
--------------
The mid-height section of a ring core in its own plane, treated as invariant along the ring's
axis (every result is per unit height, then multiplied by H). The ferrite annulus a < r < b
has relative permittivity εr; the hole and the outside are air. Each of the N turns shows in
this plane as two bare round conductors, one against the inner wall and one against the outer
wall, at the angle φ_i = Φw·i/(N − 1) and at the potential V_i = i/(N − 1) (the linear turn-
voltage ramp of the energy method). The Laplace equation ∇·(ε∇V) = 0 is solved by finite
volumes on a grid uniform in (ln r, φ): two-dimensional Laplace is conformally invariant, so
the log-polar grid is an ordinary square grid with the same ε, and the stored energy per unit
height is W' = ½ Σ ε (ΔV)² over the grid's faces (the discrete form of ½∫ε|∇V|² dA). The far
boundary (r = 4b) and a circle in the hole (r = a/4) carry no flux: the winding floats.

Capacitance per unit height C' = 2W'/V² (V = 1). The ferrite's share is
C'(εr) − C'(1); the closed form of the module says
    C'(εr) − C'(1) = ε0·(εr − 1)·ln(b/a)·[1/Φw + k/(2π − Φw)],
so each solve gives k = (K − 1/Φw)·(2π − Φw) with K the share in units of ε0(εr − 1)ln(b/a).

Limits, stated: this is a 2-D section. It leaves out the top and bottom faces of the ring,
where the turns cross the ferrite radially and clamp its surface better than the two rim
conductors do here, and the fringing above and below the ring. It is a check of the closed
form's shape and a calibration of k of our own, not a 3-D solve.

Run: ``python examples/ring_gap_field_solve.py`` (a few minutes) prints k for a few rings.
Its output on 2 December 2026 (720 cells round, 0.3 mm wire unless stated):

    ring, turns               Φw/2π  εr    k        ring, turns          Φw/2π  εr    k
    25.4 x 15.5 mm, 28 t      0.25   12  -0.375     16.25 x 7.9 mm, 21 t  0.50   12   0.369
                              0.50   12   0.403                           0.75   12   0.472
                              0.75   12   0.485                           0.90   12   0.341
                              0.90   12   0.360                           0.75   10   0.497
                              0.75   10   0.509                           0.75   15   0.439
                              0.75   15   0.454     10 x 4 mm, 25 t,      0.75   12   0.419
                                                    0.25 mm wire          0.90   12   0.306
                                                                          0.75   10   0.445
                                                                          0.75   15   0.384

Without the quarter ring: k = 0.31–0.51, mean 0.42, the module's GAP_CONSTANT. At a quarter
ring the closely packed turns hold the ferrite under them below the ideal ramp and the fit
goes negative: the closed form over-states the ferrite part there by about 30 %.

References
----------
Finite-volume (five-point) discretisation of ∇·(ε∇V) = 0, the textbook scheme of
M. N. O. Sadiku, *Numerical Techniques in Electromagnetics*, 2nd ed., CRC 2001, ch. 3 (finite
differences in inhomogeneous media; the ε of a face as the series, harmonic mean of its two
cells). Energy form of capacitance:
C = 2W/V² (any electrostatics text, e.g. D. K. Cheng, *Field and Wave Electromagnetics*,
2nd ed., 1989, eq. 3-176).
"""

from __future__ import annotations

import math

import numpy as np
from scipy import sparse
from scipy.sparse import linalg as splinalg

EPS0 = 8.8541878128e-12


def solve_section(od, idd, d_bare, d_out, turns, phi_w, eps_r, n_phi=720):
    """Capacitance per unit height C' [F/m] of the 2-D ring section described above."""
    a, b = idd / 2.0, od / 2.0
    du = 2.0 * math.pi / n_phi
    u0, u1 = math.log(a / 4.0), math.log(4.0 * b)
    n_u = int(math.ceil((u1 - u0) / du))
    u = u0 + (np.arange(n_u) + 0.5) * du
    phi = (np.arange(n_phi) + 0.5) * du
    uu, pp = np.meshgrid(u, phi, indexing="ij")
    r = np.exp(uu)
    eps = np.where((r > a) & (r < b), eps_r, 1.0)
    fixed = np.zeros(r.shape, bool)
    value = np.zeros(r.shape)
    x, y = r * np.cos(pp), r * np.sin(pp)
    n = int(turns)
    for i in range(n):
        ang = phi_w * i / (n - 1)
        for rc in (a - d_out / 2.0, b + d_out / 2.0):
            inside = (x - rc * math.cos(ang)) ** 2 + (y - rc * math.sin(ang)) ** 2 <= (d_bare / 2.0) ** 2
            if not inside.any():  # keep at least the nearest cell: a coarse grid still sees the wire
                k = np.argmin((x - rc * math.cos(ang)) ** 2 + (y - rc * math.sin(ang)) ** 2)
                inside = np.zeros_like(inside)
                inside.flat[k] = True
            fixed |= inside
            value[inside] = i / (n - 1)
    idx = np.arange(r.size).reshape(r.shape)
    # Faces: radial neighbours (no wrap) and angular neighbours (periodic).
    pa = [idx[:-1, :].ravel(), idx[:, :].ravel()]
    pb = [idx[1:, :].ravel(), np.roll(idx, -1, axis=1).ravel()]
    ia, ib = np.concatenate(pa), np.concatenate(pb)
    ea, eb = eps.ravel()[ia], eps.ravel()[ib]
    g = 2.0 * ea * eb / (ea + eb)  # harmonic mean: the series permittivity across a face
    m = r.size
    lap = sparse.coo_matrix((np.concatenate([g, g, -g, -g]),
                             (np.concatenate([ia, ib, ia, ib]), np.concatenate([ia, ib, ib, ia]))),
                            shape=(m, m)).tocsr()
    f = fixed.ravel()
    free = ~f
    v = value.ravel().copy()
    rhs = -lap[free][:, f] @ v[f]
    v[free] = splinalg.spsolve(lap[free][:, free].tocsc(), rhs)
    w = 0.5 * np.sum(g * (v[ia] - v[ib]) ** 2)
    return 2.0 * w * EPS0


def gap_constant(od, idd, d_bare, d_out, turns, phi_w, eps_r=12.0, n_phi=720):
    """k from one pair of solves (εr and air), as defined in the module docstring."""
    c_f = solve_section(od, idd, d_bare, d_out, turns, phi_w, eps_r, n_phi)
    c_a = solve_section(od, idd, d_bare, d_out, turns, phi_w, 1.0, n_phi)
    big_k = (c_f - c_a) / (EPS0 * (eps_r - 1.0) * math.log(od / idd))
    return (big_k - 1.0 / phi_w) * (2.0 * math.pi - phi_w)


if __name__ == "__main__":
    # Only windings that fit: the pitch on the inner wall stays above the wire's diameter.
    rings = [("25.4 x 15.5 mm, 28 t, 0.3 mm", 25.4e-3, 15.5e-3, 0.30e-3, 0.33e-3, 28, (0.25, 0.5, 0.75, 0.9)),
             ("16.25 x 7.9 mm, 21 t, 0.3 mm", 16.25e-3, 7.9e-3, 0.30e-3, 0.33e-3, 21, (0.5, 0.75, 0.9)),
             ("10 x 4 mm, 25 t, 0.25 mm", 10e-3, 4e-3, 0.25e-3, 0.29e-3, 25, (0.75, 0.9))]
    for name, od, idd, d, do, n, fracs in rings:
        for frac, er in [(f, 12.0) for f in fracs] + [(fracs[-2], 10.0), (fracs[-2], 15.0)]:
            k = gap_constant(od, idd, d, do, n, 2 * math.pi * frac, er, n_phi=720)
            print(f"{name:30s} Φw = {frac:4.2f}·2π  εr = {er:4.1f}  k = {k:5.3f}", flush=True)
