"""The ``simheat`` command: parse, call the library, report. No physics here.

One module per subcommand; each registers itself below. Shared error handling and
options live in :mod:`simheat.cli.common`.
"""

from __future__ import annotations

import click

from simheat import __version__
from simheat.cli.compare import compare_command
from simheat.cli.flows import flows_command
from simheat.cli.layouts import layouts_command
from simheat.cli.plot import plot_command
from simheat.cli.run import run_command
from simheat.cli.sweep import sweep_command
from simheat.cli.throttle import throttle_command


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="simheat")
def main() -> None:
    """Warm-up and flow-split simulation of radiator heating layouts."""


main.add_command(run_command)
main.add_command(flows_command)
main.add_command(compare_command)
main.add_command(throttle_command)
main.add_command(plot_command)
main.add_command(layouts_command)
main.add_command(sweep_command)
