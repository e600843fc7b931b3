"""Batched nodal analysis: stacked (F, n, n) admittance matrices solved at every frequency at once.

Elements stamp terminal admittance matrices onto named nodes; ``"gnd"`` is the reference.
Every node also gets a stated reference leak to ground (:data:`REFERENCE_LEAK_S`) so a
floating part of the circuit (a balanced load, an isolated secondary) never makes the
matrix singular.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import TransformerError

__all__ = ["GROUND", "REFERENCE_LEAK_S", "Circuit", "NodalSolution"]

GROUND = "gnd"
#: Conductance from every node to ground [S] (1 TΩ): keeps floating sub-circuits defined while
#: moving 50–5000 Ω results by < 1e-8 relative.
REFERENCE_LEAK_S = 1e-12


@dataclass(frozen=True, eq=False)
class NodalSolution:
    """Node voltages of a solved circuit.

    Attributes
    ----------
    nodes : tuple of str
        Node names, in matrix order (ground excluded).
    voltage : numpy.ndarray of complex
        Node voltages [V], shape (F, n, K) for K right-hand sides.
    """

    nodes: tuple
    voltage: np.ndarray

    def v(self, node: str, rhs: int = 0) -> np.ndarray:
        """Voltage of ``node`` [V], shape (F,); zero for ground."""
        if node == GROUND:
            return np.zeros(self.voltage.shape[0], dtype=complex)
        return self.voltage[:, self.nodes.index(node), rhs]


class Circuit:
    """A circuit of stamped elements over a frequency grid.

    Parameters
    ----------
    frequency_hz : array_like
        Strictly positive frequencies [Hz], shape (F,).
    """

    def __init__(self, frequency_hz) -> None:
        f = np.asarray(frequency_hz, dtype=float)
        if f.ndim != 1 or f.size == 0 or not np.all(np.isfinite(f)) or np.any(f <= 0):
            raise TransformerError("frequency_hz must be a non-empty 1-D array of positive frequencies")
        self.frequency_hz = f
        self._nodes: list[str] = []
        self._stamps: list[tuple[tuple[str, ...], np.ndarray]] = []
        self._currents: list[tuple[str, np.ndarray]] = []

    @property
    def nodes(self) -> tuple:
        """Node names in matrix order (ground excluded)."""
        return tuple(self._nodes)

    def _index(self, node: str) -> int:
        if not isinstance(node, str) or not node:
            raise TransformerError(f"node names must be non-empty strings, got {node!r}")
        if node == GROUND:
            return -1
        if node not in self._nodes:
            self._nodes.append(node)
        return self._nodes.index(node)

    def stamp(self, nodes, y) -> None:
        """Add an element of terminal admittance ``y`` [S], shape (F, k, k), on ``nodes`` (k names)."""
        y = np.asarray(y, dtype=complex)
        nodes = tuple(nodes)
        f_len = self.frequency_hz.size
        if y.shape != (f_len, len(nodes), len(nodes)):
            raise TransformerError(f"element admittance must have shape ({f_len}, {len(nodes)}, {len(nodes)}), got {y.shape}")
        if not np.all(np.isfinite(y)):
            raise TransformerError(f"element on nodes {nodes} has a non-finite admittance")
        for n in nodes:
            self._index(n)
        self._stamps.append((nodes, y))

    def admittance(self, a: str, b: str, y) -> None:
        """Two-terminal admittance ``y`` [S] (scalar or (F,)) between nodes ``a`` and ``b``."""
        y = np.broadcast_to(np.asarray(y, dtype=complex), self.frequency_hz.shape)
        s = np.array([[1.0, -1.0], [-1.0, 1.0]])
        self.stamp((a, b), y[:, None, None] * s[None])

    def impedance(self, a: str, b: str, z) -> None:
        """Two-terminal impedance ``z`` [Ω] (scalar or (F,), non-zero) between ``a`` and ``b``."""
        z = np.broadcast_to(np.asarray(z, dtype=complex), self.frequency_hz.shape)
        if np.any(z == 0) or not np.all(np.isfinite(z)):
            raise TransformerError(f"impedance between {a} and {b} must be finite and non-zero")
        self.admittance(a, b, 1.0 / z)

    def matrix(self) -> np.ndarray:
        """The nodal admittance matrix [S], shape (F, n, n), reference leak included."""
        n = len(self._nodes)
        f_len = self.frequency_hz.size
        y = np.zeros((f_len, n, n), dtype=complex)
        for nodes, ye in self._stamps:
            # Incidence of the element's terminals on the nodes: repeated nodes add up and
            # terminals on ground drop out.
            a = np.zeros((len(nodes), n))
            for k, x in enumerate(nodes):
                if x != GROUND:
                    a[k, self._nodes.index(x)] += 1.0
            y += np.einsum("ki,fkl,lj->fij", a, ye, a)
        y[:, np.arange(n), np.arange(n)] += REFERENCE_LEAK_S
        return y

    def solve(self, injections: dict) -> NodalSolution:
        """Node voltages for current injections.

        Parameters
        ----------
        injections : dict or list of dict
            ``{node: current}`` with currents [A] into the node (scalar or (F,)); a list
            gives several right-hand sides solved together.

        Returns
        -------
        NodalSolution
        """
        cases = injections if isinstance(injections, list) else [injections]
        n = len(self._nodes)
        f_len = self.frequency_hz.size
        rhs = np.zeros((f_len, n, len(cases)), dtype=complex)
        for k, case in enumerate(cases):
            for node, cur in case.items():
                if node == GROUND:
                    continue
                if node not in self._nodes:
                    raise TransformerError(f"no element is connected to node {node!r}")
                rhs[:, self._nodes.index(node), k] += np.broadcast_to(np.asarray(cur, complex), (f_len,))
        return NodalSolution(self.nodes, np.linalg.solve(self.matrix(), rhs))

    def port_impedance(self, ports) -> np.ndarray:
        """Impedance matrix [Ω], shape (F, P, P), of ports from each named node to ground."""
        ports = list(ports)
        sol = self.solve([{p: 1.0} for p in ports])
        idx = [self._nodes.index(p) for p in ports]
        return sol.voltage[:, idx, :]

    def s_parameters(self, ports, z0: float = 50.0) -> np.ndarray:
        """S-parameters [dimensionless], shape (F, P, P), of node-to-ground ports, reference ``z0`` [Ω].

        References
        ----------
        D. M. Pozar, *Microwave Engineering*, 4th ed., eq. (4.44): S = (Z − Z0·I)(Z + Z0·I)⁻¹
        for equal real reference impedances.
        """
        z = self.port_impedance(ports)
        eye = np.eye(z.shape[1])[None]
        # S = (Z + Z0)^-1 ... written with solve on the transposed system: S = (Z − Z0)(Z + Z0)^-1.
        a = np.swapaxes(z + z0 * eye, 1, 2)
        b = np.swapaxes(z - z0 * eye, 1, 2)
        return np.swapaxes(np.linalg.solve(a, b), 1, 2)

    def network(self, ports, z0: float = 50.0, name: str = "model"):
        """The ports as a scikit-rf ``Network`` (for Touchstone export and mixed-mode analysis)."""
        import skrf.network

        freq = skrf.Frequency.from_f(self.frequency_hz, unit="Hz")
        return skrf.network.Network(frequency=freq, s=self.s_parameters(ports, z0), z0=z0, name=name)
