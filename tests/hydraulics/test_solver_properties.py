"""Property tests of the flow solver on random valid ladder and loop networks."""

from __future__ import annotations

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from simheat.errors import ConvergenceError
from simheat.hydraulics.solver import FlowSolver

# Inner diameters of common copper tube sizes 12x1 to 35x1.5 (trade sizes, from
# memory of EN 1057). [m]
DIAMETERS_M = (0.010, 0.013, 0.016, 0.020, 0.026, 0.032)


@st.composite
def random_networks(draw):
    """A two-pipe ladder (direct or reverse return) with optional cross links,
    random pipes, valves, openings and per-link temperatures."""
    n = draw(st.integers(min_value=1, max_value=12))
    reverse = draw(st.booleans())
    cross = draw(
        st.lists(
            st.tuples(st.integers(0, n), st.integers(0, n)).filter(
                lambda ij: ij[0] != ij[1]
            ),
            max_size=3,
        )
    )
    return n, reverse, cross, draw(st.randoms(use_true_random=False))


def _randomise(net, rnd):
    """Random lengths, diameters, zeta and Kv on the ladder's links (same topology).

    Every resistance drawn has a physical size: a pipe of 0.2 m or more, a zeta
    of 0.1 or more, a valve. (A pipe of 1e-300 m would all but merge two nodes,
    and the solver rightly reports the pressure matrix as singular.)
    """
    n_links = net.n_links
    length = np.array(
        [rnd.choice([0.0, rnd.uniform(0.2, 25.0)]) for _ in range(n_links)]
    )
    diameter = np.array([rnd.choice(DIAMETERS_M) for _ in range(n_links)])
    zeta = np.array([rnd.choice([0.0, rnd.uniform(0.1, 20.0)]) for _ in range(n_links)])
    kv = np.array([rnd.choice([0.0, rnd.uniform(0.05, 5.0)]) for _ in range(n_links)])
    # every link keeps some resistance: a valve where it would have none
    kv[(length == 0.0) & (zeta == 0.0) & (kv == 0.0)] = 1.0
    kwargs = {f: getattr(net, f) for f in net.__dataclass_fields__}
    coeffs = np.zeros((n_links, 3))
    # the ladder's pump on link 0, and sometimes a second pump on another link
    pumps = [0] if rnd.random() < 0.7 else [0, rnd.randrange(1, n_links)]
    for k in pumps:
        coeffs[k] = (
            rnd.uniform(5e3, 80e3),
            rnd.uniform(-2e6, 2e6),
            -rnd.uniform(1e8, 1e11),
        )
    kwargs.update(
        length_m=length,
        inner_diameter_m=diameter,
        zeta=zeta,
        kv_m3_h=kv,
        pump_coeffs=coeffs,
    )
    return type(net)(**kwargs)


def _operating_point(data, n_links):
    """Random per-link temperatures, openings and speeds (pump 0 always runs)."""
    temp = np.array(
        data.draw(st.lists(st.floats(10.0, 90.0), min_size=n_links, max_size=n_links))
    )
    opening = np.array(
        data.draw(st.lists(st.floats(0.0, 1.0), min_size=n_links, max_size=n_links))
    )
    speed = np.array(
        data.draw(st.lists(st.floats(0.0, 1.2), min_size=n_links, max_size=n_links))
    )
    speed[0] = max(speed[0], 0.3)  # a second pump may be stopped: then a resistance
    return {"water_temp_C": temp, "valve_opening": opening, "pump_speed": speed}


@settings(
    max_examples=50,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture],
)
@given(spec=random_networks(), data=st.data())
def test_random_network_solves_with_mass_balance(nets, spec, data):
    # Every network drawn here is solvable: connected, every link on a loop and
    # with a resistance, every pump curve falling, one pump running. The solve
    # must succeed (a ConvergenceError fails the test), balance every node and
    # meet the residual tolerance; a warm re-solve from the answer converges at
    # once to the same flows.
    n, reverse, cross, rnd = spec
    net = _randomise(nets.ladder(n, reverse_return=reverse, cross_links=cross), rnd)
    point = _operating_point(data, net.n_links)
    solver = FlowSolver(net)
    flows = solver.solve(**point)
    nets.assert_mass_balance(net, flows)
    assert flows.max_residual_Pa <= 1e-6
    again = solver.solve(**point, initial_mass_flow_kg_s=flows.mass_flow_kg_s)
    nets.assert_mass_balance(net, again)
    assert again.iterations <= 2
    np.testing.assert_allclose(
        again.mass_flow_kg_s, flows.mass_flow_kg_s, rtol=1e-6, atol=1e-9
    )


@settings(
    max_examples=20,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture],
)
@given(spec=random_networks(), data=st.data())
def test_a_solve_that_cannot_converge_says_where_and_by_how_much(nets, spec, data):
    # Tolerances no inexact iterate can meet: the solve must stop at max_iter
    # (never past it) with a ConvergenceError naming a node or link of the
    # network and its residual. The one way to meet them is an exact solution,
    # e.g. every pump stopped and every valve shut: then all residuals are 0.
    n, reverse, cross, rnd = spec
    net = _randomise(nets.ladder(n, reverse_return=reverse, cross_links=cross), rnd)
    point = _operating_point(data, net.n_links)
    try:
        flows = FlowSolver(net).solve(
            **point, tol_kg_s=1e-300, tol_Pa=1e-300, max_iter=8
        )
    except ConvergenceError as error:
        failure = error
    else:
        assert flows.max_residual_Pa == 0.0
        assert flows.max_imbalance_kg_s == 0.0
        return
    assert "no convergence in 8 iterations" in str(failure)
    assert failure.iterations == 8
    assert failure.worst_part in net.link_names + net.node_names
    assert failure.residual_unit in {"Pa", "kg/s"}
    assert failure.residual > 0.0
