"""Peak memory of the largest building simheat supports (README, *Problem size*).

Generates the apartment block of ``apartment_block.py`` with more storeys and
flats (invented data: flats of five rooms, one radiator a room), at a size just within
:data:`simheat.dynamics.size.MAX_STATE_HEADS`, and simulates a whole day at a
fine output step, so that both size limits are approached. Prints one JSON
object: the block, its problem size against the limits, the wall time and the
process's peak resident memory.

Usage::

    python benchmarks/size_limit.py [--floors 10] [--flats 12] [--hours 24]
                                    [--output-step-min 0.5]

A block one size up (``--flats 14``) is refused before anything is allocated;
the script prints that refusal instead.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import time

import apartment_block as block_module

from simheat.dynamics import size
from simheat.errors import ScenarioError

# The floor headers of a 12-flat floor carry about 0.5 kg/s: DN50 keeps them
# under 0.3 m/s, as the 8-flat block's DN32 does for its 0.34 kg/s.
WIDE_HEADER_PIPE = "steel_dn50"
WIDE_FEED_PIPE = "steel_dn50"


def main() -> int:
    """Build the block, check its size, simulate it, print the figures."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--floors", type=int, default=10)
    parser.add_argument("--flats", type=int, default=12)
    parser.add_argument("--hours", type=float, default=24.0)
    parser.add_argument("--output-step-min", type=float, default=0.5)
    args = parser.parse_args()

    from simheat.dynamics.simulate import simulate

    block_module.FLOORS = args.floors
    block_module.FLATS_PER_FLOOR = args.flats
    if args.flats > 8:
        block_module.HEADER_PIPE = WIDE_HEADER_PIPE
        block_module.FEED_PIPE = WIDE_FEED_PIPE
    block = block_module.build_block()
    sim = dataclasses.replace(
        block.scenario.simulation,
        duration_s=3600.0 * args.hours,
        output_step_s=60.0 * args.output_step_min,
    )
    scenario = dataclasses.replace(block.scenario, simulation=sim)
    estimate = size.problem_size(scenario, "direct_return")
    report = {
        "n_rooms": len(scenario.rooms),
        "n_emitters": len(scenario.emitters),
        "hours": args.hours,
        "output_step_min": args.output_step_min,
        "states": estimate.states,
        "heads": estimate.heads,
        "samples": estimate.samples,
        "state_heads": estimate.state_heads,
        "state_heads_limit": size.MAX_STATE_HEADS,
        "state_samples": estimate.state_samples,
        "state_samples_limit": size.MAX_STATE_SAMPLES,
        "peak_rss_before_run_MB": block_module.peak_rss_MB(),
    }
    try:
        size.check_problem_size(scenario, "direct_return")
    except ScenarioError as exc:
        report["refused"] = str(exc)
        print(json.dumps(report))
        return 0
    started = time.perf_counter()
    run = simulate(scenario, "direct_return")
    report.update(
        {
            "wall_s": round(time.perf_counter() - started, 1),
            "rhs_calls": run.solver["rhs_calls"],
            "energy_balance_error_pct": run.summary.energy.balance_error_pct,
            "peak_rss_MB": block_module.peak_rss_MB(),
        }
    )
    print(json.dumps(report))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
