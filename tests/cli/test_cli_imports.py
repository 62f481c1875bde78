"""The CLI starts light: help never loads numba, scipy, h5py or matplotlib.

Checked by the modules a fresh interpreter has loaded, never by timing
(``benchmarks/cli_startup.py`` measures the times).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import click
import pytest
from click.testing import CliRunner

from simheat.cli import COMMANDS, LazyGroup, load_command, main

REPO = Path(__file__).resolve().parents[2]
HEAVY = ("numba", "scipy", "h5py", "matplotlib")


def heavy_modules_loaded(code: str) -> list[str]:
    """Which heavy packages a fresh interpreter has loaded after ``code``."""
    probe = (
        "import contextlib, io, sys\n"
        f"{code}\n"
        f"print(','.join(m for m in {HEAVY!r} if m in sys.modules))\n"
    )
    env = dict(os.environ, PYTHONPATH=str(REPO))
    out = subprocess.run(
        [sys.executable, "-c", probe],
        cwd=REPO,
        env=env,
        check=True,
        capture_output=True,
        text=True,
    ).stdout
    return [m for m in out.strip().split(",") if m]


def help_code(*args: str) -> str:
    return (
        "from simheat.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        f"    main([*{list(args)!r}, '--help'], prog_name='simheat',"
        " standalone_mode=False)"
    )


def test_probe_sees_a_heavy_import():
    # The check below must be able to fail: importing the layouts loads numba.
    assert "numba" in heavy_modules_loaded("import simheat.hydraulics.layouts")


def test_importing_the_cli_loads_no_heavy_package():
    assert heavy_modules_loaded("import simheat.cli") == []


def test_main_help_loads_no_heavy_package():
    assert heavy_modules_loaded(help_code()) == []


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_command_help_loads_no_heavy_package(name):
    assert heavy_modules_loaded(help_code(name)) == []


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_registry_entry_loads_the_command_of_that_name(name):
    command = load_command(COMMANDS[name])
    assert isinstance(command, click.Command)
    assert command.name == name


def test_main_help_lists_every_command_with_its_one_line_help():
    result = CliRunner().invoke(main, ["--help"])
    assert result.exit_code == 0
    listed = result.output.split("Commands:", 1)[1]
    for name, target in COMMANDS.items():
        short = load_command(target).get_short_help_str(limit=45)
        assert f"  {name} " in listed
        assert short.rstrip(".") in listed


def test_lazy_group_keeps_eagerly_added_commands():
    @click.command("extra")
    def extra() -> None:
        """An extra command."""
        click.echo("ran extra")

    group = LazyGroup("g", lazy_commands={"run": COMMANDS["run"]})
    group.add_command(extra)
    ctx = click.Context(group)
    assert group.list_commands(ctx) == ["extra", "run"]
    assert CliRunner().invoke(group, ["extra"]).output == "ran extra\n"


def test_unknown_command_is_a_usage_error():
    result = CliRunner().invoke(main, ["nope"])
    assert result.exit_code == 2
    assert "No such command 'nope'" in result.output
