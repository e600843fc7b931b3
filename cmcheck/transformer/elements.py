"""Transformer elements as terminal admittance matrices, stacked over frequency (F, n, n).

* A line on a core: N conductors wound together. The differential modes are a transmission
  line; the common mode (the net current) sees the winding's impedance on the core.
* Flux-coupled windings: several windings on one core sharing the magnetising impedance,
  each with its own leakage impedance.

Every function returns the admittance seen at the element's terminals, so a circuit is the
sum of the stamps (:mod:`cmcheck.transformer.circuit`).
"""

from __future__ import annotations

import numpy as np

from ..errors import TransformerError

__all__ = [
    "coupled_windings_y",
    "line_on_core_y",
    "line_two_port_y",
    "pair_on_core_y",
    "two_pairs_one_core_y",
]


def _as_f(x, f_len: int, name: str) -> np.ndarray:
    a = np.asarray(x, dtype=complex)
    if a.ndim == 0:
        a = np.full(f_len, a)
    if a.shape != (f_len,):
        raise TransformerError(f"{name} must be a scalar or have shape ({f_len},), got {a.shape}")
    if not np.all(np.isfinite(a)):
        raise TransformerError(f"{name} must be finite")
    return a


def line_two_port_y(zc, gamma_l):
    """Admittance matrix of a uniform line section, Y = [[coth, −csch], [−csch, coth]]/Zc.

    Parameters
    ----------
    zc : array_like of complex
        Characteristic impedance [Ω], shape (F,).
    gamma_l : array_like of complex
        γ·l = αl + jθ [dimensionless], shape (F,), not zero.

    Returns
    -------
    numpy.ndarray of complex
        Y [S], shape (F, 2, 2).

    Notes
    -----
    The entries are formed from cosh and sinh directly, with no subtraction, so they keep
    full relative precision as θ → 0 (where the line tends to a short and Y grows as 1/θ;
    a zero-length line is refused rather than divided by).

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, Table 4.2 (ABCD of a line)
    and Table 4.1 (ABCD → Y: Y11 = D/B, Y12 = (BC − AD)/B = −1/B, Y22 = A/B).
    """
    zc = np.asarray(zc, dtype=complex)
    gl = np.asarray(gamma_l, dtype=complex)
    if np.any(gl == 0):
        raise TransformerError("line electrical length must be non-zero (frequency and length > 0)")
    sh = np.sinh(gl)
    ch = np.cosh(gl)
    y11 = ch / (zc * sh)
    y12 = -1.0 / (zc * sh)
    return np.stack([np.stack([y11, y12], -1), np.stack([y12, y11], -1)], -2)


def line_on_core_y(conductors: int, zc_pair, gamma_l, z_winding=None):
    """Terminal admittance of N conductors wound together on a core (symmetric bundle).

    Terminals are ordered (c1 end 1, …, cN end 1, c1 end 2, …, cN end 2). With the projector
    P = I − 11ᵀ/N onto the differential subspace, Y_d the two-port admittance of a line of the
    per-conductor modal impedance Zc/2, and S = [[1, −1], [−1, 1]] between the two ends:
    Y = Y_d ⊗ P + S ⊗ 11ᵀ/(N²·Zw) — the form Mᵀ·diag(Y_line, Y_cm)·M for N conductors.

    Parameters
    ----------
    conductors : int
        N ≥ 2 conductors in the bundle (2: bifilar, 3: trifilar).
    zc_pair : array_like of complex
        Characteristic impedance between any two conductors of the bundle [Ω], shape (F,).
    gamma_l : array_like of complex
        Propagation constant times length of the differential modes [dimensionless], (F,).
    z_winding : array_like of complex or None
        Impedance the net (common-mode) current sees: the bundle's winding on the core, e.g.
        ``cmcheck.model.choke.choke_impedance`` for the bundle's turns [Ω], shape (F,).
        None means ideal choking (no net current).

    Returns
    -------
    numpy.ndarray of complex
        Y [S], shape (F, 2N, 2N).

    Notes
    -----
    Stated approximations: all conductor pairs are alike (a twisted bundle), so the N − 1
    differential modes share one modal impedance Zc/2 per conductor and one γ (a flat
    trifilar ribbon has unequal modes); the common mode is a lumped series impedance, its
    own propagation along the winding neglected (a winding short against a wavelength).
    For N = 2 this is the four-terminal line-on-core element with Vd = V1 − V2 and
    Vc = (V1 + V2)/2.

    References
    ----------
    Modal decomposition of a multiconductor line: C. R. Paul, *Analysis of Multiconductor
    Transmission Lines*, 2nd ed., Wiley 2008, ch. 7 (similarity transform to decoupled modes);
    the common mode as the winding's impedance: G. Guanella, Brown Boveri Review 31, 1944 and
    C. L. Ruthroff, Proc. IRE 47, 1959 (choking reactance of the line's winding).
    """
    n = int(conductors)
    if n < 2:
        raise TransformerError(f"conductors must be a whole number ≥ 2, got {conductors!r}")
    gl = np.asarray(gamma_l, dtype=complex)
    f_len = gl.shape[0]
    zc = _as_f(zc_pair, f_len, "zc_pair")
    # Per-conductor modal impedance of a differential mode is half the pair impedance.
    yd = line_two_port_y(zc / 2.0, gl)
    p = np.eye(n) - np.ones((n, n)) / n
    y = np.einsum("fij,kl->fikjl", yd, p).reshape(f_len, 2 * n, 2 * n)
    if z_winding is not None:
        zw = _as_f(z_winding, f_len, "z_winding")
        if np.any(zw == 0):
            raise TransformerError("z_winding must be non-zero at every frequency")
        s = np.array([[1.0, -1.0], [-1.0, 1.0]])
        m = np.ones((n, n)) / n**2
        y = y + (1.0 / zw)[:, None, None] * np.kron(s, m)[None]
    return y


def pair_on_core_y(zc, gamma_l, z_winding=None):
    """Four-terminal line-on-core element (a1, b1, a2, b2) of a bifilar winding.

    See :func:`line_on_core_y` with ``conductors = 2``.

    Parameters
    ----------
    zc : array_like of complex
        Pair characteristic impedance [Ω], shape (F,).
    gamma_l : array_like of complex
        γ·l [dimensionless], shape (F,).
    z_winding : array_like of complex or None
        Common-mode (winding) impedance [Ω], shape (F,); None for ideal choking.

    Returns
    -------
    numpy.ndarray of complex
        Y [S], shape (F, 4, 4).

    References
    ----------
    C. L. Ruthroff, "Some broad-band transformers", Proc. IRE 47(8), 1959 (line with a
    choking winding); Pozar, *Microwave Engineering*, 4th ed., Table 4.1 (line Y-parameters).
    """
    return line_on_core_y(2, zc, gamma_l, z_winding)


def coupled_windings_y(z_magnetising, ratios, z_leakage):
    """Terminal admittance of windings on one core sharing the flux.

    Windings k = 0…m−1 with turns ratio t_k = N_k/N_0 (t_0 = 1); port impedance matrix
    Z_kl = t_k·t_l·Zm + δ_kl·Z_leak,k, with Zm the magnetising impedance referred to winding 0
    and Z_leak,k the leakage (plus copper) impedance of winding k referred to itself. The
    ports are inverted to admittances and spread onto terminals (start_k, end_k).

    Parameters
    ----------
    z_magnetising : array_like of complex
        Magnetising impedance jωL0·N0²·µ(f) of winding 0 [Ω], shape (F,).
    ratios : sequence of float
        Turns ratios t_k [dimensionless]; the first must be 1.
    z_leakage : sequence of array_like of complex
        Leakage impedance of each winding referred to itself [Ω], each scalar or (F,);
        at least one must be non-zero, else the ideal windings have no admittance form.

    Returns
    -------
    numpy.ndarray of complex
        Y [S], shape (F, 2m, 2m), terminals (start_0, end_0, start_1, end_1, …).

    Notes
    -----
    Leakage is modelled as a series inductance nearly constant with frequency, as the short-
    circuit test of real windings shows, not as (1 − k²)·Lm(f).

    References
    ----------
    T-equivalent circuit of a multi-winding transformer referred to one winding: MIT EE Staff,
    *Magnetic Circuits and Transformers*, Wiley 1943, ch. XVIII; impedance form as in
    C. K. Alexander & M. N. O. Sadiku, *Fundamentals of Electric Circuits*, §13.2
    (coupled inductors, Z = [[L1, M], [M, L2]]).
    """
    zm = np.asarray(z_magnetising, dtype=complex)
    f_len = zm.shape[0]
    t = np.asarray(ratios, float)
    m = t.size
    if m < 2 or t[0] != 1.0 or np.any(t == 0) or not np.all(np.isfinite(t)):
        raise TransformerError(f"ratios must start with 1 and hold ≥ 2 finite non-zero values, got {list(ratios)}")
    if len(z_leakage) != m:
        raise TransformerError(f"z_leakage needs one entry per winding ({m}), got {len(z_leakage)}")
    zl = np.stack([_as_f(z, f_len, "z_leakage") for z in z_leakage], -1)
    z = zm[:, None, None] * np.outer(t, t)[None] + zl[:, :, None] * np.eye(m)[None]
    try:
        yp = np.linalg.inv(z)
    except np.linalg.LinAlgError as exc:  # pragma: no cover - only with all leakage zero
        raise TransformerError("coupled windings need a non-zero leakage impedance") from exc
    a = np.zeros((m, 2 * m))
    a[np.arange(m), 2 * np.arange(m)] = 1.0
    a[np.arange(m), 2 * np.arange(m) + 1] = -1.0
    return np.einsum("ki,fkl,lj->fij", a, yp, a)


def two_pairs_one_core_y(zc_pair, gamma_l, z_winding=None, z_air=None, sense: str = "opposite"):
    """Two bifilar pairs wound on one core: terminals (a1, b1, c1, d1, a2, b2, c2, d2).

    Pairs (a, b) and (c, d) are lines of pair impedance Zc. The net currents I1 of pair 1 and
    I2 of pair 2 share the core: wound in opposite senses the core links I1 − I2 (the
    pair-to-pair mode sees 4·Zw, the total I1 + I2 only the air-core Z_air), in the same sense
    it links I1 + I2 (the total sees Zw, the pair-to-pair mode 4·Z_air). Modes: pair
    differentials V_a − V_b and V_c − V_d (lines), the mean of all four (total), and the
    difference of the pairs' means (pair-to-pair), as Mᵀ·diag(Y)·M.

    Parameters
    ----------
    zc_pair : array_like of complex
        Characteristic impedance of each pair [Ω], shape (F,).
    gamma_l : array_like of complex
        γ·l of the pairs [dimensionless], shape (F,).
    z_winding : array_like of complex or None
        Impedance of one pair's N turns on the core for its net current (the choke model) [Ω];
        None for ideal choking.
    z_air : array_like of complex or None
        The same turns without the core's permeability, jωL0 [Ω]; None: no current in the
        mode the core does not link (ideal).
    sense : str
        ``"opposite"`` or ``"same"``: the second pair's winding sense relative to the first.

    Returns
    -------
    numpy.ndarray of complex
        Y [S], shape (F, 8, 8).

    Notes
    -----
    Stated approximations: the two pairs do not couple as lines (far apart on the ring); the
    modes the core links are lumped series impedances (windings short against a wavelength);
    the mode it does not link sees the air-core inductance of the turns.

    References
    ----------
    G. Guanella, Brown Boveri Review 31, 1944 (the 4:1 of two lines); modal form as in
    C. R. Paul, *Analysis of Multiconductor Transmission Lines*, 2nd ed., 2008, ch. 7;
    flux linkage of two windings on one core: MIT EE Staff, *Magnetic Circuits and
    Transformers*, 1943, ch. XVIII.
    """
    if sense not in ("opposite", "same"):
        raise TransformerError(f"sense must be 'opposite' or 'same', got {sense!r}")
    gl = np.asarray(gamma_l, dtype=complex)
    f_len = gl.shape[0]
    zc = _as_f(zc_pair, f_len, "zc_pair")
    yl = line_two_port_y(zc, gl)
    # Mode voltages at one end: pair-1 differential, pair-2 differential, total mean, pair-to-pair.
    m1 = np.array([[1, -1, 0, 0], [0, 0, 1, -1], [0.25, 0.25, 0.25, 0.25], [0.5, 0.5, -0.5, -0.5]])
    y = np.zeros((f_len, 8, 8), dtype=complex)
    for k in (0, 1):
        mk = np.zeros((2, 8))
        mk[0, :4], mk[1, 4:] = m1[k], m1[k]
        y += np.einsum("ki,fkl,lj->fij", mk, yl, mk)
    s = np.array([[1.0, -1.0], [-1.0, 1.0]])
    core_row, air_row, core_factor, air_factor = (3, 2, 4.0, 1.0) if sense == "opposite" else (2, 3, 1.0, 4.0)
    for row, z, factor, name in ((core_row, z_winding, core_factor, "z_winding"), (air_row, z_air, air_factor, "z_air")):
        if z is None:
            continue
        z = _as_f(z, f_len, name)
        if np.any(z == 0):
            raise TransformerError(f"{name} must be non-zero at every frequency")
        mk = np.zeros((2, 8))
        mk[0, :4], mk[1, 4:] = m1[row], m1[row]
        y += np.einsum("ki,kl,lj->ij", mk, s, mk)[None] / (factor * z)[:, None, None]
    return y
