"""The compiled fixed-pattern LU and the BDF integrator built on it."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.sparse import csc_matrix, diags, eye
from scipy.sparse import random as sparse_random
from scipy.sparse.linalg import spsolve

from simheat.dynamics import _lu_kernels
from simheat.dynamics.integrate import WarmUpModel
from simheat.dynamics.stiff import FixedPatternBDF, FixedPatternLU
from simheat.scenario import load_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"


def random_jacobian(n: int, density: float, seed: int, dense_columns=()) -> csc_matrix:
    """A sparse Jacobian with a negative dominant diagonal and a few full columns."""
    rng = np.random.default_rng(seed)
    off = sparse_random(n, n, density=density, random_state=rng, format="csc")
    off.data = rng.uniform(-1.0, 1.0, off.nnz)
    full = np.zeros((n, n))
    for j in dense_columns:
        full[:, j] = rng.uniform(-0.2, 0.2, n)
    jac = csc_matrix(off + csc_matrix(full))
    row_sums = np.asarray(abs(jac).sum(axis=1)).ravel()
    jac = csc_matrix(jac - diags(row_sums + 1.0))
    jac.sort_indices()
    return jac


def factor_and_solve(structure: FixedPatternLU, jac: csc_matrix, c: float, rhs):
    values = np.empty(structure.factor_nnz)
    _lu_kernels.assemble_identity_minus(
        (c * jac).data, structure.jacobian_position, structure.diag, values
    )
    failed = _lu_kernels.factor_in_place(
        structure.indptr,
        structure.indices,
        structure.diag,
        values,
        np.empty(structure.n),
        1e-10,
    )
    out = np.full(structure.n, np.nan)
    if failed >= 0:
        return failed, out
    _lu_kernels.solve_factored(
        structure.indptr,
        structure.indices,
        structure.diag,
        values,
        structure.order,
        rhs,
        out,
        np.empty(structure.n),
    )
    return failed, out


@pytest.mark.parametrize("c", [1e-3, 1.0, 1e3])
def test_fixed_pattern_lu_solves_like_a_general_sparse_solver(c):
    # I - cJ solved through the compiled factors against scipy's spsolve (SuperLU
    # with partial pivoting) to 1e-10 relative: both are direct solves of a
    # well-conditioned matrix, so they differ only by round-off.
    jac = random_jacobian(120, 0.03, seed=3, dense_columns=(5, 77))
    structure = FixedPatternLU(jac, last_columns=(5, 77))
    rhs = np.random.default_rng(4).normal(size=120)
    failed, x = factor_and_solve(structure, jac, c, rhs)
    assert failed == -1
    reference = spsolve(csc_matrix(eye(120) - c * jac), rhs)
    np.testing.assert_allclose(
        x, reference, rtol=1e-10, atol=1e-12 * abs(reference).max()
    )


def test_fixed_pattern_lu_keeps_fill_low_on_the_warm_up_pattern():
    # With the sensors ordered last, the factors of the demo's I - cJ hold fewer
    # entries than SuperLU's default (COLAMD) factors of the same matrix: the point of
    # the ordering. Measured 5035 against 5391.
    from scipy.sparse.linalg import splu

    wm = WarmUpModel(load_scenario(SCENARIOS / "bungalow.toml"), "direct_return")
    pattern = wm.jacobian_sparsity()
    sensors = np.arange(wm.slices["sensors"].start, wm.slices["sensors"].stop)
    structure = FixedPatternLU(pattern, last_columns=sensors)
    matrix = csc_matrix(eye(structure.n) + 0.1 * pattern)
    superlu = splu(matrix)
    assert structure.factor_nnz < superlu.L.nnz + superlu.U.nnz
    assert list(structure.order[-len(sensors) :]) == list(sensors)


def test_symbolic_pattern_equals_dense_elimination_pattern():
    # The symbolic factorization must hold every entry that dense Gaussian elimination
    # without pivoting makes nonzero (for generic values), and nothing else.
    jac = random_jacobian(40, 0.06, seed=11)
    structure = FixedPatternLU(jac)
    a = (eye(40) - jac).toarray()[np.ix_(structure.order, structure.order)]
    nonzero = a != 0.0
    for k in range(40):  # symbolic elimination on the boolean pattern
        below = np.flatnonzero(nonzero[k + 1 :, k]) + k + 1
        right = np.flatnonzero(nonzero[k, k + 1 :]) + k + 1
        nonzero[np.ix_(below, right)] = True
    expected = np.flatnonzero(nonzero.ravel())
    rows = np.repeat(np.arange(40), np.diff(structure.indptr))
    assert np.array_equal(np.sort(rows * 40 + structure.indices), expected)


def test_kernels_match_their_python_functions():
    # Each compiled kernel against its own .py_func on the same inputs (rel 1e-12).
    jac = random_jacobian(30, 0.1, seed=5, dense_columns=(2,))
    structure = FixedPatternLU(jac, last_columns=(2,))
    for kernel_result, python_result in (
        (
            _lu_kernels.symbolic_factor_pattern(
                structure.indptr, structure.indices, 30
            ),
            _lu_kernels.symbolic_factor_pattern.py_func(
                structure.indptr, structure.indices, 30
            ),
        ),
    ):
        for a, b in zip(kernel_result, python_result, strict=True):
            np.testing.assert_array_equal(a, b)
    values = {}
    solutions = {}
    rhs = np.linspace(-1.0, 2.0, 30)
    for label, assemble, factor, solve in (
        (
            "jit",
            _lu_kernels.assemble_identity_minus,
            _lu_kernels.factor_in_place,
            _lu_kernels.solve_factored,
        ),
        (
            "py",
            _lu_kernels.assemble_identity_minus.py_func,
            _lu_kernels.factor_in_place.py_func,
            _lu_kernels.solve_factored.py_func,
        ),
    ):
        v = np.empty(structure.factor_nnz)
        assemble((2.0 * jac).data, structure.jacobian_position, structure.diag, v)
        assert (
            factor(
                structure.indptr,
                structure.indices,
                structure.diag,
                v,
                np.empty(30),
                1e-10,
            )
            == -1
        )
        x = np.empty(30)
        solve(
            structure.indptr,
            structure.indices,
            structure.diag,
            v,
            structure.order,
            rhs,
            x,
            np.empty(30),
        )
        values[label], solutions[label] = v, x
    np.testing.assert_allclose(values["jit"], values["py"], rtol=1e-12)
    np.testing.assert_allclose(solutions["jit"], solutions["py"], rtol=1e-12)


def zero_first_pivot_jacobian(c: float):
    """A full 2x2 J whose first pivot of I - cJ (in the factor order) is exactly 0."""
    structure = FixedPatternLU(csc_matrix(np.ones((2, 2))))
    first = int(structure.order[0])
    values = np.array([[-3.0, 1.0], [1.0, -3.0]])
    values[first, first] = 1.0 / c  # a growing mode at rate 1/c
    return structure, csc_matrix(values), first


def test_unsafe_diagonal_pivot_is_reported():
    structure, jac, first = zero_first_pivot_jacobian(0.5)
    failed, _ = factor_and_solve(structure, jac, 0.5, np.ones(2))
    assert failed == 0
    assert structure.order[failed] == first


def conduction_chain(n: int):
    """A stiff linear heat-conduction chain dy/dt = A y + b (invented test problem)."""
    main = np.full(n, -2.0)
    main[0] = -1.0
    a = csc_matrix(diags([np.ones(n - 1), main, np.ones(n - 1)], [-1, 0, 1]) * 50.0)
    a.sort_indices()
    b = np.zeros(n)
    b[-1] = 50.0 * 60.0  # the last cell is held towards 60

    def rhs(t, y):
        return a @ y + b

    def jac(t, y):
        return a.copy()

    return rhs, jac, a


def test_fixed_pattern_bdf_takes_the_same_steps_as_scipy_bdf():
    # Only the linear algebra differs, so step counts match exactly and the solutions
    # agree to round-off amplified over the run (1e-9 relative).
    rhs, jac, a = conduction_chain(30)
    y0 = np.full(30, 10.0)
    common = {"rtol": 1e-6, "atol": 1e-6, "jac": jac}
    plain = solve_ivp(rhs, (0.0, 5.0), y0, method="BDF", **common)
    structure = FixedPatternLU(a)
    mine = solve_ivp(
        rhs, (0.0, 5.0), y0, method=FixedPatternBDF, lu_structure=structure, **common
    )
    assert plain.success
    assert mine.success
    assert (mine.nfev, mine.njev, mine.nlu, len(mine.t)) == (
        plain.nfev,
        plain.njev,
        plain.nlu,
        len(plain.t),
    )
    np.testing.assert_allclose(mine.y[:, -1], plain.y[:, -1], rtol=1e-9)


def test_fixed_pattern_bdf_falls_back_to_pivoting_on_an_unsafe_pivot():
    # A zero diagonal pivot in I - cJ: the factorization must then come from SuperLU
    # with partial pivoting and still solve the (regular) system to round-off.
    structure, jac, _ = zero_first_pivot_jacobian(0.5)
    solver = FixedPatternBDF(
        lambda t, y: jac @ y,
        0.0,
        np.ones(2),
        1.0,
        jac=lambda t, y: jac.copy(),
        lu_structure=structure,
    )
    factors = solver.lu(solver.I - 0.5 * jac)
    assert solver.n_pivot_fallbacks == 1
    x = solver.solve_lu(factors, np.array([1.0, 2.0]))
    np.testing.assert_allclose((eye(2) - 0.5 * jac) @ x, [1.0, 2.0], rtol=1e-12)


def test_warm_up_hour_matches_plain_scipy_bdf():
    # The demo's first hour (heads opening, hot front travelling) with scipy's BDF and
    # with FixedPatternBDF from the same model: the linear solves differ only by
    # round-off, so the runs take the same steps and end in the same state (1e-8 K
    # relative; the integration tolerance itself is 1e-5).
    scenario = load_scenario(SCENARIOS / "bungalow.toml")
    wm = WarmUpModel(scenario, "direct_return")
    atol = np.full(wm.model.n_states, 1e-4)
    atol[wm.slices["energy"]] = 1.0
    wm.prepare_jacobian(atol)
    seg = wm.segment(0.0, 3600.0)
    y0 = wm.initial_state()
    common = {"rtol": 1e-5, "atol": atol, "args": (seg,)}
    plain = solve_ivp(
        wm.rhs, (0.0, 3600.0), y0, method="BDF", jac=wm.jacobian, **common
    )
    mine = solve_ivp(wm.rhs, (0.0, 3600.0), y0, **wm.solver_options("BDF"), **common)
    assert plain.success
    assert mine.success
    assert (mine.nfev, mine.nlu, len(mine.t)) == (plain.nfev, plain.nlu, len(plain.t))
    temperatures = slice(0, wm.slices["energy"].start)
    np.testing.assert_allclose(
        mine.y[temperatures, -1], plain.y[temperatures, -1], rtol=1e-8
    )
