"""Mixed-mode (balanced) figures of a balun or a two-conductor choke from single-ended S-parameters.

A balanced pair of single-ended ports (p, n) is re-described by a differential and a common
mode, a_d = (a_p − a_n)/√2 and a_c = (a_p + a_n)/√2, referred to Zd = 2·Z0 and Zc = Z0/2.
For a balun measured on three ports (1 unbalanced, 2 and 3 the balanced pair):
Sds21 = (S21 − S31)/√2, Scs21 = (S21 + S31)/√2, CMRR = |Sds21/Scs21|. A two-port
instrument gives the same figures from two sweeps ("legs"): S21 to one output with the other
output terminated in Z0, then S31 the other way round.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import MeasurementError

__all__ = [
    "Balance",
    "amplitude_imbalance_db",
    "cmrr_db",
    "common_mode_series_z",
    "mixed_mode_matrix",
    "phase_imbalance_deg",
    "three_port_balance",
    "four_port_balance",
    "legs_balance",
]

_R2 = np.sqrt(2.0)


def mixed_mode_matrix(s, pairs, single=()):
    """Generalised mixed-mode S-matrix of single-ended S-parameters, order (d…, c…, s…).

    Parameters
    ----------
    s : array_like of complex
        Single-ended S-parameters [dimensionless], shape (F, P, P), all ports referred to the
        same real Z0.
    pairs : sequence of (int, int)
        Balanced pairs as 0-based (positive, negative) port indices.
    single : sequence of int
        0-based ports kept single-ended.

    Returns
    -------
    numpy.ndarray of complex
        Shape (F, M, M) with M = 2·len(pairs) + len(single): the differential modes of each
        pair first, then their common modes, then the single-ended ports (the order scikit-rf's
        ``se2gmm`` uses). Mode impedances are 2·Z0 (differential) and Z0/2 (common).

    References
    ----------
    D. E. Bockelman and W. R. Eisenstadt, "Combined differential and common-mode scattering
    parameters: theory and simulation", IEEE Trans. Microwave Theory Tech. 43(7), 1995,
    eqs. (8)–(13): Smm = M·S·M⁻¹ with the orthogonal M that maps (a_p, a_n) to
    ((a_p − a_n)/√2, (a_p + a_n)/√2).
    """
    s = np.asarray(s, dtype=complex)
    n = s.shape[-1]
    rows = []
    for p, q in pairs:
        r = np.zeros(n)
        r[p], r[q] = 1 / _R2, -1 / _R2
        rows.append(r)
    for p, q in pairs:
        r = np.zeros(n)
        r[p], r[q] = 1 / _R2, 1 / _R2
        rows.append(r)
    for k in single:
        r = np.zeros(n)
        r[k] = 1.0
        rows.append(r)
    m = np.array(rows)
    if m.shape[0] != n or abs(abs(np.linalg.det(m)) - 1) > 1e-12:
        raise MeasurementError("balanced pairs and single-ended ports must use every port exactly once")
    # M is orthogonal, so M⁻¹ = Mᵀ.
    return m @ s @ m.T


def cmrr_db(differential, common):
    """Common-mode rejection ratio 20·log10|S_d/S_c| [dB].

    Parameters
    ----------
    differential : array_like of complex
        Wanted (differential-mode) transmission, e.g. Sds21 or Sdd21 [dimensionless].
    common : array_like of complex
        Unwanted (common-mode) transmission, e.g. Scs21 or Scc21 [dimensionless].

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995, Sec. V (CMRR of a balanced device as the
    ratio of differential to common-mode transmission).
    """
    d = np.abs(np.asarray(differential, dtype=complex))
    c = np.abs(np.asarray(common, dtype=complex))
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(d) - 20.0 * np.log10(c)


def amplitude_imbalance_db(leg_p, leg_n):
    """Amplitude imbalance 20·log10|b_p/b_n| of the two balanced outputs [dB] (0 dB ideal).

    Parameters
    ----------
    leg_p, leg_n : array_like of complex
        Transmission to the positive and negative balanced port, e.g. S21 and S31 [dimensionless].

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995: an ideal balanced output has equal and
    opposite single-ended waves, b_p = −b_n.
    """
    p = np.abs(np.asarray(leg_p, dtype=complex))
    n = np.abs(np.asarray(leg_n, dtype=complex))
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(p) - 20.0 * np.log10(n)


def phase_imbalance_deg(leg_p, leg_n):
    """Phase imbalance ∠b_p − ∠b_n − 180°, wrapped to (−180°, 180°] [deg] (0° ideal).

    Parameters
    ----------
    leg_p, leg_n : array_like of complex
        Transmission to the positive and negative balanced port [dimensionless].

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995 (b_p = −b_n for a purely differential output).
    """
    ratio = np.asarray(leg_p, dtype=complex) / -np.asarray(leg_n, dtype=complex)
    # angle(b_p/(−b_n)) is the wrapped difference without a subtraction that can leave (−180, 180].
    deg = np.degrees(np.angle(ratio))
    return np.where(deg <= -180.0, deg + 360.0, deg)


def common_mode_series_z(scc21, z0):
    """Common-mode series impedance from Scc21 of a two-conductor device (4-port measurement).

    Parameters
    ----------
    scc21 : array_like of complex
        Common-mode transmission [dimensionless], referred to Zc = Z0/2.
    z0 : float
        Single-ended reference impedance [Ω].

    Returns
    -------
    numpy.ndarray of complex
        Zcm = 2·Zc·(1 − Scc21)/Scc21 = Z0·(1 − Scc21)/Scc21 [Ω]: the impedance in series with
        the net (common-mode) current, Vc,in − Vc,out = Zcm·(I_p + I_n).

    References
    ----------
    Series-through relation Z = 2·Zref·(1 − S21)/S21 (D. M. Pozar, *Microwave Engineering*,
    4th ed., 2012, Table 4.2) applied to the common-mode two-port of Bockelman & Eisenstadt,
    IEEE T-MTT 43(7), 1995, whose reference impedance is Z0/2.
    """
    scc21 = np.asarray(scc21, dtype=complex)
    with np.errstate(divide="ignore", invalid="ignore"):
        return z0 * (1.0 - scc21) / scc21


@dataclass(frozen=True, eq=False)
class Balance:
    """Mixed-mode figures against frequency.

    Attributes
    ----------
    kind : str
        ``three-port`` (Sds21/Scs21), ``four-port`` (Sdd21/Scc21) or ``legs`` (two two-port sweeps).
    frequency_hz : numpy.ndarray
        Frequencies [Hz].
    differential, common : numpy.ndarray of complex
        Differential and common-mode transmission [dimensionless].
    leg_p, leg_n : numpy.ndarray of complex
        The two balanced outputs' single-ended response to the drive [dimensionless].
    """

    kind: str
    frequency_hz: np.ndarray
    differential: np.ndarray
    common: np.ndarray
    leg_p: np.ndarray
    leg_n: np.ndarray

    @property
    def cmrr_db(self) -> np.ndarray:
        """CMRR [dB]."""
        return cmrr_db(self.differential, self.common)

    @property
    def amplitude_imbalance_db(self) -> np.ndarray:
        """Amplitude imbalance [dB]."""
        return amplitude_imbalance_db(self.leg_p, self.leg_n)

    @property
    def phase_imbalance_deg(self) -> np.ndarray:
        """Phase imbalance [deg]."""
        return phase_imbalance_deg(self.leg_p, self.leg_n)

    def subset(self, mask) -> "Balance":
        """The figures at the points where ``mask`` is True."""
        return Balance(self.kind, self.frequency_hz[mask], self.differential[mask], self.common[mask],
                       self.leg_p[mask], self.leg_n[mask])


def three_port_balance(frequency_hz, s, unbalanced=0, positive=1, negative=2) -> Balance:
    """Balun figures from a three-port sweep (one unbalanced port, one balanced pair).

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz], shape (F,).
    s : array_like of complex
        Single-ended S-parameters [dimensionless], shape (F, 3, 3).
    unbalanced, positive, negative : int
        0-based port indices.

    Returns
    -------
    Balance
        Sds21 = (S_pu − S_nu)/√2, Scs21 = (S_pu + S_nu)/√2; legs S_pu and S_nu.

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995, eq. (13) applied to a pair driven from a
    single-ended port.
    """
    s = np.asarray(s, dtype=complex)
    sp, sn = s[:, positive, unbalanced], s[:, negative, unbalanced]
    return Balance("three-port", np.asarray(frequency_hz, float), (sp - sn) / _R2, (sp + sn) / _R2, sp, sn)


def legs_balance(frequency_hz, s21_leg_p, s21_leg_n) -> Balance:
    """Balun figures from two two-port sweeps, one to each balanced output.

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    s21_leg_p : array_like of complex
        S21 with port 2 on the positive output, the negative output terminated in Z0
        (this is S21 of the three-port) [dimensionless].
    s21_leg_n : array_like of complex
        The same with the outputs swapped (S31 of the three-port) [dimensionless].

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995; with every unused port terminated in its
    reference impedance a two-port sweep measures exactly the corresponding entry of the
    three-port S-matrix (definition of S-parameters, D. M. Pozar, *Microwave Engineering*, §4.3).
    """
    sp = np.asarray(s21_leg_p, dtype=complex)
    sn = np.asarray(s21_leg_n, dtype=complex)
    return Balance("legs", np.asarray(frequency_hz, float), (sp - sn) / _R2, (sp + sn) / _R2, sp, sn)


def four_port_balance(frequency_hz, s, pair_in=(0, 1), pair_out=(2, 3)) -> tuple[Balance, np.ndarray]:
    """Figures of a two-conductor device between two balanced pairs (a four-port sweep).

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    s : array_like of complex
        Single-ended S-parameters [dimensionless], shape (F, 4, 4).
    pair_in, pair_out : (int, int)
        0-based (positive, negative) ports of the input and output pair.

    Returns
    -------
    balance : Balance
        Sdd21 and Scc21; the legs are the output ports' response to a differential drive,
        (S_p2,p1 − S_p2,n1)/√2 and (S_n2,p1 − S_n2,n1)/√2.
    mixed : numpy.ndarray of complex
        The whole mixed-mode matrix, order (d1, d2, c1, c2), shape (F, 4, 4).

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995, eqs. (8)–(13).
    """
    s = np.asarray(s, dtype=complex)
    mm = mixed_mode_matrix(s, [pair_in, pair_out])
    (p1, n1), (p2, n2) = pair_in, pair_out
    leg_p = (s[:, p2, p1] - s[:, p2, n1]) / _R2
    leg_n = (s[:, n2, p1] - s[:, n2, n1]) / _R2
    return Balance("four-port", np.asarray(frequency_hz, float), mm[:, 1, 0], mm[:, 3, 2], leg_p, leg_n), mm
