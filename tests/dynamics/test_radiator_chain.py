"""The transient radiator (cells of the warm-up right-hand side) at steady state.

One radiator link as the dynamics cut it: a pipe half-cell, four radiator cells,
a pipe half-cell. With its cells at the chain's rest points the compiled
transport and heat exchange must leave every radiator cell without net heat, and
the radiator's output must be the EN 442 log-mean output of the whole radiator
(:func:`simheat.physics.emitter.steady_output_W`, itself checked against Brent's
method on the log-mean form in tests/physics/test_emitter.py).
"""

import numpy as np
import pytest

from simheat.dynamics import _exchange_kernels, _kernels, _records
from simheat.physics import _emitter_kernels
from simheat.physics.emitter import steady_output_W

CP = 4190.0
CELLS = 4
NOMINAL_W = 1500.0
EXPONENT = 1.3
ROOM_C = 18.0


def _radiator_link():
    n = CELLS + 2
    chains = _records.CellChains(
        link_start=np.array([0], dtype=np.int64),
        link_count=np.array([n], dtype=np.int64),
        from_node=np.array([0], dtype=np.int64),
        to_node=np.array([1], dtype=np.int64),
    )
    kind = np.array([0] + [1] * CELLS + [0], dtype=np.int64)
    cells = _records.CellArrays(
        kind=kind,
        room=np.zeros(n, dtype=np.int64),
        loss_W_K=np.zeros(n),
        nominal_W=np.where(kind == 1, NOMINAL_W / CELLS, 0.0),
        exponent=np.where(kind == 1, EXPONENT, 1.0),
        convective=np.full(n, 0.7),
        capacity_J_K=np.full(n, 5e3),
    )
    radiators = _records.RadiatorArrays(
        link=np.array([0], dtype=np.int64),
        first_cell=np.array([1], dtype=np.int64),
        cells=np.array([CELLS], dtype=np.int64),
        nominal_W=np.array([NOMINAL_W]),
        exponent=np.array([EXPONENT]),
    )
    return chains, cells, radiators


@pytest.mark.parametrize("forward", [True, False])
@pytest.mark.parametrize("flow_factor", [0.05, 0.3, 1.0, 8.0])
def test_radiator_cells_rest_at_the_log_mean_output(forward, flow_factor):
    chains, cells, radiators = _radiator_link()
    inlet_C = 62.0
    flow = flow_factor * NOMINAL_W / (CP * 10.0)
    constant = _emitter_kernels.emitter_chain_constant(
        NOMINAL_W, EXPONENT, CELLS, inlet_C - ROOM_C, flow, CP
    )
    chain = [inlet_C - ROOM_C]
    for _ in range(CELLS):
        chain.append(
            _emitter_kernels.emitter_cell_outlet_K(EXPONENT, chain[-1], constant)
        )
    # pipe half-cells: the inlet side at the inlet temperature, the outlet side
    # at the radiator's outlet (no pipe loss here)
    excess = np.array([chain[0], *chain[1:], chain[-1]])
    if not forward:
        excess = excess[::-1]
    temp_C = ROOM_C + excess
    nodes = np.array([temp_C[0], temp_C[-1]])  # each end node at its end cell
    mass_flow = np.array([flow if forward else -flow])
    dH = np.zeros(len(temp_C))
    _kernels.advect_cells(chains, temp_C, nodes, mass_flow, CP, dH)
    q_air, q_structure, emitter_W = np.zeros(1), np.zeros(1), np.zeros(1)
    emitted = _exchange_kernels.radiator_exchange(
        cells,
        radiators,
        temp_C,
        np.array([ROOM_C]),
        mass_flow,
        CP,
        dH,
        q_air,
        q_structure,
        emitter_W,
    )
    expected = steady_output_W(NOMINAL_W, EXPONENT, inlet_C, flow, ROOM_C, CP)
    # transport into each radiator cell equals its output, to round-off
    np.testing.assert_allclose(dH[1:-1], 0.0, atol=1e-9 * expected)
    assert emitted == pytest.approx(expected, rel=1e-12)
    assert emitter_W[0] == pytest.approx(expected, rel=1e-12)
    assert q_air[0] + q_structure[0] == pytest.approx(expected, rel=1e-12)
    assert q_air[0] == pytest.approx(0.7 * expected, rel=1e-12)
