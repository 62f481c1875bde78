"""Compiled kernels of the network flow solve (global gradient algorithm).

Unknowns are the signed mass flow of every link and the gauge pressure of every
node but the reference node. Each link obeys

    p_from - p_to = F(m) = pipe_dp(m) + valve_dp(m) + check_dp(m) - pump_rise(m)

and every node conserves mass. A Newton step linearises ``F`` with the diagonal
``D = dF/dm`` and eliminates the flow increments, leaving the weighted graph
Laplacian ``A D^-1 A^T`` (reference node removed) for the pressure increments.
With every ``D > 0`` that matrix is symmetric positive definite for a connected
network; after a reverse Cuthill-McKee ordering of the nodes it is banded with a
small half bandwidth, so a banded ``L D L^T`` factorization costs ``O(n b^2)``.

A pump working on a rising stretch of its curve (or a proportional-pressure pump,
whose head rises with flow) gives its link ``D < 0``. The exact Newton step is then
tried first (the matrix may be indefinite, so the factorization is ``L D L^T``
with a stricter pivot test); if that fails or the line search finds no decrease,
the step is retaken with ``|D|``, which keeps the matrix positive definite.

Speed comes from three things. The water properties and every per-link constant
are computed once per operating point (:func:`prepare_links`), so an evaluation
of all link laws is a few multiplications per link plus, for turbulent pipes, a
Colebrook-White loop started from the link's previous solution. A warm start
from a previous solution with its pressures first re-solves, at those pressures,
the few links whose own equation no longer holds (a valve that moved), which
leaves Newton a small, nearly linear correction. And convergence is also
declared on an exact Newton step that is already tiny: the step is applied and
the solve ends without another evaluation of all links (quadratic convergence
makes the error after it far below the step). When the last step was small,
that final step is first tried with the factor already made (a chord step: one
band solve, no factorization), and taken if its estimated residual, which counts
the first-order error the older factor leaves, is at the round-off of the
pressures.

The modules, one concern each:

- :mod:`.records`: the named records every kernel takes (:class:`FlowArrays`,
  :class:`SolveSettings`, :class:`SolveResult`, ...) and the row layouts of the
  link data, operating point, coefficients and workspaces;
- :mod:`.operating`: loading and checking an operating point and a warm start;
- :mod:`.links`: the link laws, prepared per operating point and evaluated;
- :mod:`.reference`: the same link law from the physics kernels, part by part
  (what :mod:`.links` must agree with);
- :mod:`.laplacian`: the banded Laplacian, its ``L D L^T`` factor and solves;
- :mod:`.starts`: the linear-theory cold start and the held-pressure warm start;
- :mod:`.steps`: the pieces of one Newton step (residuals, weights, merit,
  factor and increments, line search);
- :mod:`.newton`: the Newton driver :func:`solve_network` and how a solve ends;
- :mod:`.entry`: :func:`load_and_solve`, the solver's one call from Python.

Everything of one solve runs in compiled code, with no Python per iteration, so
the dynamics can call :func:`solve_network` from its own compiled right-hand
side.
"""

from simheat.hydraulics._kernels.entry import load_and_solve
from simheat.hydraulics._kernels.laplacian import (
    assemble_laplacian,
    band_ldlt,
    band_solve,
    solve_increment,
)
from simheat.hydraulics._kernels.links import (
    evaluate_link_range,
    evaluate_links,
    onset_friction,
    prepare_links,
    pump_rise,
)
from simheat.hydraulics._kernels.newton import (
    BALANCE_RTOL,
    CHORD_ROUNDOFF_RTOL,
    STEP_FLOW_FLOOR_KG_S,
    STEP_RTOL,
    solve_network,
)
from simheat.hydraulics._kernels.operating import (
    any_running_pump,
    load_operating_point,
    load_start,
)
from simheat.hydraulics._kernels.records import (
    C_MODE,
    D_CONTROL_FLOW,
    N_COEF_ROWS,
    N_DATA_ROWS,
    N_LINK_ROWS,
    N_NODE_ROWS,
    N_OP_ROWS,
    NO_RUNNING_PUMP,
    OP_LOWER,
    OP_OPENING,
    OP_SPEED,
    OP_TEMP,
    OP_UPPER,
    START_COLD,
    START_FLOW_NOT_FINITE,
    START_FLOWS,
    START_FLOWS_PRESSURES,
    START_OK,
    START_PRESSURE_NOT_FINITE,
    STATUS_CONVERGED,
    STATUS_MAX_ITER,
    STATUS_NOT_FINITE,
    STATUS_NOT_POSITIVE_DEFINITE,
    STATUS_NOT_RUN,
    ColebrookMemory,
    FlowArrays,
    Iterate,
    NetworkArrays,
    SolveInputs,
    SolveResult,
    SolveSettings,
    StepArrays,
    colebrook_memory,
    current_iterate,
    new_flow_arrays,
    step_arrays,
    trial_iterate,
)
from simheat.hydraulics._kernels.reference import link_loss_general_Pa, link_loss_Pa
from simheat.hydraulics._kernels.starts import (
    hold_pressures,
    linear_start,
    solve_link_for_dp,
)
from simheat.hydraulics._kernels.steps import (
    link_residuals_Pa,
    merit,
    newton_weights,
    node_imbalance_kg_s,
)

__all__ = [
    "BALANCE_RTOL",
    "CHORD_ROUNDOFF_RTOL",
    "C_MODE",
    "D_CONTROL_FLOW",
    "NO_RUNNING_PUMP",
    "N_COEF_ROWS",
    "N_DATA_ROWS",
    "N_LINK_ROWS",
    "N_NODE_ROWS",
    "N_OP_ROWS",
    "OP_LOWER",
    "OP_OPENING",
    "OP_SPEED",
    "OP_TEMP",
    "OP_UPPER",
    "START_COLD",
    "START_FLOWS",
    "START_FLOWS_PRESSURES",
    "START_FLOW_NOT_FINITE",
    "START_OK",
    "START_PRESSURE_NOT_FINITE",
    "STATUS_CONVERGED",
    "STATUS_MAX_ITER",
    "STATUS_NOT_FINITE",
    "STATUS_NOT_POSITIVE_DEFINITE",
    "STATUS_NOT_RUN",
    "STEP_FLOW_FLOOR_KG_S",
    "STEP_RTOL",
    "ColebrookMemory",
    "FlowArrays",
    "Iterate",
    "NetworkArrays",
    "SolveInputs",
    "SolveResult",
    "SolveSettings",
    "StepArrays",
    "any_running_pump",
    "assemble_laplacian",
    "band_ldlt",
    "band_solve",
    "colebrook_memory",
    "current_iterate",
    "evaluate_link_range",
    "evaluate_links",
    "hold_pressures",
    "linear_start",
    "load_and_solve",
    "link_loss_Pa",
    "link_loss_general_Pa",
    "link_residuals_Pa",
    "load_operating_point",
    "load_start",
    "merit",
    "new_flow_arrays",
    "newton_weights",
    "node_imbalance_kg_s",
    "onset_friction",
    "prepare_links",
    "pump_rise",
    "solve_increment",
    "solve_link_for_dp",
    "solve_network",
    "step_arrays",
    "trial_iterate",
]
