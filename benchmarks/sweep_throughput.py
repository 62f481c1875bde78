"""Throughput of ``simheat sweep`` against bare ``simulate`` calls.

Usage::

    python benchmarks/sweep_throughput.py [--variants N] [--quick]

Prints one JSON object on stdout (progress on stderr). The variants are the demo
morning (``scenarios/bungalow.toml``, 6 h, direct return) at N Latin-hypercube
points of flow temperature (65-75 °C) and a heat-load factor (0.9-1.1), the same
N variants for every figure:

- ``bare``: ``simulate`` called on each variant's parsed scenario in this process,
  after one warm-up call (kernels loaded); the parse is timed apart.
- ``pool_1``, ``pool_2``: ``run_sweep`` with 1 and 2 local worker processes,
  end to end (workers start, load the kernels, every variant is written to the
  sidecar with an fsync, the file is consolidated), and in steady state (rate
  between the first and the last finished variant).
- ``cpu_s_*``: CPU time of the sweep process and of its worker processes (all
  children reaped by the end, so also a LocalCluster's), to tell overhead from
  cores taken by other work on a shared machine.
- ``dask_local_2``: the same through a dask LocalCluster of 2 single-threaded
  workers (``--scheduler local:2``), if dask.distributed is installed.

Nothing is asserted; the targets of the issue are printed beside the figures. The
machine is shared, so the 1-minute load average is recorded before and after.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import statistics
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(REPO))

from simheat.batch import expand, load_sweep, run_sweep  # noqa: E402
from simheat.batch.expand import assignments  # noqa: E402
from simheat.batch.variant import variant_text  # noqa: E402
from simheat.dynamics.simulate import simulate  # noqa: E402
from simheat.scenario import parse_scenario  # noqa: E402

DEMO = REPO / "scenarios" / "bungalow.toml"
TARGET_PER_CORE_VS_BARE = 0.85  # [-]
TARGET_PARALLEL_EFFICIENCY = 0.85  # [-]
SWEEP = """
name = "throughput benchmark"
base = "{base}"
schemes = ["direct_return"]
mode = "random"
samples = {samples}
seed = 11
[[parameters]]
key = "source.flow_temp_C"
uniform = [65.0, 75.0]
[[parameters]]
key = "rooms.*.design_heat_load_W"
scale = {{ uniform = [0.9, 1.1] }}
"""


def progress(message: str) -> None:
    print(f"[bench] {message}", file=sys.stderr, flush=True)


def load_1min() -> float:
    return os.getloadavg()[0]


def bare(spec) -> dict:
    """Parse and simulate every variant in this process."""
    variants = expand(spec)
    began = time.perf_counter()
    scenarios = [
        parse_scenario(variant_text(spec.base_text, assignments(spec, v)))
        for v in variants
    ]
    parse_s = time.perf_counter() - began
    simulate(scenarios[0], variants[0].scheme)  # warm-up: kernels loaded
    cpu = time.process_time()
    times = []
    for scenario, variant in zip(scenarios, variants, strict=True):
        began = time.perf_counter()
        simulate(scenario, variant.scheme)
        times.append(time.perf_counter() - began)
    total = sum(times)
    cpu = time.process_time() - cpu
    return {
        "simulate_cpu_s": round(cpu, 3),
        "variants": len(variants),
        "simulate_total_s": round(total, 3),
        "simulate_median_s": round(statistics.median(times), 4),
        "parse_and_build_text_per_variant_ms": round(1e3 * parse_s / len(variants), 3),
        "variants_per_hour": round(3600.0 * len(variants) / total, 1),
        "variants_per_hour_with_parse": round(
            3600.0 * len(variants) / (total + parse_s), 1
        ),
    }


def swept(spec, directory: Path, **executor) -> dict:
    """One run_sweep, end to end and in steady state."""
    marks: list[tuple[int, float]] = []

    def record(p) -> None:
        if p.done:
            marks.append((p.done, time.perf_counter()))

    cpu_main = time.process_time()
    cpu_children = resource.getrusage(resource.RUSAGE_CHILDREN)
    began = time.perf_counter()
    outcome = run_sweep(
        spec, directory / "out.h5", overwrite=True, progress=record, **executor
    )
    wall = time.perf_counter() - began
    cpu_main = time.process_time() - cpu_main
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu_workers = (after.ru_utime + after.ru_stime) - (
        cpu_children.ru_utime + cpu_children.ru_stime
    )
    n = outcome.ran
    (first_n, first_t), (last_n, last_t) = marks[0], marks[-1]
    steady = (last_n - first_n) / (last_t - first_t) if last_t > first_t else None
    failed = sum(r["status"] != "done" for r in outcome.results.rows)
    return {
        "executor": outcome.executor,
        "variants": n,
        "failed": failed,
        "wall_s": round(wall, 3),
        "first_result_after_s": round(first_t - began, 3),
        "variants_per_hour": round(3600.0 * n / wall, 1),
        "steady_variants_per_hour": None if steady is None else round(3600 * steady, 1),
        "cpu_s_sweep_process": round(cpu_main, 3),
        "cpu_s_workers": round(cpu_workers, 3),
    }


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--variants", type=int, default=200)
    parser.add_argument("--quick", action="store_true", help="60 variants")
    args = parser.parse_args()
    samples = 60 if args.quick else args.variants
    figures: dict = {
        "machine": {
            "python": platform.python_version(),
            "cpus": os.cpu_count(),
            "load_average_1min_before": round(load_1min(), 2),
        },
        "scenario": f"{DEMO.name}, 6 h, direct_return",
    }
    with tempfile.TemporaryDirectory() as tmp:
        directory = Path(tmp)
        sweep_path = directory / "sweep.toml"
        sweep_path.write_text(SWEEP.format(base=DEMO.as_posix(), samples=samples))
        spec = load_sweep(sweep_path)
        progress(f"bare simulate, {samples} variants")
        figures["bare"] = bare(spec)
        for workers in (1, 2):
            progress(f"sweep, {workers} local worker(s)")
            figures[f"pool_{workers}"] = swept(spec, directory, workers=workers)
        try:
            import distributed  # noqa: F401
        except ImportError:
            figures["dask_local_2"] = None
        else:
            progress("sweep, dask LocalCluster of 2 workers")
            figures["dask_local_2"] = swept(spec, directory, scheduler="local:2")
    bare_rate = figures["bare"]["variants_per_hour"]
    one, two = figures["pool_1"], figures["pool_2"]
    ratios = {
        "per_core_vs_bare": round(one["variants_per_hour"] / bare_rate, 3),
        "per_core_vs_bare_steady": round(
            one["steady_variants_per_hour"] / bare_rate, 3
        ),
        "parallel_efficiency_2": round(
            two["variants_per_hour"] / (2 * one["variants_per_hour"]), 3
        ),
        "parallel_efficiency_2_steady": round(
            two["steady_variants_per_hour"] / (2 * one["steady_variants_per_hour"]), 3
        ),
        # CPU seconds per variant, bare against the whole sweep (workers, start-up
        # and the sweep process): the per-core figure that other load cannot blur.
        "per_core_vs_bare_cpu": round(
            figures["bare"]["simulate_cpu_s"]
            / (one["cpu_s_workers"] + one["cpu_s_sweep_process"]),
            3,
        ),
        "target_per_core_vs_bare": TARGET_PER_CORE_VS_BARE,
        "target_parallel_efficiency": TARGET_PARALLEL_EFFICIENCY,
    }
    dask = figures["dask_local_2"]
    if dask is not None:
        ratios["dask_cpu_vs_pool_2"] = round(
            (dask["cpu_s_workers"] + dask["cpu_s_sweep_process"])
            / (two["cpu_s_workers"] + two["cpu_s_sweep_process"]),
            3,
        )
        ratios["dask_wall_vs_pool_2"] = round(dask["wall_s"] / two["wall_s"], 3)
        ratios["dask_steady_rate_vs_pool_2"] = round(
            dask["steady_variants_per_hour"] / two["steady_variants_per_hour"], 3
        )
    figures["ratios"] = ratios
    figures["machine"]["load_average_1min_after"] = round(load_1min(), 2)
    print(json.dumps(figures, indent=2))


if __name__ == "__main__":
    main()
