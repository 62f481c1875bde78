"""Pieces every ``simheat`` command shares: error handling, options, output checks.

Light on purpose: this module and every command module import only click and
light simheat modules at the top (:mod:`simheat.errors`, :mod:`simheat.schemes`),
so ``simheat --help`` never loads numba, scipy, h5py or matplotlib. Commands
import the library inside their function.
"""

from __future__ import annotations

import errno
import re
import warnings
from collections.abc import Iterable
from pathlib import Path

import click

from simheat.errors import ConvergenceError, RunFileError, ScenarioError, SimheatError
from simheat.schemes import SCHEME_NAMES

LIBRARY_EXISTS_SUFFIX = ": file exists"  # how runs.store starts its refusal message


def exists_message(path: Path | str) -> str:
    """The one-line message of an output that exists and is not replaced.

    Parameters
    ----------
    path : Path or str
        The existing file. [-]

    Returns
    -------
    str
        ``"<path> exists; pass --overwrite to replace it"``.
    """
    return f"{path} exists; pass --overwrite to replace it"


def refuse_to_overwrite(paths: Iterable[Path], overwrite: bool) -> None:
    """Stop before any work when an output file exists and ``--overwrite`` is off.

    Parameters
    ----------
    paths : iterable of Path
        Every file the command is about to write. [-]
    overwrite : bool
        The ``--overwrite`` flag. [-]

    Raises
    ------
    FileExistsError
        For the first path that exists (``filename`` set to it), unless
        ``overwrite``; :class:`SimheatCommand` prints it as one line, exit 2.
    """
    if overwrite:
        return
    for path in paths:
        if Path(path).exists():
            raise FileExistsError(errno.EEXIST, "file exists", str(path))


def _existing_path(exc: FileExistsError) -> str:
    """The path an existing-file refusal names, from the error or its message."""
    if exc.filename is not None:
        return str(exc.filename)
    text = str(exc)
    # The library's own refusals (runs.store) read "<path>: file exists; ...".
    if LIBRARY_EXISTS_SUFFIX in text:
        return text.split(LIBRARY_EXISTS_SUFFIX, 1)[0]
    return text


def show_warning_in_one_line(message, category, filename, lineno, file=None, line=None):
    """Print a warning the library issued as one line on stderr: ``warning: ...``.

    Parameters
    ----------
    message : Warning or str
        The warning. [-]
    category : type
        Its class. [-]
    filename : str
        Where it was issued (not shown). [-]
    lineno : int
        Line it was issued at (not shown). [-]
    file : file-like, optional
        Ignored: always stderr. [-]
    line : str, optional
        Ignored. [-]
    """
    click.echo("warning: " + " ".join(str(message).split()), err=True)


class SimheatCommand(click.Command):
    """Turn simheat's own errors into one line and the documented exit code."""

    def invoke(self, ctx: click.Context):
        """Run the command; map bad input to exit 2, failed computations to exit 1.

        Warnings the library issues (a heat pump run outside its rating table,
        water outside the property fits) print as one line each on stderr.

        Parameters
        ----------
        ctx : click.Context
            The command's context. [-]
        """
        with warnings.catch_warnings():
            warnings.showwarning = show_warning_in_one_line
            return self._invoke_mapping_errors(ctx)

    def _invoke_mapping_errors(self, ctx: click.Context):
        """Run the command, errors mapped to one line and their exit codes."""
        try:
            return super().invoke(ctx)
        except FileExistsError as exc:
            click.echo(f"error: {exists_message(_existing_path(exc))}", err=True)
            ctx.exit(2)
        except (ScenarioError, RunFileError) as exc:
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
    type=click.Choice(sorted(SCHEME_NAMES)),
    help="Piping scheme (default: the scenario's first scheme).",
)
json_option = click.option(
    "--json", "as_json", is_flag=True, help="Print one JSON object instead of tables."
)
overwrite_option = click.option(
    "--overwrite", is_flag=True, help="Replace existing output files."
)


def out_dir_option(help_text: str):
    """The ``--out DIR`` option (default ``simheat-out``) with a command's own help.

    Parameters
    ----------
    help_text : str
        The option's help in the command's ``--help``. [-]

    Returns
    -------
    callable
        The click option decorator.
    """
    return click.option(
        "--out",
        "out_dir",
        type=click.Path(file_okay=False, path_type=Path),
        default=Path("simheat-out"),
        show_default=True,
        help=help_text,
    )


_CLOCK_TIME = re.compile(r"^([01]?\d|2[0-3]):([0-5]\d)$")


def clock_time_s(
    ctx: click.Context | None, param: click.Parameter | None, value: str | None
) -> float | None:
    """A ``HH:MM`` option value as seconds after midnight (click callback).

    Parameters
    ----------
    ctx : click.Context or None
        The click context (unused). [-]
    param : click.Parameter or None
        The option (unused). [-]
    value : str or None
        The text given, None when the option is absent. [-]

    Returns
    -------
    float or None
        Seconds after midnight. [s]

    Raises
    ------
    click.BadParameter
        When the text is not a clock time (one line, exit 2).

    Examples
    --------
    >>> clock_time_s(None, None, "07:30")
    27000.0
    """
    if value is None:
        return None
    match = _CLOCK_TIME.match(value)
    if not match:
        raise click.BadParameter(f"must be a clock time HH:MM, got {value!r}")
    return 3600.0 * int(match.group(1)) + 60.0 * int(match.group(2))


def name_list(value: str | None) -> list[str] | None:
    """Comma-separated names as a list; None stays None.

    Parameters
    ----------
    value : str or None
        ``"a,b, c"``. [-]

    Returns
    -------
    list of str or None
        The names, stripped, empty ones dropped.

    Examples
    --------
    >>> name_list("living, bath,")
    ['living', 'bath']
    """
    if value is None:
        return None
    return [name.strip() for name in value.split(",") if name.strip()]


ready_by_option = click.option(
    "--ready-by",
    "ready_by_s",
    metavar="HH:MM",
    callback=clock_time_s,
    help="Also find each scheme's latest heating start that has every room at "
    "setpoint by this clock time, after the night (bisection, simulated).",
)
ready_rooms_option = click.option(
    "--ready-rooms",
    "ready_rooms_text",
    metavar="ROOM,ROOM,...",
    help="With --ready-by: only these rooms must be ready (default: every room).",
)
