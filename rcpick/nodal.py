"""Natural time constants and step response of an RC network, by nodal analysis in numpy.

Voltage sources tie nodes into supernodes; each supernode not tied to ground is
one unknown, and each node is its supernode's voltage plus a fixed offset set
by the sources (zero when the sources are zeroed). With G the conductance and
C the capacitance matrix of the unknowns, the network obeys

    C·x'(t) + G·x(t) = r        (t > 0, sources at their final values)

Natural frequencies solve det(G + s·C) = 0; the time constants τ = −1/s are
the finite, nonzero generalised eigenvalues of C·φ = τ·G·φ. Both matrices are
symmetric and positive semidefinite, so the τ are real, and (Courant–Fischer)
each one grows with every resistance and every capacitance. They are found
with a shift that keeps the pencil regular even when G is singular (a node
reached only through capacitors): K = G + σ·C = L·Lᵀ, and the eigenvalues μ
of L⁻¹·C·L⁻ᵀ give τ = μ / (1 − σ·μ); μ = 0 is an instantaneous
(algebraic) direction, μ = 1/σ a conserved charge (s = 0). The order is the
number of finite nonzero natural frequencies.

The step response is exact: x(t) = x_p + Σ c_k·φ_k·exp(−t/τ_k), with x_p a
particular solution of G·x = r and c_k from the state just after the step,
where every capacitor-connected group of nodes keeps its charge (zero before
the step) and the purely resistive directions satisfy their KCL at once.

Everything works on stacks of networks (batch axis first) so that a search
can evaluate many candidate values at once.

References
----------
C. A. Desoer, E. S. Kuh, *Basic Circuit Theory* (natural frequencies, order).
OpenStax *College Physics 2e* §21.6 (RC charging and discharging).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rcpick.netlist import GROUND, Netlist, NetlistError, Union, supernodes

#: Relative size below which an eigenvalue counts as zero.
ZERO = 1e-10


@dataclass(frozen=True)
class Structure:
    """Where each element stamps into the reduced nodal matrices.

    Attributes
    ----------
    rows : list of str
        Representative node of each unknown supernode.
    row_of : dict
        Node → row index, or None for nodes tied to ground by sources.
    offset : dict
        Node → its voltage above its supernode's unknown, with the sources on (V).
    """

    net: Netlist
    rows: list[str]
    row_of: dict[str, int | None]
    offset: dict[str, float]

    @property
    def size(self) -> int:
        return len(self.rows)


def structure(net: Netlist) -> Structure:
    """Supernodes, rows and source offsets of a checked netlist."""
    union = supernodes(net)
    ground = union.find(GROUND)
    groups: dict[str, list[str]] = {}
    for node in net.nodes:
        groups.setdefault(union.find(node), []).append(node)
    offset: dict[str, float] = {}
    rows: list[str] = []
    row_of: dict[str, int | None] = {}
    for root, members in groups.items():
        start = GROUND if root == ground else members[0]
        offset[start] = 0.0
        frontier = [start]
        while frontier:  # walk the source tree: v(a) − v(b) = V for "V a b V"
            node = frontier.pop()
            for e in net.of("V"):
                for here, there, sign in ((e.a, e.b, -1.0), (e.b, e.a, 1.0)):
                    if here == node and there not in offset:
                        offset[there] = offset[node] + sign * e.value
                        frontier.append(there)
        if root == ground:
            for node in members:
                row_of[node] = None
        else:
            for node in members:
                row_of[node] = len(rows)
            rows.append(start)
    return Structure(net, rows, row_of, offset)


def matrices(st: Structure, values: dict[str, np.ndarray] | None = None, batch: int = 1, sources: bool = True):
    """G, C (batch, n, n) and r, h (batch, n) for the network, optionally with element values replaced.

    ``values`` maps element names to arrays of shape (batch,). ``r`` is the
    right-hand side for t > 0; ``h`` the capacitors' charge at zero unknowns
    (from source offsets), so each group's charge is C·x + h.
    """
    n = st.size
    values = {k.upper(): np.asarray(v, dtype=float) for k, v in (values or {}).items()}
    g_mat = np.zeros((batch, n, n))
    c_mat = np.zeros((batch, n, n))
    r = np.zeros((batch, n))
    h = np.zeros((batch, n))

    def value(e):
        return values.get(e.name.upper(), np.full(batch, e.value))

    for e in st.net.elements:
        ia, ib = st.row_of[e.a], st.row_of[e.b]
        if e.letter in "RC":
            weight = 1.0 / value(e) if e.letter == "R" else value(e)
            target, const = (g_mat, r) if e.letter == "R" else (c_mat, h)
            shift = (st.offset[e.a] - st.offset[e.b]) if sources else 0.0
            for i, j, sign in ((ia, ib, 1.0), (ib, ia, -1.0)):
                if i is None:
                    continue
                target[:, i, i] += weight
                if j is not None:
                    target[:, i, j] -= weight
                # constant part of the current (R) or charge (C) leaving row i through this element
                if e.letter == "R":
                    const[:, i] -= sign * weight * shift
                else:
                    const[:, i] += sign * weight * shift
        elif e.letter == "I" and sources:
            if ia is not None:
                r[:, ia] -= e.value
            if ib is not None:
                r[:, ib] += e.value
    return g_mat, c_mat, r, h


@dataclass(frozen=True)
class Modes:
    """Generalised eigen-decomposition of the pencil (C, G), per network in the batch."""

    tau: np.ndarray  # (B, n): time constants, s; inf for conserved charge, 0 for algebraic directions
    phi: np.ndarray  # (B, n, n): mode shapes (columns), with φᵀ·K·φ = I
    mu: np.ndarray  # (B, n): eigenvalues of the shifted pencil
    kind: np.ndarray  # (B, n): 0 algebraic, 1 finite nonzero, 2 infinite (s = 0)


def modes(g_mat: np.ndarray, c_mat: np.ndarray) -> Modes:
    """Time constants and mode shapes of each network in the batch."""
    g_scale = np.trace(g_mat, axis1=1, axis2=2)
    c_scale = np.trace(c_mat, axis1=1, axis2=2)
    tau_ref = np.where((g_scale > 0) & (c_scale > 0), c_scale / np.where(g_scale > 0, g_scale, 1.0), 1.0)
    sigma = 1.0 / (1e3 * tau_ref)
    k_mat = g_mat + sigma[:, None, None] * c_mat
    try:
        lower = np.linalg.cholesky(k_mat)
    except np.linalg.LinAlgError:
        raise NetlistError("a node has neither a resistor nor a capacitor path (only current sources?)") from None
    inv_l = np.linalg.inv(lower)
    a_mat = inv_l @ c_mat @ np.swapaxes(inv_l, 1, 2)
    a_mat = (a_mat + np.swapaxes(a_mat, 1, 2)) / 2
    mu, w = np.linalg.eigh(a_mat)
    phi = np.swapaxes(inv_l, 1, 2) @ w
    top = np.max(np.abs(mu), axis=1, keepdims=True)
    algebraic = mu <= ZERO * np.where(top > 0, top, 1.0)
    infinite = np.abs(1.0 - sigma[:, None] * mu) <= 1e-9
    with np.errstate(divide="ignore"):
        tau = np.where(infinite, np.inf, mu / (1.0 - sigma[:, None] * mu))
    tau = np.where(algebraic, 0.0, tau)
    kind = np.where(algebraic, 0, np.where(infinite, 2, 1))
    return Modes(tau, phi, mu, kind)


def time_constants(net: Netlist, values: dict[str, np.ndarray] | None = None, batch: int = 1) -> list[np.ndarray]:
    """Finite nonzero natural time constants (s), longest first, for each network in the batch."""
    st = structure(net)
    g_mat, c_mat, _, _ = matrices(st, values, batch, sources=False)
    found = modes(g_mat, c_mat)
    out = []
    for b in range(batch):
        taus = found.tau[b][found.kind[b] == 1]
        out.append(np.sort(taus)[::-1])
    return out


def dominant_tau(net: Netlist, values: dict[str, np.ndarray], batch: int) -> np.ndarray:
    """The longest finite natural time constant (s) of each network in the batch (0 when none)."""
    st = structure(net)
    g_mat, c_mat, _, _ = matrices(st, values, batch, sources=False)
    found = modes(g_mat, c_mat)
    return np.max(np.where(found.kind == 1, found.tau, 0.0), axis=1)


def _capacitive_null(st: Structure) -> np.ndarray:
    """Basis (n, k) of the directions in which C has no effect, from the structure alone.

    Rows without capacitance are unit vectors; a group of rows joined by
    capacitors but with no capacitor to a source-tied node is its indicator
    vector (its common mode).
    """
    n = st.size
    groups = Union()
    grounded: set[int] = set()
    touched: set[int] = set()
    for e in st.net.of("C"):
        ia, ib = st.row_of[e.a], st.row_of[e.b]
        for i in (ia, ib):
            if i is not None:
                touched.add(i)
                groups.find(str(i))
        if ia is None or ib is None:
            grounded.add(ia if ia is not None else ib)  # type: ignore[arg-type]
        else:
            groups.join(str(ia), str(ib))

    def find(i: int) -> str:
        return groups.find(str(i))

    roots_grounded = {find(i) for i in grounded if i is not None}
    basis = []
    for i in range(n):
        if i not in touched:
            vec = np.zeros(n)
            vec[i] = 1.0
            basis.append(vec)
    for root in {find(i) for i in touched}:
        if root not in roots_grounded:
            vec = np.array([1.0 if (i in touched and find(i) == root) else 0.0 for i in range(n)])
            basis.append(vec)
    return np.array(basis).T if basis else np.zeros((n, 0))


@dataclass(frozen=True)
class Response:
    """Exact step response of the unknowns of each network in the batch."""

    st: Structure
    particular: np.ndarray  # (B, n)
    coeff: np.ndarray  # (B, n): weight of each mode
    modes: Modes
    start: np.ndarray  # (B, n): unknowns just after the step

    def node(self, node: str, times: np.ndarray) -> np.ndarray:
        """Voltage (V) of ``node`` at ``times`` (s, shape (T,) or (B, T)), shape (B, T)."""
        times = np.atleast_1d(np.asarray(times, dtype=float))
        row = self.st.row_of[node]
        offset = self.st.offset[node]
        batch = self.particular.shape[0]
        t = np.broadcast_to(times, (batch, times.shape[-1])) if times.ndim == 1 else times
        if row is None:
            return np.full(t.shape, offset)
        weights = self.coeff * self.modes.phi[:, row, :]  # (B, n)
        live = self.modes.kind != 0
        tau = np.where(self.modes.kind == 1, self.modes.tau, 1.0)
        decay = np.where((self.modes.kind == 1)[:, :, None], np.exp(-t[:, None, :] / tau[:, :, None]), 1.0)
        value = self.particular[:, row][:, None] + np.sum(
            np.where(live[:, :, None], weights[:, :, None] * decay, 0.0), axis=1
        )
        return value + offset

    def final(self, node: str) -> np.ndarray:
        return self.node(node, np.array([np.inf]))[:, 0]

    def initial(self, node: str) -> np.ndarray:
        row = self.st.row_of[node]
        if row is None:
            return np.full(self.start.shape[0], self.st.offset[node])
        return self.start[:, row] + self.st.offset[node]


def initial_charge(st: Structure, values: dict[str, np.ndarray] | None, batch: int) -> np.ndarray:
    """Charge (C) on each unknown's plates before the step, from the capacitors' start voltages (``@V``)."""
    q0 = np.zeros((batch, st.size))
    upper = {k.upper(): np.asarray(v, dtype=float) for k, v in (values or {}).items()}
    for e in st.net.of("C"):
        v0 = e.params.get("v0", 0.0)
        if not v0:
            continue
        cap = upper.get(e.name.upper(), np.full(batch, e.value))
        for node, sign in ((e.a, 1.0), (e.b, -1.0)):
            row = st.row_of[node]
            if row is not None:
                q0[:, row] += sign * cap * v0
    return q0


def step_response(net: Netlist, values: dict[str, np.ndarray] | None = None, batch: int = 1) -> Response:
    """The exact response to the step of every source (all sources 0 before t = 0; each capacitor at its
    start voltage, 0 V unless its line gives ``@V``)."""
    st = structure(net)
    g_mat, c_mat, r, h = matrices(st, values, batch)
    found = modes(g_mat, c_mat)
    pinv_g = np.linalg.pinv(g_mat)
    particular = np.einsum("bij,bj->bi", pinv_g, r)
    residual = np.einsum("bij,bj->bi", g_mat, particular) - r
    scale = np.max(np.abs(r), axis=1) + 1e-300
    if np.any(np.max(np.abs(residual), axis=1) > 1e-6 * scale):
        raise NetlistError(f"{net.path}: a current source drives a node with no resistive path: no steady state")
    null = _capacitive_null(st)
    # Just after the step: each capacitive group keeps the charge it held before (from the capacitors' start
    # voltages, zero by default); KCL holds at once where there is no capacitance.
    q0 = initial_charge(st, values, batch)
    lhs = np.concatenate([c_mat, np.einsum("nk,bnm->bkm", null, g_mat)], axis=1)
    rhs = np.concatenate([q0 - h, np.einsum("nk,bn->bk", null, r)], axis=1)
    start = np.einsum("bij,bj->bi", np.linalg.pinv(lhs), rhs)
    delta = start - particular
    proj = np.einsum("bnk,bnm,bm->bk", found.phi, c_mat, delta)
    coeff = np.where(found.kind != 0, proj / np.where(found.mu > 0, found.mu, 1.0), 0.0)
    return Response(st, particular, coeff, found, start)


def fractional_level(fraction, v0, v_final):
    """Volts for a threshold given as a fraction: the fraction of the way from the node's lower to its higher
    end value (the smaller and the larger of v(0+) and the final value). Rising from 0 this is a fraction of
    the final value, falling to 0 a fraction of the start value, as for a lone R and C. NaN where the node
    does not move (no swing to take a fraction of). Works on scalars and arrays."""
    v0, v_final = np.asarray(v0, dtype=float), np.asarray(v_final, dtype=float)
    low, high = np.minimum(v0, v_final), np.maximum(v0, v_final)
    swing = high - low
    scale = np.maximum(np.abs(v0), np.abs(v_final))
    moves = swing > 1e-12 * np.where(scale > 0, scale, 1.0)
    return np.where(moves, low + fraction * swing, np.nan)


def crossing_time(resp: Response, node: str, level: np.ndarray, horizon: np.ndarray, steps: int = 160) -> np.ndarray:
    """First time (s) the node's voltage reaches ``level`` (V, per network), NaN if it never does.

    Searched on a grid from 0 to ``horizon`` (s) then refined by bisection; 0 when the node starts at or past it.
    """
    batch = resp.particular.shape[0]
    level = np.broadcast_to(np.asarray(level, dtype=float), (batch,))
    horizon = np.broadcast_to(np.asarray(horizon, dtype=float), (batch,))
    fractions = np.concatenate([[0.0], np.geomspace(1e-7, 1.0, steps)])
    t = horizon[:, None] * fractions[None, :]
    v = resp.node(node, t) - level[:, None]
    start_sign = np.sign(v[:, 0])
    crossed = (np.sign(v) != start_sign[:, None]) | (v == 0)
    crossed[:, 0] = v[:, 0] == 0
    found = crossed.any(axis=1)
    first = np.argmax(crossed, axis=1)
    lo = t[np.arange(batch), np.maximum(first - 1, 0)]
    hi = t[np.arange(batch), first]
    for _ in range(56):
        mid = (lo + hi) / 2
        vm = resp.node(node, mid[:, None])[:, 0] - level
        same = np.sign(vm) == start_sign
        lo = np.where(same, mid, lo)
        hi = np.where(same, hi, mid)
    out = np.where(found, (lo + hi) / 2, np.nan)
    return np.where(first == 0, np.where(found, 0.0, np.nan), out)


@dataclass(frozen=True)
class FirstOrder:
    """Equivalent capacitance and the Thevenin resistance it sees, for an order-1 network."""

    c_eq_farad: float
    r_th_ohm: float
    port: tuple[str, str]


def first_order(net: Netlist) -> FirstOrder | None:
    """C_eq and R_th of an order-1 network (None otherwise), tau = R_th·C_eq.

    The port is the pair of capacitor terminals the mode moves furthest apart;
    R_th is measured there with sources zeroed and capacitors removed, and C_eq = tau / R_th.
    """
    st = structure(net)
    g_mat, c_mat, _, _ = matrices(st, sources=False)
    found = modes(g_mat, c_mat)
    finite = np.flatnonzero(found.kind[0] == 1)
    if len(finite) != 1:
        return None
    k = finite[0]
    phi = found.phi[0][:, k]
    terminals = sorted({n for e in net.of("C") for n in (e.a, e.b)}, key=net.nodes.index)

    def potential(node):
        row = st.row_of[node]
        return 0.0 if row is None else phi[row]

    best = max(
        ((a, b) for i, a in enumerate(terminals) for b in terminals[i + 1 :]),
        key=lambda pair: abs(potential(pair[0]) - potential(pair[1])),
    )
    test = np.zeros(st.size)
    for node, sign in ((best[0], 1.0), (best[1], -1.0)):
        if st.row_of[node] is not None:
            test[st.row_of[node]] += sign
    volts = np.linalg.pinv(g_mat[0]) @ test

    def at(node):
        row = st.row_of[node]
        return 0.0 if row is None else volts[row]

    r_th = float(at(best[0]) - at(best[1]))
    tau = float(found.tau[0][k])
    port = (best[1], best[0]) if best[0] == GROUND else best
    return FirstOrder(tau / abs(r_th), abs(r_th), port)
