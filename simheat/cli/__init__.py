"""The ``simheat`` command: parse, call the library, report. No physics here.

One module per subcommand. :data:`COMMANDS` registers them by name as
``"module:attribute"``; :class:`LazyGroup` imports a command's module only when
the command is run, its help is shown, or ``simheat --help`` lists it. Command
modules import only click and light modules at the top (see
:mod:`simheat.cli.common`), so listing every command stays fast; the library
(numba, scipy, h5py, matplotlib) is imported inside the command function.

To add a command, write ``simheat/cli/<name>.py`` with one
``@click.command("<name>", cls=SimheatCommand)`` and add a line to
:data:`COMMANDS`.
"""

from __future__ import annotations

import importlib

import click

from simheat import __version__

COMMANDS: dict[str, str] = {
    "run": "simheat.cli.run:run_command",
    "flows": "simheat.cli.flows:flows_command",
    "compare": "simheat.cli.compare:compare_command",
    "throttle": "simheat.cli.throttle:throttle_command",
    "plot": "simheat.cli.plot:plot_command",
    "layouts": "simheat.cli.layouts:layouts_command",
    "check": "simheat.cli.check:check_command",
    "balance": "simheat.cli.balance:balance_command",
    "sweep": "simheat.cli.sweep:sweep_command",
    "report": "simheat.cli.report:report_command",
    "readiness": "simheat.cli.readiness:readiness_command",
}
"""Every subcommand: name -> ``"module:attribute"`` of its click command."""


def load_command(target: str) -> click.Command:
    """Import the click command named by ``"module:attribute"``.

    Parameters
    ----------
    target : str
        Dotted module path and attribute, separated by a colon. [-]

    Returns
    -------
    click.Command
        The command object.
    """
    module_name, _, attribute = target.partition(":")
    return getattr(importlib.import_module(module_name), attribute)


class LazyGroup(click.Group):
    """A click group that imports each command's module on first use.

    Parameters
    ----------
    lazy_commands : dict of str to str
        Command name -> ``"module:attribute"``; commands added with
        :meth:`add_command` work as in any click group. [-]
    *args, **kwargs
        Passed to :class:`click.Group`. [-]
    """

    def __init__(self, *args, lazy_commands: dict[str, str], **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self.lazy_commands = dict(lazy_commands)

    def list_commands(self, ctx: click.Context) -> list[str]:
        """Every command name, sorted (as click lists them).

        Parameters
        ----------
        ctx : click.Context
            The group's context. [-]

        Returns
        -------
        list of str
            Lazily registered and eagerly added commands.
        """
        return sorted({*super().list_commands(ctx), *self.lazy_commands})

    def get_command(self, ctx: click.Context, cmd_name: str) -> click.Command | None:
        """The command of that name, importing its module when needed.

        Parameters
        ----------
        ctx : click.Context
            The group's context. [-]
        cmd_name : str
            Command name. [-]

        Returns
        -------
        click.Command or None
            The command, or None when no command has that name.
        """
        if cmd_name not in self.commands and cmd_name in self.lazy_commands:
            self.add_command(load_command(self.lazy_commands[cmd_name]), cmd_name)
        return super().get_command(ctx, cmd_name)


@click.group(
    cls=LazyGroup,
    lazy_commands=COMMANDS,
    context_settings={"help_option_names": ["-h", "--help"]},
)
@click.version_option(__version__, prog_name="simheat")
def main() -> None:
    """Warm-up and flow-split simulation of radiator heating layouts."""
