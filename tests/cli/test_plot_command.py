"""``simheat plot``: files written and printed, refusals, the run file untouched."""

from __future__ import annotations

import h5py
import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.plots import PLOT_KIND_NAMES
from simheat.runs.checks import seal
from simheat.runs.store import save_run


@pytest.fixture
def runner():
    return CliRunner()


@pytest.fixture
def run_file(bungalow_runs, tmp_path):
    """The demo bungalow's direct-return run saved in a fresh directory."""
    return save_run(bungalow_runs["direct_return"], tmp_path / "house.h5")


def test_plot_writes_every_kind_beside_the_run_and_prints_paths(runner, run_file):
    result = runner.invoke(main, ["plot", str(run_file)])
    assert result.exit_code == 0, result.output
    expected = [str(run_file.parent / f"house_{kind}.png") for kind in PLOT_KIND_NAMES]
    assert result.stdout.splitlines() == expected
    for path in expected:
        with open(path, "rb") as f:
            assert f.read(8) == b"\x89PNG\r\n\x1a\n"


def test_plot_one_kind_as_svg_into_out_dir(runner, run_file, tmp_path):
    out = tmp_path / "figures"
    result = runner.invoke(
        main,
        ["plot", str(run_file), "--kind", "pressure", "--format", "svg"]
        + ["--out", str(out)],
    )
    assert result.exit_code == 0, result.output
    assert result.stdout.splitlines() == [str(out / "house_pressure.svg")]
    assert [p.name for p in out.iterdir()] == ["house_pressure.svg"]
    assert b"<svg" in (out / "house_pressure.svg").read_bytes()[:2000]


def test_plot_refuses_to_overwrite_and_writes_nothing(runner, run_file):
    existing = run_file.parent / "house_energy.png"
    existing.write_bytes(b"keep me")
    result = runner.invoke(main, ["plot", str(run_file)])
    assert result.exit_code == 2
    assert "house_energy.png exists; pass --overwrite" in result.stderr
    assert existing.read_bytes() == b"keep me"
    assert sorted(p.name for p in run_file.parent.iterdir()) == [
        "house.h5",
        "house_energy.png",
    ]


def test_plot_overwrite_replaces_the_figure(runner, run_file):
    existing = run_file.parent / "house_flows.png"
    existing.write_bytes(b"old")
    result = runner.invoke(
        main, ["plot", str(run_file), "--kind", "flows", "--overwrite"]
    )
    assert result.exit_code == 0, result.output
    assert existing.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_plot_leaves_the_run_file_bytes_unchanged(runner, run_file):
    before = run_file.read_bytes()
    result = runner.invoke(main, ["plot", str(run_file), "--kind", "source"])
    assert result.exit_code == 0, result.output
    assert run_file.read_bytes() == before


def test_plot_of_a_text_file_is_one_line_and_exit_2(runner, tmp_path):
    text = tmp_path / "notes.h5"
    text.write_text("not a run\n", encoding="utf-8")
    result = runner.invoke(main, ["plot", str(text)])
    assert result.exit_code == 2
    assert result.stderr.count("\n") == 1
    assert "not an HDF5 file" in result.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["notes.h5"]


def test_plot_of_a_newer_schema_is_exit_2(runner, run_file):
    with h5py.File(run_file, "r+") as f:
        f.attrs["schema_version"] = 99
    seal(run_file)  # as a writer would: the file stays sound
    result = runner.invoke(main, ["plot", str(run_file)])
    assert result.exit_code == 2
    assert "schema version 99 is newer" in result.stderr


def test_plot_of_a_missing_file_is_exit_2(runner, tmp_path):
    result = runner.invoke(main, ["plot", str(tmp_path / "none.h5")])
    assert result.exit_code == 2
    assert "no such file" in result.stderr


def test_plot_rejects_an_unknown_kind(runner, run_file):
    result = runner.invoke(main, ["plot", str(run_file), "--kind", "sankey"])
    assert result.exit_code == 2
    assert "Invalid value for '--kind'" in result.stderr
