"""The command line on hostile input: one line, the documented exit code, no traceback.

Each case of issue 18 that reached the command line: output folders that cannot
be written (found before any simulation), folders given where files belong, the
library's own wording, an unexpected error, a problem too large to simulate,
and ``run --resume``.
"""

from __future__ import annotations

import json
import os
import stat

import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.cli.common import MESSAGE_LIMIT, SimheatCommand, one_line
from simheat.dynamics import size


@pytest.fixture
def runner():
    return CliRunner()


def _one_line(result, code: int) -> str:
    assert result.exit_code == code, result.output
    assert result.stderr.count("\n") == 1, result.stderr
    assert "Traceback" not in result.output
    return result.stderr


def test_out_below_a_regular_file_is_one_line_before_simulating(
    runner, tiny_house, tmp_path, monkeypatch
):
    # issue 18: "--out below a regular file: NotADirectoryError"
    # integrate, not simulate: modules that import simulate by name (analysis)
    # would keep the stand-in after this test if they were first imported here
    monkeypatch.setattr(
        "simheat.dynamics.simulate.integrate",
        lambda *a, **k: pytest.fail("simulated before checking --out"),
    )
    blocker = tmp_path / "file"
    blocker.write_text("")
    result = runner.invoke(main, ["run", str(tiny_house), "--out", str(blocker / "o")])
    line = _one_line(result, 2)
    assert (
        f"error: {blocker / 'o'}: cannot make the output folder (Not a directory)"
        in line
    )


def _unwritable_folder(tmp_path):
    """A folder this process cannot write into, or None (root ignores modes)."""
    folder = tmp_path / "locked"
    folder.mkdir()
    folder.chmod(stat.S_IRUSR | stat.S_IXUSR)
    if not os.access(folder, os.W_OK):
        return folder
    folder.chmod(stat.S_IRWXU)
    system = "/sys/kernel"
    if os.path.isdir(system) and not os.access(system, os.W_OK):
        return system
    try:  # root: os.access says yes for most folders; sysfs refuses anyway
        with open(os.path.join(system, ".simheat-probe"), "w"):
            pass
    except OSError:
        return system
    return None


@pytest.mark.parametrize("command", ["run", "plot", "compare", "report"])
def test_unwritable_out_is_one_line_exit_2_before_any_work(
    runner, tiny_house, tmp_path, command, bungalow_runs
):
    # issue 18: "An unwritable --out: PermissionError, raised only after the whole
    # simulation. plot into an unwritable folder: PermissionError."
    folder = _unwritable_folder(tmp_path)
    if folder is None:
        pytest.skip("no folder here refuses writes to this process")
    if command != "plot":
        args = [command, str(tiny_house), "--out", str(folder)]
    else:
        from simheat.runs.store import save_run

        run_file = save_run(bungalow_runs["direct_return"], tmp_path / "b.h5")
        args = ["plot", str(run_file), "--out", str(folder)]
    line = _one_line(runner.invoke(main, args), 2)
    assert f"{folder}: cannot " in line
    assert "simulating" not in line


@pytest.mark.parametrize(
    "command", ["run", "flows", "check", "balance", "layouts", "compare", "report"]
)
def test_directory_as_scenario_is_one_line(runner, tmp_path, command):
    # issue 18: "A directory passed as the scenario gets a 3-line usage error"
    line = _one_line(runner.invoke(main, [command, str(tmp_path)]), 2)
    assert f"error: {tmp_path}: is a directory; give a scenario file" in line


def test_directory_into_plot_is_one_line(runner, tmp_path):
    # issue 18: "plot says 'no such file'"
    line = _one_line(runner.invoke(main, ["plot", str(tmp_path)]), 2)
    assert f"error: {tmp_path}: is a directory; give a run file (.h5)" in line


def test_existing_output_uses_command_line_wording(runner, tiny_house, tmp_path):
    # issue 18: "Some messages use the Python API's wording ('pass
    # overwrite=True') on the command line"
    (tmp_path / "tiny_direct_return_warmup.png").write_bytes(b"keep")
    line = _one_line(
        runner.invoke(main, ["run", str(tiny_house), "--out", str(tmp_path)]), 2
    )
    assert "exists; pass --overwrite to replace it" in line
    assert "overwrite=True" not in line
    # run also offers --resume (issue 18: a killed --all-schemes run could
    # only be redone from scratch); a command without it does not name it
    assert line.rstrip().endswith("or --resume to keep complete runs of this scenario")
    (tmp_path / "tiny_compare.png").write_bytes(b"keep")
    line = _one_line(
        runner.invoke(main, ["compare", str(tiny_house), "--out", str(tmp_path)]), 2
    )
    assert "--resume" not in line


@pytest.mark.parametrize(
    ("args", "named"),
    [
        (["throttle", "{house}", "--opening", "0.5"], "Missing option '--emitter'"),
        (["throttle", "{house}", "--emitter", "x", "--opening", "half"], "--opening"),
        (["run", "{house}", "--scheme", "nope"], "--scheme"),
        (["run", "{house}", "--no-such-option"], "--no-such-option"),
        (["run", "{house}", "--scheme", "direct_return", "--all-schemes"], "--scheme"),
        (["flows"], "Missing argument 'SCENARIO'"),
    ],
)
def test_usage_error_is_one_line_naming_the_option(runner, tiny_house, args, named):
    # The rule for bad input holds on the command line itself: one line naming
    # the option, exit 2 (click alone prints usage, a hint and the error on
    # three lines).
    args = [a.format(house=tiny_house) for a in args]
    line = _one_line(runner.invoke(main, args), 2)
    assert line.startswith("error: ")
    assert named in line
    assert f"(see 'main {args[0]} --help')" in line


@pytest.mark.parametrize("number", ["nan", "inf", "-inf"])
@pytest.mark.parametrize(
    "args",
    [
        ["flows", "{house}", "--water-temperature-C", "{number}"],
        ["throttle", "{house}", "--emitter", "all", "--opening", "{number}"],
        ["throttle", "{house}", "--emitter", "front_rad", "--opening", "0.5",
         "--at-min", "{number}"],
        ["sweep", "{house}", "--checkpoint-min", "{number}"],
    ],
)  # fmt: skip
def test_a_non_finite_number_option_is_one_line_naming_it(
    runner, tiny_house, args, number
):
    # click's FloatRange lets NaN through (and an infinity through an open
    # end): --checkpoint-min nan ran a whole sweep
    args = [a.format(house=tiny_house, number=number) for a in args]
    option = args[-2]
    line = _one_line(runner.invoke(main, args), 2)
    assert line.startswith(f"error: Invalid value for '{option}'")


def test_throttle_messages_name_the_options(runner, tiny_house):
    # the library's argument names (emitter, at_min) are not the options
    args = ["throttle", str(tiny_house), "--opening", "0.5", "--emitter", "nowhere"]
    line = _one_line(runner.invoke(main, args), 2)
    assert "Invalid value for '--emitter': unknown emitter 'nowhere'" in line
    args[-1] = "front_rad"
    line = _one_line(runner.invoke(main, [*args, "--at-min", "61"]), 2)
    assert "Invalid value for '--at-min': must lie within the run, 0 to 60 min" in line


@pytest.mark.parametrize("overwrite", [[], ["--overwrite"]])
def test_a_folder_where_an_output_file_belongs_is_one_line(
    runner, tiny_house, tmp_path, overwrite
):
    # 'exists; pass --overwrite' would send the user to an option that cannot
    # help: a file is never renamed onto a folder
    folder = tmp_path / "balanced.toml"
    folder.mkdir()
    args = ["balance", str(tiny_house), "--write-scenario", str(folder), *overwrite]
    line = _one_line(runner.invoke(main, args), 2)
    assert line == f"error: {folder}: is a folder; give a file name\n"


def test_an_unexpected_error_is_one_line_exit_1(runner, tiny_house, monkeypatch):
    # Whatever goes wrong, never a traceback: a bug is named in one line.
    def broken(*args, **kwargs):
        raise KeyError("a bug\nover two lines")

    monkeypatch.setattr("simheat.scenario.load_scenario", broken)
    line = _one_line(runner.invoke(main, ["flows", str(tiny_house)]), 1)
    assert line.startswith("internal error: KeyError: ")


def test_one_line_joins_lines_and_cuts_long_messages():
    assert one_line("a\nb\r\n  c") == "a b c"
    cut = one_line("x" * 10_000)
    assert len(cut) == MESSAGE_LIMIT
    assert cut.endswith("...")


def test_every_command_maps_errors_to_one_line():
    from simheat.cli import COMMANDS, load_command

    for target in COMMANDS.values():
        assert isinstance(load_command(target), SimheatCommand), target


def test_too_large_a_problem_is_refused_before_simulating(
    runner, tiny_house, monkeypatch
):
    # issue 18: "Refuse before allocating, with exit 2 naming the keys, any
    # problem whose estimated state count x output samples exceeds a limit"
    monkeypatch.setattr(
        "simheat.dynamics.simulate.integrate",
        lambda *a, **k: pytest.fail("integrated a refused problem"),
    )
    text = tiny_house.read_text().replace(
        "duration_h = 1.0\noutput_step_min = 5.0",
        "duration_h = 336.0\noutput_step_min = 0.0166667",
    )
    tiny_house.write_text(text)
    line = _one_line(runner.invoke(main, ["run", str(tiny_house)]), 2)
    assert (
        "simulation.duration_h / simulation.output_step_min: the run would sample"
        in line
    )
    assert f"limit {size.MAX_STATE_SAMPLES:.3g}" in line


def test_problem_size_counts_the_states_the_model_builds(tiny_house):
    from simheat.dynamics.model import build_model
    from simheat.hydraulics import layouts
    from simheat.scenario import load_scenario

    scenario = load_scenario(tiny_house)
    for scheme in scenario.schemes:
        model = build_model(scenario, layouts.build(scenario, scheme))
        estimate = size.problem_size(scenario, scheme)
        assert estimate.states == model.n_states
        assert estimate.heads == model.n_sensors
        # 1 h at 5 min: 13 grid times, plus the comfort start when it is not one
        assert estimate.samples == 14


def _run_json(runner, scenario, out, *extra):
    result = runner.invoke(
        main,
        ["run", str(scenario), "--all-schemes", "--out", str(out), "--json", *extra],
    )
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout), result.stderr


def test_resume_keeps_complete_runs_and_runs_the_rest(runner, tiny_house, tmp_path):
    out = tmp_path / "out"
    first, _ = _run_json(runner, tiny_house, out)
    # a run killed during its second scheme leaves the first scheme's files only
    for name in ("tiny_reverse_return.h5", "tiny_reverse_return_warmup.png"):
        (out / name).unlink()
    kept = out / "tiny_direct_return.h5"
    stamp = kept.stat().st_mtime_ns
    again, _ = _run_json(runner, tiny_house, out, "--resume")
    assert kept.stat().st_mtime_ns == stamp  # not simulated or written again
    assert (out / "tiny_reverse_return.h5").exists()
    assert [r["scheme"] for r in again["runs"]] == ["direct_return", "reverse_return"]
    for before, after in zip(first["runs"], again["runs"], strict=True):
        assert before["rooms"] == after["rooms"]  # same runs, same answers


def test_resume_redraws_a_missing_figure_of_a_kept_run(runner, tiny_house, tmp_path):
    out = tmp_path / "out"
    _run_json(runner, tiny_house, out)
    figure = out / "tiny_direct_return_warmup.png"
    figure.unlink()  # killed between the run file and its figure
    _run_json(runner, tiny_house, out, "--resume")
    assert figure.stat().st_size > 10_000


def test_resume_does_not_keep_a_run_of_other_scenario_text(
    runner, tiny_house, tmp_path
):
    out = tmp_path / "out"
    _run_json(runner, tiny_house, out)
    tiny_house.write_text(tiny_house.read_text() + "\n# edited\n")
    result = runner.invoke(
        main, ["run", str(tiny_house), "--all-schemes", "--out", str(out), "--resume"]
    )
    line = _one_line(result, 2)
    assert "tiny_direct_return.h5 exists; pass --overwrite to replace it" in line


def _sweep(tmp_path, tiny_house):
    path = tmp_path / "sweep.toml"
    path.write_text(
        f'base = "{tiny_house.name}"\nmode = "grid"\n\n[[parameters]]\n'
        'key = "source.flow_temp_C"\nvalues = [55.0, 60.0]\n'
    )
    return path


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["{dir}"], "{dir}: is a directory; give a sweep file (.toml)"),
        (["{sweep}", "--out", "{dir}"], "{dir}: is a folder; give the sweep file's"),
        (
            ["{sweep}", "--out", "{file}/s.h5"],
            "{file}: output folder is a file, not a folder",
        ),
        (
            ["{sweep}", "--out", "{dir}/o/s.h5", "--csv", "{dir}"],
            "{dir}: is a folder; give the CSV file's name",
        ),
        (
            ["{sweep}", "--out", "{dir}/o/s.h5", "--csv", "{file}"],
            "{file} exists; pass --overwrite to replace it",
        ),
    ],
)
def test_sweep_paths_are_one_line_before_any_variant_runs(
    runner, tiny_house, tmp_path, monkeypatch, args, message
):
    monkeypatch.setattr(
        "simheat.batch.run_sweep", lambda *a, **k: pytest.fail("ran the sweep")
    )
    blocker = tmp_path / "file"
    blocker.write_text("")
    names = {"dir": tmp_path, "file": blocker, "sweep": _sweep(tmp_path, tiny_house)}
    argv = ["sweep", *(a.format(**names) for a in args)]
    line = _one_line(runner.invoke(main, argv), 2)
    assert message.format(**names) in line
