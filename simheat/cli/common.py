"""Pieces every ``simheat`` command shares: error handling and common options."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.errors import ConvergenceError, RunFileError, ScenarioError, SimheatError
from simheat.hydraulics.layouts import SCHEMES


class SimheatCommand(click.Command):
    """Turn simheat's own errors into one line and the documented exit code."""

    def invoke(self, ctx: click.Context):
        """Run the command; map ScenarioError to exit 2, failures to exit 1."""
        try:
            return super().invoke(ctx)
        except (ScenarioError, RunFileError, FileExistsError) as exc:
            click.echo(f"error: {exc}", err=True)
            ctx.exit(2)
        except ConvergenceError as exc:
            click.echo(f"computation failed: {exc}", err=True)
            ctx.exit(1)
        except SimheatError as exc:
            click.echo(f"error: {exc}", err=True)
            ctx.exit(1)


scenario_argument = click.argument(
    "scenario", type=click.Path(dir_okay=False, path_type=Path)
)
scheme_option = click.option(
    "--scheme",
    type=click.Choice(sorted(SCHEMES)),
    help="Piping scheme (default: the scenario's first scheme).",
)
json_option = click.option(
    "--json", "as_json", is_flag=True, help="Print one JSON object instead of tables."
)
overwrite_option = click.option(
    "--overwrite", is_flag=True, help="Replace existing output files."
)


def out_dir_option(help_text: str):
    """The ``--out DIR`` option (default ``simheat-out``) with a command's own help."""
    return click.option(
        "--out",
        "out_dir",
        type=click.Path(file_okay=False, path_type=Path),
        default=Path("simheat-out"),
        show_default=True,
        help=help_text,
    )
