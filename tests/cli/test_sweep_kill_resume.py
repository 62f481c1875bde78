"""A sweep killed outright, or stopped with Ctrl-C, then resumed: nothing lost,
nothing run twice, and the sweep file opens with plain h5py at every step.

Each test runs ``python -m simheat sweep`` in a subprocess, as a user would.
"""

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import h5py
import pytest

ROOT = Path(__file__).resolve().parents[2]
# 21 flow temperatures x 2 schemes = 42 one-hour runs of the tiny house; with a
# consolidation after every variant (--checkpoint-min 0) the sweep takes a few
# seconds, long enough to be stopped part-way.
SWEEP = """
base = "tiny.toml"
schemes = ["direct_return", "reverse_return"]
[[parameters]]
key = "source.flow_temp_C"
range = { start = 55, stop = 75, step = 1 }
"""
N_VARIANTS = 42
STOP_AFTER = 8  # finished variants before the sweep is stopped
TIMEOUT_S = 120.0


def _sweep(tmp_path: Path, *extra: str) -> subprocess.Popen:
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(
        p for p in (str(ROOT), env.get("PYTHONPATH")) if p
    )
    command = [sys.executable, "-m", "simheat", "sweep", "sweep.toml", "--out"]
    command += ["out.h5", "--workers", "2", "--checkpoint-min", "0", "--json", *extra]
    return subprocess.Popen(
        command,
        cwd=tmp_path,
        env=env,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )


def _parts(tmp_path: Path) -> dict[int, dict]:
    parts = tmp_path / "out.h5.parts"
    rows = {}
    for path in parts.glob("0*.json"):
        row = json.loads(path.read_text())
        rows[row["id"]] = row
    return rows


def _stop_part_way(tmp_path: Path, process: subprocess.Popen, how: int) -> None:
    deadline = time.monotonic() + TIMEOUT_S
    while len(_parts(tmp_path)) < STOP_AFTER:
        assert process.poll() is None, process.communicate()
        assert time.monotonic() < deadline, "sweep made no progress"
        time.sleep(0.005)
    process.send_signal(how)


def _table(path: Path) -> dict[int, tuple[str, float]]:
    """Status and wall time of every variant, read with plain h5py."""
    with h5py.File(path, "r") as f:
        ids = f["table/id"][()]
        status = f["table/status"].asstr()[()]
        wall = f["table/wall_time_s"][()]
    return {int(i): (s, float(w)) for i, s, w in zip(ids, status, wall, strict=True)}


def _finish(tmp_path: Path, kept: dict[int, dict]) -> None:
    """Resume to the end; check that kept variants were not run again."""
    resumed = _sweep(tmp_path, "--resume")
    stdout, stderr = resumed.communicate(timeout=TIMEOUT_S)
    assert resumed.returncode == 0, stderr
    data = json.loads(stdout)
    assert data["kept_from_before"] == len(kept)
    assert data["ran"] == N_VARIANTS - len(kept)
    table = _table(tmp_path / "out.h5")
    assert sorted(table) == list(range(N_VARIANTS))  # every variant, once
    assert {status for status, _ in table.values()} == {"done"}
    # A kept variant keeps the wall time it was run with: it was not run again.
    for variant_id, row in kept.items():
        assert table[variant_id][1] == row["wall_time_s"]
    assert not (tmp_path / "out.h5.parts").exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "out.h5",
        "sweep.toml",
        "tiny.toml",
    ]


@pytest.fixture
def sweep_dir(tiny_house):
    (tiny_house.parent / "sweep.toml").write_text(SWEEP)
    return tiny_house.parent


def test_a_killed_sweep_resumes_with_every_variant_exactly_once(sweep_dir):
    process = _sweep(sweep_dir)
    _stop_part_way(sweep_dir, process, signal.SIGKILL)
    process.wait(timeout=TIMEOUT_S)
    assert process.returncode == -signal.SIGKILL
    # The file is whole (last consolidation) and opens with plain h5py; together
    # with the sidecar it holds every variant finished before the kill.
    table = _table(sweep_dir / "out.h5")
    assert len(table) == N_VARIANTS
    kept = _parts(sweep_dir)
    done_in_file = {i for i, (status, _) in table.items() if status == "done"}
    # Parts are deleted only after the final consolidation, so every variant the
    # file already holds is also in the sidecar (and a kept part may be newer).
    assert done_in_file <= set(kept)
    assert STOP_AFTER <= len(kept) < N_VARIANTS  # stopped part-way
    _finish(sweep_dir, kept)


def test_ctrl_c_stops_cleanly_and_keeps_every_finished_variant(sweep_dir):
    process = _sweep(sweep_dir)
    _stop_part_way(sweep_dir, process, signal.SIGINT)
    stdout, stderr = process.communicate(timeout=TIMEOUT_S)
    assert process.returncode == 130, stderr
    assert "Traceback" not in stderr
    assert "run the same command with --resume to finish" in stderr
    data = json.loads(stdout)
    assert data["interrupted"] is True
    finished = data["done"] + data["failed"]
    assert STOP_AFTER <= finished < N_VARIANTS
    # Everything finished is in the file; the sidecar was consolidated and removed.
    assert not (sweep_dir / "out.h5.parts").exists()
    table = _table(sweep_dir / "out.h5")
    kept = {i: {"wall_time_s": w} for i, (s, w) in table.items() if s == "done"}
    assert len(kept) == finished
    _finish(sweep_dir, kept)
