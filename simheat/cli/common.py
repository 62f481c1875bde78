"""Pieces every ``simheat`` command shares: error handling, options, output checks.

Light on purpose: this module and every command module import only click and
light simheat modules at the top (:mod:`simheat.errors`, :mod:`simheat.schemes`),
so ``simheat --help`` never loads numba, scipy, h5py or matplotlib. Commands
import the library inside their function.
"""

from __future__ import annotations

import errno
import math
import re
import warnings
from collections.abc import Iterable
from pathlib import Path

import click

from simheat.errors import (
    ConvergenceError,
    OutputError,
    RunFileError,
    ScenarioError,
    SimheatError,
)
from simheat.schemes import SCHEME_NAMES

LIBRARY_EXISTS_SUFFIX = ": file exists"  # how runs.store starts its refusal message
# Longest error line the command line prints (keys and values are cut before). [-]
MESSAGE_LIMIT = 400


def exists_message(path: Path | str, alternative: str | None = None) -> str:
    """The one-line message of an output that exists and is not replaced.

    Parameters
    ----------
    path : Path or str
        The existing file. [-]
    alternative : str, optional
        Another way out the command offers (``"--resume to ..."``). [-]

    Returns
    -------
    str
        ``"<path> exists; pass --overwrite to replace it"``, followed by
        ``", or <alternative>"`` when given.
    """
    message = f"{path} exists; pass --overwrite to replace it"
    return f"{message}, or {alternative}" if alternative else message


class OutputExistsError(FileExistsError):
    """An output that exists, with the command's other way out (if any).

    Parameters
    ----------
    path : str
        The existing file. [-]
    alternative : str or None
        What else the user can pass, for :func:`exists_message`. [-]
    """

    def __init__(self, path: str, alternative: str | None = None) -> None:
        super().__init__(errno.EEXIST, "file exists", path)
        self.alternative = alternative


def refuse_to_overwrite(
    paths: Iterable[Path], overwrite: bool, alternative: str | None = None
) -> None:
    """Stop before any work when an output file exists and ``--overwrite`` is off.

    Parameters
    ----------
    paths : iterable of Path
        Every file the command is about to write. [-]
    overwrite : bool
        The ``--overwrite`` flag. [-]
    alternative : str, optional
        Another option that avoids the refusal, named in the message
        (``run``: ``"--resume to keep ..."``). [-]

    Raises
    ------
    FileExistsError
        For the first path that exists (``filename`` set to it), unless
        ``overwrite``; :class:`SimheatCommand` prints it as one line, exit 2.
    OutputError
        For a path that is a folder (even with ``overwrite``: a file is never
        renamed onto a folder).
    """
    for path in paths:
        if Path(path).is_dir():
            raise OutputError(f"{path}: is a folder; give a file name")
        if not overwrite and Path(path).exists():
            raise OutputExistsError(str(path), alternative)


def _existing_path(exc: FileExistsError) -> str:
    """The path an existing-file refusal names, from the error or its message."""
    if exc.filename is not None:
        return str(exc.filename)
    text = str(exc)
    # The library's own refusals (runs.store) read "<path>: file exists; ...".
    if LIBRARY_EXISTS_SUFFIX in text:
        return text.split(LIBRARY_EXISTS_SUFFIX, 1)[0]
    return text


def one_line(message: object, limit: int = MESSAGE_LIMIT) -> str:
    r"""A message as the command line prints it: one line, at most ``limit`` long.

    Parameters
    ----------
    message : object
        The error or text. [-]
    limit : int
        Longest line printed. [characters]

    Returns
    -------
    str
        Whitespace runs (newlines included) joined by one space, cut with
        ``...`` when longer than ``limit``.

    Examples
    --------
    >>> one_line("a\nb  c")
    'a b c'
    """
    text = " ".join(str(message)[: 4 * limit].split())
    return text if len(text) <= limit else text[: limit - 3] + "..."


class OneLineUsageError(click.UsageError):
    """A command-line usage error shown as one line, exit 2, like every other error.

    Parameters
    ----------
    message : str
        What is wrong (click's own wording, naming the option). [-]
    ctx : click.Context or None
        The command's context, for the help hint. [-]
    """

    def show(self, file=None) -> None:
        """Print ``error: <message> (see '<command> --help')`` on one line.

        Parameters
        ----------
        file : file object, optional
            Where to print; standard error by default. [-]
        """
        hint = f" (see '{self.ctx.command_path} --help')" if self.ctx else ""
        click.echo(f"error: {one_line(self.format_message())}{hint}", err=True)


def _one_line_usage(exc: click.UsageError) -> OneLineUsageError:
    if isinstance(exc, OneLineUsageError):
        return exc
    ctx = exc.ctx or click.get_current_context(silent=True)
    return OneLineUsageError(exc.format_message(), ctx)


class FiniteRange(click.FloatRange):
    """A number option within bounds that is never NaN or infinite.

    :class:`click.FloatRange` lets NaN through (every comparison with it is
    false) and an infinity through an open end. The refusal is a one-line usage
    error naming the option (exit 2).

    Parameters
    ----------
    min, max : float, optional
        Inclusive bounds; None for an open end. [unit of the option]
    """

    name = "finite float range"

    def convert(self, value, param, ctx):
        """Convert and check ``value``.

        Parameters
        ----------
        value : str or float
            The command-line text (or a default). [unit of the option]
        param : click.Parameter or None
            The option. [-]
        ctx : click.Context or None
            The command's context. [-]
        """
        number = super().convert(value, param, ctx)
        if not math.isfinite(number):
            self.fail(f"{value!r} is not a finite number.", param, ctx)
        return number


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
    click.echo(f"warning: {one_line(message)}", err=True)


class SimheatCommand(click.Command):
    """Turn every error into one line and the documented exit code.

    Exit 2: bad input (a scenario or run file, an option missing or of the
    wrong kind, an existing output without ``--overwrite``, an output folder
    that cannot be written). Exit 1: a computation that failed, memory
    exhausted, or an internal error (a bug: the line names the Python error;
    no traceback is shown).
    """

    def make_context(self, info_name, args, parent=None, **extra):
        """Parse the command line; a usage error is one line (exit 2).

        Parameters
        ----------
        info_name : str or None
            The command's name as invoked. [-]
        args : list of str
            The arguments to parse. [-]
        parent : click.Context, optional
            The group's context. [-]
        **extra
            Passed to :class:`click.Context`. [-]
        """
        try:
            return super().make_context(info_name, args, parent=parent, **extra)
        except click.UsageError as exc:
            raise _one_line_usage(exc) from None

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
        except click.UsageError as exc:
            raise _one_line_usage(exc) from None
        except FileExistsError as exc:
            alternative = getattr(exc, "alternative", None)
            self._fail(ctx, exists_message(_existing_path(exc), alternative), 2)
        except (ScenarioError, RunFileError, OutputError) as exc:
            self._fail(ctx, exc, 2)
        except ConvergenceError as exc:
            self._fail(ctx, exc, 1, "computation failed")
        except SimheatError as exc:
            self._fail(ctx, exc, 1)
        except OSError as exc:
            where = f"{exc.filename}: " if exc.filename else ""
            self._fail(ctx, f"{where}{exc.strerror or exc}", 2)
        except MemoryError:
            self._fail(ctx, "out of memory; see the README on problem size", 1)
        except RecursionError:
            self._fail(ctx, "input nested too deeply to process", 1)
        except (click.exceptions.ClickException, click.exceptions.Exit, click.Abort):
            raise
        except Exception as exc:  # a bug: one line, never a traceback
            self._fail(ctx, f"{type(exc).__name__}: {exc}", 1, "internal error")

    @staticmethod
    def _fail(ctx: click.Context, message: object, code: int, kind: str = "error"):
        click.echo(f"{kind}: {one_line(message)}", err=True)
        ctx.exit(code)


# No existence or kind checks here: the loader says in one line what is wrong
# with the path (missing, a folder, unreadable).
scenario_argument = click.argument("scenario", type=click.Path(path_type=Path))
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


schemes_option = click.option(
    "--schemes",
    "schemes_text",
    metavar="A,B,...",
    help="Comma-separated piping schemes (default: the scenario's list).",
)


def scheme_list(value: str | None) -> list[str] | None:
    """The scheme names of a ``--schemes`` value; None when it was not given.

    Parameters
    ----------
    value : str or None
        The option's text, names separated by commas. [-]
    """
    if value is None:
        return None
    return [name.strip() for name in value.split(",") if name.strip()]


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
        type=click.Path(path_type=Path),
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


def check_ready(scenario, ready_by_s: float | None, rooms: list[str] | None) -> None:
    """Check ``--ready-by`` and ``--ready-rooms`` against the scenario, before any run.

    Parameters
    ----------
    scenario : Scenario
        The loaded scenario. [-]
    ready_by_s : float or None
        The ``--ready-by`` clock time, seconds after midnight. [s]
    rooms : list of str or None
        The ``--ready-rooms`` ids. [-]

    Raises
    ------
    click.BadParameter
        Naming the option (the library's messages name its arguments).
    """
    if ready_by_s is None:
        return
    from simheat.analysis.start_time import ready_by_time_s, room_indices

    for check, option, argument in (
        (lambda: ready_by_time_s(scenario, ready_by_s), "--ready-by", "ready_by: "),
        (lambda: room_indices(scenario, rooms), "--ready-rooms", "rooms: "),
    ):
        try:
            check()
        except ScenarioError as exc:
            message = str(exc).removeprefix(argument)
            raise click.BadParameter(message, param_hint=f"'{option}'") from None


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
