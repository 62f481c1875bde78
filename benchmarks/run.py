"""Speed figures of simheat: network flow solve and warm-up simulation.

Usage::

    python benchmarks/run.py [--quick]

Prints one JSON object of figures on stdout; progress goes to stderr. See
``benchmarks/README.md`` for what every figure means. Nothing here asserts a
time: the figures are for comparing before and after a change, on one machine.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
REPO = HERE.parent
# This checkout's simheat, whatever else the environment has installed.
sys.path[:0] = [str(HERE), str(REPO)]

import baseline_dynamics as bd  # noqa: E402
import baseline_hydraulics as bh  # noqa: E402

from simheat.dynamics.integrate import integrate  # noqa: E402
from simheat.dynamics.simulate import simulate  # noqa: E402
from simheat.hydraulics.solver import FlowSolver  # noqa: E402
from simheat.scenario import load_scenario  # noqa: E402

SCHEMES = ("direct_return", "reverse_return")
SIZES_FULL = (9, 50, 200, 1000)
SIZES_QUICK = (9, 200)
WATER_TEMP_C = 70.0
WARM_OPENING = 0.5  # the changed emitter valve's opening in the warm solve [-]
BASELINE_METHODS = ("hybr", "krylov")
AGREEMENT_TARGET = 1e-6  # relative flow difference the baseline must reach [-]
DEMO_SCENARIO = REPO / "scenarios" / "bungalow.toml"
DEMO_SCHEME = "direct_return"
# Targets (reported beside the figures, never asserted): issue 5's, and the
# demo morning's speed, raised by issue 14 (exact radiator cells, the night).
TARGET_FASTER_THAN_REAL_TIME = 200_000
TARGET_SPEEDUP_VS_PURE_PYTHON = 20.0
TARGET_SETPOINT_AGREEMENT = 0.01  # relative difference of times to setpoint [-]
TARGET_BLOCK_WALL_S = 15.0
TARGET_BLOCK_PEAK_MB = 500.0


def progress(message: str) -> None:
    print(f"[bench] {message}", file=sys.stderr, flush=True)


def timed_median_s(fn, *, min_repeats: int, max_repeats: int, budget_s: float):
    """Median wall time of ``fn()`` over repeats (call it once before: warm-up).

    Repeats at least ``min_repeats`` times, then until ``max_repeats`` or until
    ``budget_s`` of wall time is spent. Returns ``(median_s, repeats, last)``.
    """
    times = []
    result = None
    started = time.perf_counter()
    while len(times) < max_repeats:
        t0 = time.perf_counter()
        result = fn()
        times.append(time.perf_counter() - t0)
        if len(times) >= min_repeats and time.perf_counter() - started > budget_s:
            break
    return statistics.median(times), len(times), result


def loglog_slope(x, y) -> float | None:
    """Least-squares slope of log(y) against log(x)."""
    x, y = np.asarray(x, float), np.asarray(y, float)
    if len(x) < 2:
        return None
    return float(np.polyfit(np.log(x), np.log(y), 1)[0])


def hydraulics_case(n: int, scheme: str, reps: dict) -> dict:
    ladder = bh.build_ladder(n, scheme, water_temp_C=WATER_TEMP_C)
    net = ladder.network
    emitter_links = net.emitter_links()
    changed = int(emitter_links[len(emitter_links) // 2])
    opening = np.ones(net.n_links)
    opening[changed] = WARM_OPENING

    # simheat: set-up, then cold and warm solves (first call compiles or loads).
    t0 = time.perf_counter()
    solver = FlowSolver(net)
    setup_s = time.perf_counter() - t0
    cold = solver.solve(water_temp_C=WATER_TEMP_C)
    # the previous solution a warm re-solve starts from: its flows and pressures
    start = cold.mass_flow_kg_s.copy()
    start_pressure = cold.pressure_Pa.copy()

    def simheat_cold():
        return solver.solve(water_temp_C=WATER_TEMP_C)

    def simheat_warm():
        return solver.solve(
            water_temp_C=WATER_TEMP_C,
            valve_opening=opening,
            initial_mass_flow_kg_s=start,
            initial_pressure_Pa=start_pressure,
        )

    simheat_warm()
    cold_s, cold_reps, cold = timed_median_s(simheat_cold, **reps["simheat"])
    warm_s, warm_reps, warm = timed_median_s(simheat_warm, **reps["simheat"])

    # baseline: cold from the design flows, warm from its own cold solution.
    model = bh.LadderBaseline(net, water_temp_C=WATER_TEMP_C)
    q_design = np.full(model.n_emitters, ladder.design_flow_kg_s)
    baseline = {}
    for method in BASELINE_METHODS:
        entry = {}
        first = model.solve(q_design, method=method)  # warm-up
        q_cold = first.emitter_flow_kg_s.copy()
        for label, q0, op, ref in (
            ("cold", q_design, None, cold),
            ("warm", q_cold, opening, warm),
        ):
            median_s, repeats, res = timed_median_s(
                lambda q0=q0, op=op, m=method: model.solve(q0, method=m, opening=op),
                **reps["baseline"],
            )
            diff = bh.max_relative_difference(res.mass_flow_kg_s, ref.mass_flow_kg_s)
            entry[label] = {
                "ms": 1e3 * median_s,
                "repeats": repeats,
                "converged": res.success,
                "residual_evaluations": res.nfev,
                "jacobian_evaluations": res.njev,
                "max_residual_Pa": res.max_residual_Pa,
                "max_rel_flow_diff": diff,
                "agrees": bool(res.success and diff <= AGREEMENT_TARGET),
            }
        baseline[method] = entry

    best = {}
    for label in ("cold", "warm"):
        usable = [m for m in BASELINE_METHODS if baseline[m][label]["agrees"]]
        if usable:
            method = min(usable, key=lambda m: baseline[m][label]["ms"])
            best[label] = (method, baseline[method][label]["ms"])
        else:
            best[label] = (None, None)

    q = cold.mass_flow_kg_s[emitter_links]
    pump = net.pump_links()[0]
    simheat_cold_ms, simheat_warm_ms = 1e3 * cold_s, 1e3 * warm_s
    return {
        "scheme": scheme,
        "n_emitters": n,
        "n_links": net.n_links,
        "n_nodes": net.n_nodes,
        "header_pipe": ladder.header_pipe,
        "emitter_design_flow_kg_per_h": 3600.0 * ladder.design_flow_kg_s,
        "pump_head_at_design_kPa": ladder.pump_head_at_design_kPa,
        "total_flow_pct_of_design": 100.0
        * float(cold.mass_flow_kg_s[pump])
        / (n * ladder.design_flow_kg_s),
        "emitter_flow_pct_of_design_min_max": [
            100.0 * float(q.min()) / ladder.design_flow_kg_s,
            100.0 * float(q.max()) / ladder.design_flow_kg_s,
        ],
        "simheat": {
            "setup_ms": 1e3 * setup_s,
            "cold_ms": simheat_cold_ms,
            "warm_ms": simheat_warm_ms,
            "cold_iterations": cold.iterations,
            "warm_iterations": warm.iterations,
            "cold_link_evaluations": cold.link_evaluations,
            "warm_link_evaluations": warm.link_evaluations,
            "cold_repeats": cold_reps,
            "warm_repeats": warm_reps,
            "warm_over_cold": simheat_warm_ms / simheat_cold_ms,
        },
        "baseline": baseline,
        "baseline_best": {
            "cold_method": best["cold"][0],
            "cold_ms": best["cold"][1],
            "warm_method": best["warm"][0],
            "warm_ms": best["warm"][1],
        },
        "speedup_cold": None
        if best["cold"][1] is None
        else best["cold"][1] / simheat_cold_ms,
        "speedup_warm": None
        if best["warm"][1] is None
        else best["warm"][1] / simheat_warm_ms,
        # of the method counted (the first method when none agrees)
        "max_rel_flow_diff_cold": baseline[best["cold"][0] or BASELINE_METHODS[0]][
            "cold"
        ]["max_rel_flow_diff"],
        "max_rel_flow_diff_warm": baseline[best["warm"][0] or BASELINE_METHODS[0]][
            "warm"
        ]["max_rel_flow_diff"],
    }


def hydraulics(sizes, reps) -> dict:
    cases = []
    for scheme in SCHEMES:
        for n in sizes:
            progress(f"hydraulics: {scheme}, {n} emitters")
            cases.append(hydraulics_case(n, scheme, reps))
    scaling = {}
    for scheme in SCHEMES:
        mine = [c for c in cases if c["scheme"] == scheme]
        links = [c["n_links"] for c in mine]
        scaling[scheme] = {
            "simheat_cold_exponent": loglog_slope(
                links, [c["simheat"]["cold_ms"] for c in mine]
            ),
            "simheat_warm_exponent": loglog_slope(
                links, [c["simheat"]["warm_ms"] for c in mine]
            ),
        }
        best = [c["baseline_best"]["cold_ms"] for c in mine]
        if all(b is not None for b in best):
            scaling[scheme]["baseline_cold_exponent"] = loglog_slope(links, best)
    return {"cases": cases, "scaling_vs_links": scaling}


def run_json(command: list[str], env: dict | None = None) -> tuple[float, str]:
    """Wall time of a subprocess in the repository and its stdout; raise on failure."""
    t0 = time.perf_counter()
    done = subprocess.run(
        command, capture_output=True, text=True, cwd=REPO, check=False, env=env
    )
    wall_s = time.perf_counter() - t0
    if done.returncode != 0:
        raise RuntimeError(
            f"{' '.join(command[1:3])} exited with {done.returncode}: "
            f"{done.stderr.strip()[-2000:]}"
        )
    return wall_s, done.stdout


def max_relative_setpoint_difference(a: dict, b: dict) -> float | None:
    """Largest relative difference of two rooms -> (air, operative) time tables.

    ``inf`` when a room reaches its setpoint in one and not in the other;
    ``None`` when no time is set in either.
    """
    worst = None
    for room, pair in a.items():
        for x, y in zip(pair, b[room], strict=True):
            if x is None and y is None:
                continue
            if x is None or y is None:
                return float("inf")
            diff = abs(x - y) / max(abs(y), 1e-9)
            worst = diff if worst is None else max(worst, diff)
    return worst


def pure_python_baseline(scenario, integrate_s: float) -> dict:
    """The demo integrated with the pure-Python RHS against the compiled one.

    The whole run in both modes, night and 6 h morning (about 3-4 s for the
    baseline, which starts from the compiled model's steady evening).
    """
    compiled = integrate(scenario, DEMO_SCHEME)
    progress("dynamics: pure-Python right-hand side baseline")
    t0 = time.perf_counter()
    baseline = bd.integrate_baseline(scenario, DEMO_SCHEME)
    baseline_s = time.perf_counter() - t0
    mine = bd.times_to_setpoint_s(compiled)
    theirs = bd.times_to_setpoint_s(baseline)
    diff = max_relative_setpoint_difference(theirs, mine)
    return {
        "simulated_s": float(scenario.simulation.duration_s),
        "baseline_integrate_s": baseline_s,
        "compiled_integrate_s": integrate_s,
        "speedup": baseline_s / integrate_s,
        "speedup_target": TARGET_SPEEDUP_VS_PURE_PYTHON,
        "baseline_rhs_calls": baseline.n_rhs,
        "baseline_jacobian_evaluations": baseline.n_jac,
        "compiled_rhs_calls": compiled.n_rhs,
        "compiled_jacobian_evaluations": compiled.n_jac,
        "max_rel_time_to_setpoint_diff": diff,
        "times_to_setpoint_agree": diff is not None
        and diff <= TARGET_SETPOINT_AGREEMENT,
        "baseline_times_to_setpoint_min": {
            room: None if pair[0] is None else pair[0] / 60.0
            for room, pair in theirs.items()
        },
    }


def first_process(cli_command: list[str]) -> dict:
    """`simheat run` with an empty numba cache, then again with it filled."""
    with tempfile.TemporaryDirectory(prefix="simheat-numba-cache-") as cache:
        env = {**os.environ, "NUMBA_CACHE_DIR": cache}
        times = {}
        for label in ("first_process_s", "second_process_s"):
            progress(f"compile: simheat run, {label.split('_')[0]} process")
            with tempfile.TemporaryDirectory(prefix="simheat-bench-") as out:
                wall_s, stdout = run_json([*cli_command, "--out", out], env=env)
            json.loads(stdout)
            times[label] = wall_s
    return {
        **times,
        "compile_s_estimate": times["first_process_s"] - times["second_process_s"],
        "numba_cache": "NUMBA_CACHE_DIR = an empty temporary directory, "
        "filled by the first process and reused by the second",
        "cli_command": "python -m simheat run scenarios/bungalow.toml "
        "--out <tmp> --json",
    }


def apartment_block() -> dict:
    """The generated 200-radiator block, in a process of its own (peak memory)."""
    progress("block: 200-radiator apartment block, 6 h (subprocess)")
    path = os.pathsep.join(filter(None, [str(REPO), os.environ.get("PYTHONPATH")]))
    wall_s, stdout = run_json(
        [sys.executable, str(HERE / "apartment_block.py")],
        env={**os.environ, "PYTHONPATH": path},
    )
    report = json.loads(stdout)
    report["process_wall_s"] = wall_s
    report["wall_s_target"] = TARGET_BLOCK_WALL_S
    report["peak_rss_MB_target"] = TARGET_BLOCK_PEAK_MB
    report["memory_measure"] = (
        "ru_maxrss of the whole process (interpreter, numpy, scipy, numba, the "
        "demo warm-up and the block run)"
    )
    return report


def dynamics(cli_repeats: int, quick: bool) -> dict:
    scenario = load_scenario(DEMO_SCENARIO)
    progress("dynamics: warm-up run")
    simulate(scenario, DEMO_SCHEME)
    progress("dynamics: timed runs")
    wall_s, repeats, run = timed_median_s(
        lambda: simulate(scenario, DEMO_SCHEME),
        min_repeats=3 if quick else 7,
        max_repeats=5 if quick else 15,
        budget_s=1.0 if quick else 3.0,
    )
    integrate_s, _, _ = timed_median_s(
        lambda: integrate(scenario, DEMO_SCHEME),
        min_repeats=3 if quick else 7,
        max_repeats=5 if quick else 15,
        budget_s=1.0 if quick else 3.0,
    )
    duration_s = float(run.time_s[-1] - run.time_s[0])
    night_s = float(scenario.schedule.night_s)
    cli_times = []
    command = [sys.executable, "-m", "simheat", "run", str(DEMO_SCENARIO), "--json"]
    for i in range(cli_repeats):
        progress(f"dynamics: CLI process {i + 1}/{cli_repeats}")
        with tempfile.TemporaryDirectory(prefix="simheat-bench-") as out:
            t0 = time.perf_counter()
            done = subprocess.run(
                [*command, "--out", out],
                capture_output=True,
                text=True,
                cwd=REPO,
                check=False,
            )
            cli_times.append(time.perf_counter() - t0)
        if done.returncode != 0:
            raise RuntimeError(
                f"simheat run exited with {done.returncode}: {done.stderr.strip()}"
            )
        json.loads(done.stdout)  # the run must have printed its summary
    return {
        "scenario": DEMO_SCENARIO.name,
        "scheme": DEMO_SCHEME,
        "simulated_s": duration_s,
        "night_s": night_s,
        "wall_s": wall_s,
        "repeats": repeats,
        "faster_than_real_time": duration_s / wall_s,
        "faster_than_real_time_with_night": (duration_s + night_s) / wall_s,
        "faster_than_real_time_target": TARGET_FASTER_THAN_REAL_TIME,
        "integrate_s": integrate_s,
        "integrator_wall_s": run.solver.get("wall_time_s"),
        "rhs_calls": run.solver.get("rhs_calls"),
        "jacobian_evaluations": run.solver.get("jacobian_evaluations"),
        "flow_solves": run.solver.get("flow_solves"),
        "ms_per_flow_solve_upper_bound": 1e3 * wall_s / run.solver["flow_solves"],
        "cli_process_s": statistics.median(cli_times),
        "cli_repeats": cli_repeats,
        "cli_command": "python -m simheat run scenarios/bungalow.toml "
        "--out <tmp> --json",
        "pure_python_baseline": pure_python_baseline(scenario, integrate_s),
        "compile": first_process(command),
    }


def machine() -> dict:
    try:
        commit = subprocess.run(
            ["git", "rev-parse", "--short", "HEAD"],
            capture_output=True,
            text=True,
            cwd=REPO,
            check=False,
        ).stdout.strip()
    except OSError:
        commit = ""
    import numba
    import scipy

    return {
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "numba": numba.__version__,
        "platform": platform.platform(),
        "cpu_count": os.cpu_count(),
        "load_average_1min": os.getloadavg()[0] if hasattr(os, "getloadavg") else None,
        "git_commit": commit or None,
    }


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument(
        "--quick", action="store_true", help="fewer sizes and repeats (< 1 minute)"
    )
    args = parser.parse_args(argv)
    if args.quick:
        sizes = SIZES_QUICK
        reps = {
            "simheat": {"min_repeats": 5, "max_repeats": 30, "budget_s": 0.5},
            "baseline": {"min_repeats": 3, "max_repeats": 7, "budget_s": 0.5},
        }
        cli_repeats = 1
    else:
        sizes = SIZES_FULL
        reps = {
            "simheat": {"min_repeats": 7, "max_repeats": 200, "budget_s": 2.0},
            "baseline": {"min_repeats": 5, "max_repeats": 30, "budget_s": 3.0},
        }
        cli_repeats = 3
    started = time.perf_counter()
    report = {
        "mode": "quick" if args.quick else "full",
        "machine": machine(),
        "hydraulics": hydraulics(sizes, reps),
        "dynamics": dynamics(cli_repeats, args.quick),
        "apartment_block": apartment_block(),
    }
    report["benchmark_wall_s"] = time.perf_counter() - started
    json.dump(report, sys.stdout, indent=2)
    sys.stdout.write("\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
