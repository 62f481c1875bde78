"""Error families of simheat.

The CLI maps :class:`ScenarioError` (and :class:`RunFileError`,
:class:`OutputError`) to exit code 2 and :class:`ConvergenceError` to exit code 1,
always as one line without a traceback.
"""

from __future__ import annotations


class SimheatError(Exception):
    """Base class of every error simheat raises on purpose."""


class ScenarioError(SimheatError, ValueError):
    """Bad user input: the message names the field, the value and the expectation."""


class RunFileError(SimheatError, ValueError):
    """A run file that is not one of ours, is damaged, or is from a newer schema."""


class OutputError(SimheatError, OSError):
    """An output file or folder that cannot be written (the CLI's exit 2).

    A folder below a regular file, a folder without write permission, a full
    disk: the message names the path and the reason, on one line.
    """


class ConvergenceError(SimheatError, RuntimeError):
    """A computation that did not converge; carries where and by how much.

    Parameters
    ----------
    message : str
        One-line description. [-]
    iterations : int
        Iterations spent. [-]
    residual : float
        Largest remaining residual. [the unit named by ``residual_unit``]
    residual_unit : str
        Unit of ``residual`` (for example ``"kg/s"`` or ``"Pa"``). [-]
    worst_part : str
        Name of the node or link where the residual is largest. [-]
    """

    def __init__(
        self,
        message: str,
        *,
        iterations: int = 0,
        residual: float = float("nan"),
        residual_unit: str = "",
        worst_part: str = "",
    ) -> None:
        super().__init__(message)
        self.iterations = iterations
        self.residual = residual
        self.residual_unit = residual_unit
        self.worst_part = worst_part


class ModelRangeError(SimheatError, RuntimeError):
    """A run that left the range the model holds (water boiling, rooms at 80 °C).

    The CLI reports it as one line, exit 1: the message names the part, its
    temperature and when (see :mod:`simheat.dynamics.ranges`).
    """


class BalanceError(SimheatError, RuntimeError):
    """A balance that cannot be met; the CLI reports it as one line, exit 1.

    A pump short of its index circuit's need, design flows that contradict the
    network, or a verification that fails.
    """


class SimheatWarning(UserWarning):
    """Something simheat computed with a caveat; the CLI prints it as one line."""


class RatingTableWarning(SimheatWarning):
    """A heat pump asked for outside its rating table: the table's edge is used."""
