"""The scenario package is data and validation: it imports no solver."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def test_loading_a_scenario_imports_no_solver_or_compiler():
    # A fresh interpreter: what `simheat.scenario` pulls in on its own.
    code = (
        "import sys\n"
        "from simheat.scenario import load_scenario\n"
        "load_scenario('scenarios/two_storey.toml')\n"
        "heavy = ('simheat.hydraulics', 'simheat.resolve', 'simheat.dynamics',"
        " 'numba', 'scipy')\n"
        "print(sorted({m for m in sys.modules if m.startswith(heavy)}))\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code],
        cwd=ROOT,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
        capture_output=True,
        text=True,
        check=True,
    )
    assert out.stdout.strip() == "[]"
