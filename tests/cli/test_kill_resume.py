"""SIGKILL a running ``simheat run --all-schemes``; every file left is whole; resume.

The run goes in a separate process (``python -m simheat``, PYTHONPATH set to this
checkout) over the demo bungalow cut to two hours, under four schemes. It is
killed with SIGKILL (no handler runs) either while the first run file is being
written (its temporary file has appeared) or as soon as it is in place. Every
file left under a final name must then be complete (run files load and pass
their seal and checks, figures are whole PNGs), and ``--resume`` must keep what
was finished and complete the set.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.files import STALE_AFTER_S, TEMPORARY_PREFIX, clean_stale
from simheat.runs.store import load_run

REPO = Path(__file__).resolve().parents[2]
SCHEMES = [
    "direct_return",
    "reverse_return",
    "split_direct_return",
    "home_run_manifold",
]
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
PNG_END = b"IEND\xaeB`\x82"  # the IEND chunk and its CRC close every PNG
START_TIMEOUT_S = 240.0  # a cold numba cache compiles for about half a minute


def _scenario(tmp_path: Path) -> Path:
    text = (REPO / "scenarios" / "bungalow.toml").read_text(encoding="utf-8")
    text = text.replace(
        'schemes = ["direct_return", "reverse_return"]',
        "schemes = [" + ", ".join(f'"{s}"' for s in SCHEMES) + "]",
    ).replace("duration_h = 6.0", "duration_h = 2.0")
    path = tmp_path / "house.toml"
    path.write_text(text, encoding="utf-8")
    return path


def _final_files(out: Path) -> list[Path]:
    return sorted(p for p in out.iterdir() if not p.name.startswith(TEMPORARY_PREFIX))


def _assert_whole(path: Path) -> None:
    if path.suffix == ".h5":
        assert load_run(path).scheme in SCHEMES
    else:
        data = path.read_bytes()
        assert data.startswith(PNG_SIGNATURE), path
        assert data.endswith(PNG_END), path


def _first_run_file(out: Path, writing: bool) -> bool:
    if not out.is_dir():
        return False
    names = [p.name for p in out.iterdir() if p.name.endswith(".h5")]
    return any(name.startswith(TEMPORARY_PREFIX) == writing for name in names)


def _kill(scenario: Path, out: Path, writing: bool) -> None:
    env = {**os.environ, "PYTHONPATH": str(REPO)}
    process = subprocess.Popen(
        [sys.executable, "-m", "simheat", "run", str(scenario), "--all-schemes"]
        + ["--out", str(out)],
        env=env,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    deadline = time.monotonic() + START_TIMEOUT_S
    try:
        while time.monotonic() < deadline and process.poll() is None:
            if _first_run_file(out, writing):
                break
            time.sleep(0.005)
        else:
            pytest.fail("no run file appeared before the timeout")
        process.send_signal(signal.SIGKILL)
    finally:
        process.wait()


@pytest.mark.parametrize("writing", [True, False], ids=["while-writing", "after"])
def test_killed_run_leaves_only_whole_files_and_resume_completes_the_set(
    tmp_path, writing
):
    scenario = _scenario(tmp_path)
    out = tmp_path / "out"
    _kill(scenario, out, writing)

    left = _final_files(out)
    for path in left:
        _assert_whole(path)
    finished = [p for p in left if p.suffix == ".h5"]
    assert len(finished) < len(SCHEMES), "the run finished before the kill"
    if not writing:
        assert finished, "the kill came before any run file was in place"
    stamps = {p.name: p.stat().st_mtime_ns for p in finished}

    result = CliRunner().invoke(
        main, ["run", str(scenario), "--all-schemes", "--out", str(out), "--resume"]
    )
    assert result.exit_code == 0, result.output
    expected = sorted(
        [f"house_{s}.h5" for s in SCHEMES] + [f"house_{s}_warmup.png" for s in SCHEMES]
    )
    assert [p.name for p in _final_files(out)] == expected
    for path in _final_files(out):
        _assert_whole(path)
    for name, stamp in stamps.items():
        assert (out / name).stat().st_mtime_ns == stamp  # kept, not redone
    # What the killed process left half-written is ours and, once stale, cleaned
    # by the next write into the folder.
    later = time.time() + STALE_AFTER_S + 1.0
    leftovers = [p for p in out.iterdir() if p.name.startswith(TEMPORARY_PREFIX)]
    assert sorted(clean_stale(out, now=later)) == sorted(leftovers)
    assert sorted(p.name for p in out.iterdir()) == expected
    for scheme in SCHEMES:
        assert f"keeping {out / f'house_{scheme}.h5'}" in result.stderr or (
            f"house_{scheme}.h5" not in stamps
        )
