"""A generated apartment block for the warm-up scaling benchmark.

Five storeys of eight invented flats, five rooms and one radiator each: 200
rooms (light construction, an ISO 13790 mass class) and 200 radiators on a
two-pipe direct-return route with one run per floor, built through the real
path (scenario TOML text -> :func:`simheat.scenario.parse_scenario`). Pipe
sizes keep to common trade practice (main and risers about 0.8 m/s, floor
headers under 0.5 m/s, branches well under 0.5 m/s), and the radiator valves
are balanced as a commissioning engineer would: a first solve with equal
valves, then each valve's Kv scaled by design flow over actual flow, repeated
until every radiator gets within 5 % of its design flow with the heads fully
open.

Usage as a script (what ``benchmarks/run.py`` starts as a subprocess)::

    python benchmarks/apartment_block.py

prints one JSON object: build and balancing time, the timed 6 h run, its solver
counts and the process's peak resident memory.
"""

from __future__ import annotations

import json
import resource
import sys
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from simheat.hydraulics import layouts
from simheat.hydraulics.solver import FlowSolver
from simheat.physics import water
from simheat.scenario import parse_scenario
from simheat.scenario.model import Scenario

FLOORS = 5
FLATS_PER_FLOOR = 8
# One flat: (room kind, floor area [m2], design heat load [W], setpoint [°C]).
# Invented, for a well-insulated block at -10 °C outside.
FLAT_ROOMS = (
    ("living", 26.0, 1000.0, 21.0),
    ("kitchen", 10.0, 420.0, 20.0),
    ("bed1", 14.0, 560.0, 20.0),
    ("bed2", 11.0, 450.0, 20.0),
    ("bath", 5.0, 330.0, 24.0),
)
# Internal walls inside a flat (room kinds) and their conductance. [W/K]
FLAT_WALLS = (("living", "kitchen"), ("living", "bed1"), ("bed1", "bed2"))
WALL_W_K = 15.0
SUPPLY_C = 70.0
DROP_K = 15.0
# Radiators: nominal output (75/65/20) twice the room's design load, which is
# what the load needs at about 55/45/20 (LMTD 29.7 K against 49.8 K, exponent
# 1.3: 0.51 of nominal): sized for a later low-temperature source, as is now
# common trade practice. At 70 °C they warm the rooms up briskly.
RADIATOR_OVERSIZE = 2.0
# Plant output over the block's design load: boost for the morning warm-up
# (the demo bungalow has 1.8). [-]
SOURCE_OVERSIZE = 1.8
TEE_SPACING_M = 2.5
BRANCH_LENGTH_M = 1.0
RISER_LENGTH_M = 3.0
FEED_LENGTH_M = 10.0
FEED_PIPE = "steel_dn50"  # 1.7 kg/s: about 0.8 m/s
HEADER_PIPE = "steel_dn32"  # 0.34 kg/s per floor: 0.35 m/s at the floor's start
BRANCH_PIPE = "cu_15x1"  # 0.016 kg/s at most: 0.12 m/s
OPEN_KV_M3_H = 0.6  # first guess of every radiator valve (fully open head)
KV_RANGE_M3_H = (0.03, 1.5)  # what a preset radiator valve can offer
BALANCING_MAX_PASSES = 30
BALANCING_TOLERANCE = 0.05  # stop when every radiator is within 5 % of design [-]
PUMP_HEAD_AT_DESIGN_KPA = 30.0  # the pump curve passes through it at design flow


def room_ids() -> list[tuple[str, int, tuple]]:
    """(room id, floor, flat room spec) of every room, in route order."""
    rooms = []
    for floor in range(FLOORS):
        for flat in range(FLATS_PER_FLOOR):
            for spec in FLAT_ROOMS:
                rooms.append((f"f{floor}_flat{flat}_{spec[0]}", floor, spec))
    return rooms


def design_flow_kg_s(load_W: float) -> float:
    """Design mass flow for a heat load at the design drop. [kg/s]"""
    cp = float(water.specific_heat_J_kg_K(SUPPLY_C - DROP_K / 2))
    return load_W / (cp * DROP_K)


def block_scenario_text(kv_m3_h: list[float] | None = None) -> str:
    """Scenario TOML of the block; ``kv_m3_h`` per radiator (default all equal)."""
    rooms = room_ids()
    if kv_m3_h is None:
        kv_m3_h = [OPEN_KV_M3_H] * len(rooms)
    total_W = sum(spec[2] for _, _, spec in rooms)
    flow_m3_h = design_flow_kg_s(total_W) / float(water.density_kg_m3(SUPPLY_C)) * 3600
    x = np.array([0.0, 0.5, 1.0, 1.5, 2.0])
    h0 = PUMP_HEAD_AT_DESIGN_KPA / 0.75
    out = [
        f'name = "Generated apartment block, {len(rooms)} radiators"',
        'description = "Invented benchmark block: 5 storeys, 8 flats a floor."',
        'schemes = ["direct_return"]',
        "",
        "[design]",
        "outdoor_temp_C = -10.0",
        f"supply_temp_C = {SUPPLY_C}",
        f"temperature_drop_K = {DROP_K}",
        "",
        "[source]",
        f"max_power_kW = {SOURCE_OVERSIZE * total_W / 1e3:.6g}",
        f"flow_temp_C = {SUPPLY_C}",
        "water_volume_L = 30.0",
        "",
        "[pump]",
        f"flow_m3_per_h = [{', '.join(f'{v:.8g}' for v in x * flow_m3_h)}]",
        f"head_kPa = [{', '.join(f'{v:.8g}' for v in h0 * (1 - 0.25 * x * x))}]",
        "",
        "[weather]",
        "outdoor_temp_C = -10.0",
        "",
        "[schedule]",
        'start_clock = "05:00"',
        'comfort_from = "05:00"',
        'before_comfort = "off"',
        "",
        "[simulation]",
        "duration_h = 6.0",
        "output_step_min = 2.0",
        "initial_room_temp_C = 15.0",
        "initial_water_temp_C = 15.0",
        "",
    ]
    for room_id, floor, (_, area, load, setpoint) in rooms:
        out += [
            "[[rooms]]",
            f'id = "{room_id}"',
            f"floor = {floor}",
            f"floor_area_m2 = {area}",
            f"design_heat_load_W = {load}",
            f"setpoint_C = {setpoint}",
            'mass_class = "light"',
            "",
        ]
    for floor in range(FLOORS):
        for flat in range(FLATS_PER_FLOOR):
            for a, b in FLAT_WALLS:
                out += [
                    "[[internal_walls]]",
                    f'rooms = ["f{floor}_flat{flat}_{a}", "f{floor}_flat{flat}_{b}"]',
                    f"conductance_W_per_K = {WALL_W_K}",
                    "",
                ]
    for (room_id, _, (_, _, load, _)), kv in zip(rooms, kv_m3_h, strict=True):
        out += [
            "[[emitters]]",
            f'id = "rad_{room_id}"',
            f'room = "{room_id}"',
            f"nominal_power_kW = {RADIATOR_OVERSIZE * load / 1e3:.4g}",
            f"kv_m3_per_h = {kv:.6g}",
            "",
        ]
    out += [
        "[route]",
        f'header_pipe = "{HEADER_PIPE}"',
        f'branch_pipe = "{BRANCH_PIPE}"',
        f'feed_pipe = "{FEED_PIPE}"',
        f"feed_length_m = {FEED_LENGTH_M}",
        "insulated = true",
        "unheated_space_temp_C = 12.0",
        "",
    ]
    for floor in range(FLOORS):
        out += ["[[route.floors]]", f"floor = {floor}"]
        if floor:
            out.append(f"riser_length_m = {RISER_LENGTH_M}")
        out.append("tees = [")
        out += [
            f'  {{ emitter = "rad_{room_id}", header_length_m = {TEE_SPACING_M}, '
            f"branch_length_m = {BRANCH_LENGTH_M} }},"
            for room_id, f, _ in room_ids()
            if f == floor
        ]
        out += ["]", ""]
    return "\n".join(out)


@dataclass(frozen=True)
class Block:
    """The balanced block and how close its flows come to design."""

    scenario: Scenario
    text: str
    kv_m3_h: tuple[float, ...]
    emitter_flow_pct_of_design_min_max: tuple[float, float]
    build_s: float


def build_block(scheme: str = "direct_return") -> Block:
    """Generate the block and balance its radiator valves (see module notes)."""
    started = time.perf_counter()
    design = np.array([design_flow_kg_s(spec[2]) for _, _, spec in room_ids()])
    kv = np.full(len(design), OPEN_KV_M3_H)
    for _ in range(BALANCING_MAX_PASSES):
        text = block_scenario_text(list(kv))
        scenario = parse_scenario(text, origin="<apartment block>")
        network = layouts.build(scenario, scheme)
        flows = FlowSolver(network).solve(water_temp_C=SUPPLY_C - DROP_K / 2)
        ratio = flows.mass_flow_kg_s[network.emitter_links()] / design
        if np.max(np.abs(ratio - 1.0)) <= BALANCING_TOLERANCE:
            break
        kv = np.clip(kv / ratio, *KV_RANGE_M3_H)
    return Block(
        scenario=scenario,
        text=text,
        kv_m3_h=tuple(float(k) for k in kv),
        emitter_flow_pct_of_design_min_max=(
            100.0 * float(ratio.min()),
            100.0 * float(ratio.max()),
        ),
        build_s=time.perf_counter() - started,
    )


def peak_rss_MB() -> float:
    """Peak resident memory of this process so far (Linux: ru_maxrss in KiB). [MB]"""
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024 / 1e6


def main() -> int:
    """Build, warm the kernels up on the demo house, time one 6 h block run."""
    from simheat.dynamics.integrate import WarmUpModel
    from simheat.dynamics.simulate import simulate
    from simheat.scenario import load_scenario

    repo = Path(__file__).resolve().parent.parent
    t0 = time.perf_counter()
    # loads every kernel from the on-disk cache (or compiles it) on a small house
    simulate(load_scenario(repo / "scenarios" / "bungalow.toml"), "direct_return")
    warmup_s = time.perf_counter() - t0
    block = build_block()
    n_states = WarmUpModel(block.scenario, "direct_return").model.n_states
    rss_before = peak_rss_MB()
    t0 = time.perf_counter()
    run = simulate(block.scenario, "direct_return")
    wall_s = time.perf_counter() - t0
    rooms = run.summary.rooms
    times = [r.time_to_setpoint_s for r in rooms if r.time_to_setpoint_s is not None]
    simulated_s = float(run.time_s[-1] - run.time_s[0])
    report = {
        "n_rooms": len(block.scenario.rooms),
        "n_emitters": len(block.scenario.emitters),
        "n_links": run.network.n_links,
        "n_nodes": run.network.n_nodes,
        "n_states": n_states,
        "emitter_flow_pct_of_design_min_max": list(
            block.emitter_flow_pct_of_design_min_max
        ),
        "build_and_balance_s": block.build_s,
        "kernel_warmup_s": warmup_s,
        "simulated_s": simulated_s,
        "wall_s": wall_s,
        "faster_than_real_time": simulated_s / wall_s,
        "integrator_wall_s": run.solver.get("wall_time_s"),
        "rhs_calls": run.solver.get("rhs_calls"),
        "jacobian_evaluations": run.solver.get("jacobian_evaluations"),
        "flow_solves": run.solver.get("flow_solves"),
        "rooms_reaching_setpoint": len(times),
        "time_to_setpoint_min_median_max_min": [
            float(np.min(times)) / 60.0,
            float(np.median(times)) / 60.0,
            float(np.max(times)) / 60.0,
        ]
        if times
        else None,
        "energy_balance_error_pct": run.summary.energy.balance_error_pct,
        "peak_rss_before_run_MB": rss_before,
        "peak_rss_MB": peak_rss_MB(),
    }
    json.dump(report, sys.stdout)
    sys.stdout.write("\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
