"""simheat report: writes one page, refuses to overwrite, strict JSON, bad input."""

from __future__ import annotations

import json

from click.testing import CliRunner

from simheat.cli import main


def test_report_writes_one_page_and_prints_its_path(tiny_house, tmp_path):
    out = tmp_path / "out"
    result = CliRunner().invoke(main, ["report", str(tiny_house), "--out", str(out)])
    assert result.exit_code == 0, result.output
    page = out / "tiny_report.html"
    assert [p.name for p in out.iterdir()] == ["tiny_report.html"]
    assert f"report: {page}" in result.output
    assert result.output.rstrip().endswith("qualified installer.")
    assert page.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")


def test_report_refuses_to_overwrite(tiny_house, tmp_path):
    args = [
        "report",
        str(tiny_house),
        "--out",
        str(tmp_path),
        "--schemes",
        "direct_return",
    ]
    assert CliRunner().invoke(main, args).exit_code == 0
    again = CliRunner().invoke(main, args)
    assert again.exit_code == 2
    assert "exists; pass --overwrite to replace it" in again.output
    assert CliRunner().invoke(main, [*args, "--overwrite"]).exit_code == 0


def test_report_json_is_strict_and_ends_with_the_caution(tiny_house, tmp_path):
    result = CliRunner().invoke(
        main,
        ["report", str(tiny_house), "--out", str(tmp_path), "--json"],
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.output, parse_constant=lambda c: 1 / 0)
    assert list(data)[-1] == "caution"
    assert data["schemes"] == ["direct_return", "reverse_return"]
    assert sorted(data["ranking"]) == sorted(data["schemes"])
    assert data["files"]["report"].endswith("tiny_report.html")


def test_unknown_scheme_is_bad_input(tiny_house, tmp_path):
    out = tmp_path / "out"
    result = CliRunner().invoke(
        main, ["report", str(tiny_house), "--out", str(out), "--schemes", "spiral"]
    )
    assert result.exit_code == 2
    assert "unknown scheme 'spiral'" in result.output
    assert not out.exists()
