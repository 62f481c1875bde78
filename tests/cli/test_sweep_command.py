"""simheat sweep through the CLI: output, errors, exports, figures."""

import json

import pytest
from click.testing import CliRunner

from simheat.cli import main

GRID = """
base = "tiny.toml"
schemes = ["direct_return", "reverse_return"]
[[parameters]]
key = "source.flow_temp_C"
values = [55.0, 65.0]
[[parameters]]
key = "pump.head_kPa"
scale = [1.2]
"""


@pytest.fixture
def runner():
    return CliRunner()


@pytest.fixture
def grid(tiny_house):
    path = tiny_house.parent / "grid.toml"
    path.write_text(GRID, encoding="utf-8")
    return path


def _strict(text: str) -> dict:
    def refuse(name):
        raise AssertionError(f"non-strict JSON constant {name}")

    return json.loads(text, parse_constant=refuse)


def _sweep(runner, *args):
    # One worker unless a test asks otherwise: each worker start costs a second.
    args = [str(a) for a in args]
    if "--workers" not in args and "--scheduler" not in args:
        args += ["--workers", "1"]
    return runner.invoke(main, ["sweep", *args])


def test_json_lists_every_variant_and_ends_with_the_caution(runner, grid, tmp_path):
    out = tmp_path / "grid.h5"
    result = _sweep(runner, grid, "--out", out, "--workers", 2, "--json")
    assert result.exit_code == 0, result.output
    data = _strict(result.stdout)
    assert data["n_variants"] == 4
    assert data["done"] == 4
    assert data["file"] == str(out)
    assert "qualified installer" in data["caution"]
    variant = data["variants"][3]
    assert variant["id"] == 3
    assert variant["status"] == "done"
    assert variant["error"] is None
    assert variant["scheme"] == "reverse_return"
    assert variant["parameters"] == {"source.flow_temp_C": 65.0, "pump.head_kPa": 1.2}
    assert [r["id"] for r in variant["rooms"]] == ["front", "back"]
    assert out.exists()
    assert not (tmp_path / "grid.h5.parts").exists()
    assert "sweep: 4/4 done" in result.stderr  # the progress line


def test_a_variant_equals_a_plain_run_of_the_same_scenario(runner, grid, tmp_path):
    result = _sweep(runner, grid, "--out", tmp_path / "grid.h5", "--json")
    assert result.exit_code == 0, result.output
    variant = _strict(result.stdout)["variants"][3]  # 65 °C, head x 1.2, reverse
    # The same scenario written independently of the sweep's key paths: the
    # tiny house's text with the two values replaced by hand.
    text = (grid.parent / "tiny.toml").read_text()
    head = ", ".join(repr(h * 1.2) for h in (20.0, 17.0, 9.0))
    assert "flow_temp_C = 60.0" in text
    assert "head_kPa = [20.0, 17.0, 9.0]" in text
    text = text.replace("flow_temp_C = 60.0", "flow_temp_C = 65.0")
    text = text.replace("head_kPa = [20.0, 17.0, 9.0]", f"head_kPa = [{head}]")
    by_hand = tmp_path / "by_hand.toml"
    by_hand.write_text(text)
    plain = runner.invoke(
        main,
        ["run", str(by_hand), "--scheme", "reverse_return", "--json"]
        + ["--out", str(tmp_path / "plain")],
    )
    assert plain.exit_code == 0, plain.output
    run = _strict(plain.stdout)
    # Same inputs, same code: the figures agree to the last printed digit.
    assert variant["rooms"] == [
        {"id": r["id"], "time_to_setpoint_min": r["time_to_setpoint_min"]}
        for r in run["rooms"]
    ]
    assert variant["rooms_not_reached"] == run["rooms_not_reached"]
    assert variant["lowest_flow_pct_of_design"] == min(
        e["flow_pct_of_design"] for e in run["emitters"]
    )
    assert variant["peak_source_power_kW"] == run["peak_source_power_kW"]
    assert variant["source_energy_kWh"] == run["energy"]["source_kWh"]
    assert variant["balance_error_pct"] == run["energy"]["balance_error_pct"]
    times = [r["time_to_setpoint_min"] for r in run["rooms"]]
    assert variant["all_rooms_at_setpoint_min"] == max(times)


def test_a_key_missing_from_the_base_exits_2_naming_the_parameter(
    runner, grid, tmp_path
):
    grid.write_text(GRID.replace("source.flow_temp_C", "source.flow_temperature_C"))
    out = tmp_path / "grid.h5"
    result = _sweep(runner, grid, "--out", out)
    assert result.exit_code == 2
    assert result.stderr.startswith("error: parameters[0].key: 'source.flow_temperat")
    assert len(result.stderr.strip().splitlines()) == 1
    assert "Traceback" not in result.output
    assert not out.exists()
    assert not (tmp_path / "grid.h5.parts").exists()


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--workers", "2", "--scheduler", "local:2"], "either --workers or"),
        (["--scheduler", "local:two"], "local:N needs a whole number"),
    ],
)
def test_bad_options_exit_2(runner, grid, tmp_path, args, message):
    result = _sweep(runner, grid, "--out", tmp_path / "grid.h5", *args)
    assert result.exit_code == 2
    assert message in result.stderr


def test_an_existing_sweep_file_is_kept_unless_asked(runner, grid, tmp_path):
    out = tmp_path / "grid.h5"
    assert _sweep(runner, grid, "--out", out, "--workers", 1).exit_code == 0
    before = out.read_bytes()
    result = _sweep(runner, grid, "--out", out)
    assert result.exit_code == 2
    assert "pass --resume to continue that sweep or --overwrite" in result.stderr
    assert out.read_bytes() == before
    # A changed sweep is refused on resume, and started afresh on --overwrite.
    grid.write_text(GRID.replace("65.0", "66.0"))
    result = _sweep(runner, grid, "--out", out, "--resume")
    assert result.exit_code == 2
    assert "holds a different sweep" in result.stderr
    result = _sweep(runner, grid, "--out", out, "--overwrite", "--json")
    assert result.exit_code == 0, result.output
    assert (
        _strict(result.stdout)["variants"][2]["parameters"]["source.flow_temp_C"] == 66
    )


def test_csv_export_has_a_row_per_variant(runner, grid, tmp_path):
    grid.write_text(GRID.replace("55.0", "10.0"))  # two variants fail
    csv_path = tmp_path / "table.csv"
    result = _sweep(runner, grid, "--out", tmp_path / "g.h5", "--csv", csv_path)
    assert result.exit_code == 0, result.output
    lines = csv_path.read_text().splitlines()
    assert lines[0].startswith("# Caution")
    header = lines[1].split(",")
    assert header[:6] == [
        "id",
        "scheme",
        "status",
        "error",
        "source.flow_temp_C",
        "pump.head_kPa",
    ]
    assert "time_to_setpoint_min:front" in header
    assert len(lines) == 2 + 4
    assert lines[2].startswith('0,direct_return,failed,"source.flow_temp_C: must be')
    assert lines[4].startswith("2,direct_return,done,,65.0,1.2,")
    assert result.stdout.strip().splitlines()[-1].startswith("Caution")
    # The CSV is not replaced without --overwrite either: one line naming it once.
    again = _sweep(runner, grid, "--out", tmp_path / "h.h5", "--csv", csv_path)
    assert again.exit_code == 2
    assert again.stderr == f"error: {csv_path} exists; pass --overwrite to replace it\n"


def test_plot_draws_the_metrics_of_a_grid_sweep(runner, grid, tmp_path):
    out = tmp_path / "grid.h5"
    assert _sweep(runner, grid, "--out", out).exit_code == 0
    result = runner.invoke(main, ["plot", str(out)])
    assert result.exit_code == 0, result.output
    assert result.stdout.split() == [str(tmp_path / "grid_metrics.png")]
    assert (tmp_path / "grid_metrics.png").stat().st_size > 10_000
    result = runner.invoke(main, ["plot", str(out), "--kind", "probability"])
    assert result.exit_code == 2
    assert "needs a random sweep" in result.stderr
    result = runner.invoke(main, ["plot", str(out), "--kind", "warmup"])
    assert result.exit_code == 2
    assert "draws a run file" in result.stderr
    # An existing figure is refused in one line naming it once, and replaced
    # with --overwrite.
    figure = tmp_path / "grid_metrics.png"
    figure.write_bytes(b"old")
    result = runner.invoke(main, ["plot", str(out)])
    assert result.exit_code == 2
    assert result.stderr == f"error: {figure} exists; pass --overwrite to replace it\n"
    assert figure.read_bytes() == b"old"
    result = runner.invoke(main, ["plot", str(out), "--overwrite"])
    assert result.exit_code == 0, result.output
    assert result.stdout.split() == [str(figure)]
    assert figure.stat().st_size > 10_000


def test_plot_of_a_random_sweep_adds_the_probability(runner, tiny_house, tmp_path):
    sweep = tiny_house.parent / "random.toml"
    sweep.write_text(
        'base = "tiny.toml"\nmode = "random"\nsamples = 6\nseed = 1\n'
        '[[parameters]]\nkey = "source.flow_temp_C"\nuniform = [55.0, 70.0]\n'
    )
    out = tmp_path / "random.h5"
    assert _sweep(runner, sweep, "--out", out).exit_code == 0
    result = runner.invoke(main, ["plot", str(out), "--format", "svg"])
    assert result.exit_code == 0, result.output
    assert result.stdout.split() == [
        str(tmp_path / "random_metrics.svg"),
        str(tmp_path / "random_probability.svg"),
    ]
