"""Figure functions draw computed results: they never solve or simulate."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

import simheat.plots
from simheat.analysis.pressure import design_pressure_profile
from simheat.analysis.throttle import TransientThrottle, throttle_matrix
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import FlowSolver
from simheat.plots import PLOT_KIND_NAMES

PLOTS_DIR = Path(simheat.plots.__file__).parent
# Modules a figure module must not import: solvers, simulation, and the layers
# above the figures.
FORBIDDEN = (
    "simheat.hydraulics.solver",
    "simheat.hydraulics._kernels",
    "simheat.dynamics",
    "simheat.report",
    "simheat.cli",
)


@pytest.fixture(scope="module")
def inputs(bungalow_runs):
    """Every figure's input, computed before any solving is forbidden."""
    run = bungalow_runs["direct_return"]
    return {
        "run": run,
        "runs": list(bungalow_runs.values()),
        "profile": design_pressure_profile(run),
        "matrix": throttle_matrix(run.scenario, run.scheme, 0.0),
        # Drawing needs only the two runs; reuse the baseline as the throttled run.
        "transient": TransientThrottle(
            scheme=run.scheme,
            emitter_id="bath",
            opening=0.0,
            at_s=3600.0,
            rooms=(),
            baseline=run,
            throttled=run,
        ),  # fmt: skip
        "built": describe(run.scenario, run.scheme),
    }


@pytest.fixture
def no_solving(monkeypatch):
    """Make every flow solve, and with it every simulation, fail loudly.

    Solves and simulations all build a :class:`FlowSolver` (the warm-up model
    does too), so refusing its construction and its ``solve`` catches both.
    """

    def refuse(*args, **kwargs):
        raise AssertionError("a figure function solved or simulated")

    monkeypatch.setattr(FlowSolver, "__init__", refuse)
    monkeypatch.setattr(FlowSolver, "solve", refuse)


def test_no_solving_fixture_really_refuses_a_solve(no_solving, inputs):
    from simheat.hydraulics.solver import solve_flows

    with pytest.raises(AssertionError, match="solved or simulated"):
        solve_flows(inputs["run"].network, water_temp_C=60.0)


@pytest.mark.parametrize("kind", [k for k in PLOT_KIND_NAMES if k != "pressure"])
def test_run_figures_draw_without_solving(no_solving, inputs, kind):
    fig = getattr(simheat.plots, f"plot_{kind}")(inputs["run"])
    assert fig.axes


@pytest.mark.parametrize(
    ("function", "key"),
    [
        ("plot_pressure", "profile"),
        ("plot_scheme_comparison", "runs"),
        ("plot_interaction", "matrix"),
        ("plot_throttle_response", "transient"),
        ("plot_schematic", "built"),
    ],
)
def test_result_figures_draw_without_solving(no_solving, inputs, function, key):
    fig = getattr(simheat.plots, function)(inputs[key])
    assert fig.axes


def imported_modules(path: Path) -> set[str]:
    """Every module a source file imports, at any depth of its code."""
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            found.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module:
            found.add(node.module)
    return found


@pytest.mark.parametrize("path", sorted(PLOTS_DIR.glob("*.py")), ids=lambda p: p.name)
def test_figure_modules_import_no_solver_and_no_layer_above(path):
    bad = {
        m
        for m in imported_modules(path)
        if any(m == f or m.startswith(f + ".") for f in FORBIDDEN)
    }
    assert not bad
