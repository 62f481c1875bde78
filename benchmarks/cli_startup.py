"""Start-up time of `simheat`: `--help` of the group and of each command.

Usage::

    python benchmarks/cli_startup.py [--repeats N] [--root CHECKOUT]

Prints one JSON object on stdout. Every figure is the median wall time of a fresh
``python -m simheat ... --help`` process (the import of the CLI and click's help
text), with ``PYTHONPATH`` set to the checkout, so the figures measure that
checkout's code. ``python_startup_s`` is the same for ``python -c pass``: the part
no change to simheat can remove. ``heavy_modules`` lists which of numba, scipy,
h5py and matplotlib the ``--help`` process imported (none is the aim).

Nothing here asserts a time: compare figures from the same machine before and after a
change (the target of issue 10 is about 0.2 s).
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
HEAVY = ("numba", "scipy", "h5py", "matplotlib")
TARGET_HELP_S = 0.2  # issue 10, reported beside the figures, never asserted


def _environment(root: Path) -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(root)
    return env


def median_wall_s(argv: list[str], root: Path, repeats: int) -> float:
    """Median wall time of ``argv`` run as a fresh process from ``root``. [s]."""
    env = _environment(root)
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        subprocess.run(argv, cwd=root, env=env, check=True, capture_output=True)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def command_names(root: Path) -> list[str]:
    """Command names listed by ``simheat --help`` (read off its output)."""
    out = subprocess.run(
        [sys.executable, "-m", "simheat", "--help"],
        cwd=root,
        env=_environment(root),
        check=True,
        capture_output=True,
        text=True,
    ).stdout
    lines = out.split("Commands:", 1)[1].splitlines()
    return [line.split()[0] for line in lines if line.startswith("  ")]


def heavy_modules_after_help(root: Path) -> list[str]:
    """Which heavy packages ``simheat --help`` imports."""
    probe = (
        "import contextlib, io, sys\n"
        "from simheat.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    main(['--help'], prog_name='simheat', standalone_mode=False)\n"
        f"print(','.join(m for m in {HEAVY!r} if m in sys.modules))\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", probe],
        cwd=root,
        env=_environment(root),
        check=True,
        capture_output=True,
        text=True,
    ).stdout
    return [m for m in out.strip().split(",") if m]


def main() -> None:
    """Print the start-up figures as one JSON object."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=9)
    parser.add_argument("--root", type=Path, default=REPO, help="checkout to time")
    args = parser.parse_args()
    root = args.root.resolve()
    simheat = [sys.executable, "-m", "simheat"]

    def timed(argv: list[str]) -> float:
        return round(median_wall_s(argv, root, args.repeats), 4)

    figures = {
        "root": str(root),
        "repeats": args.repeats,
        "target_help_s": TARGET_HELP_S,
        "python_startup_s": timed([sys.executable, "-c", "pass"]),
        "help_s": timed([*simheat, "--help"]),
        "command_help_s": {
            name: timed([*simheat, name, "--help"]) for name in command_names(root)
        },
        "heavy_modules": heavy_modules_after_help(root),
        "load_average_1min": os.getloadavg()[0],
    }
    print(json.dumps(figures, indent=2))


if __name__ == "__main__":
    main()
