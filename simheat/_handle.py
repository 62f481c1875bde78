"""A handle that carries a record of arrays from Python into compiled code.

Compiled kernels take their state as named tuples of arrays (records). Passed
from Python, numba types a named tuple field by field on every call: about
2 µs for the flow solver's record and over 20 µs for the warm-up model's nested
records, more than a whole flow solve of a small network. A :class:`Handle` is
a numba StructRef that holds one record; numba types and unboxes it as one
object (about 0.5 µs), and compiled code reads the record back
(``handle.record``) at no cost. The record's arrays are shared, not copied:
what compiled code writes into them, Python sees, and the other way round.

Python code that calls a kernel many times (the flow solver, the warm-up
right-hand side) makes a handle once and passes it to an entry kernel that
unwraps it. The constructor is compiled with ``cache=True``, so a later
process loads it instead of compiling it again.
"""

from __future__ import annotations

from numba.core import types
from numba.experimental import structref

from simheat._jit import njit

__all__ = ["Handle", "HandleType", "make_handle"]


@structref.register
class HandleType(types.StructRef):
    """numba type of a :class:`Handle`: a StructRef with one field, ``record``."""

    def preprocess_fields(self, fields):
        """Drop literal types (a record's scalars are plain values).

        Parameters
        ----------
        fields : sequence of (str, numba type)
            The StructRef's field names and numba types, as numba passes them. [-]
        """
        return tuple((name, types.unliteral(typ)) for name, typ in fields)


class Handle(structref.StructRefProxy):
    """One record of arrays, as compiled code receives it cheaply from Python.

    Parameters
    ----------
    record : NamedTuple
        A record of arrays and numbers (for example
        :class:`~simheat.hydraulics._kernels.FlowArrays`). Its arrays are
        shared with the handle; its fields carry their own units. [-]

    Examples
    --------
    >>> from simheat.hydraulics._kernels import SolveSettings
    >>> handle = Handle(SolveSettings(0.05, 1e-3, 1e-9, 1e-6, 50))
    >>> handle.record.max_iter
    50
    """

    def __new__(cls, record):
        return make_handle(record)

    @property
    def record(self):
        """The record the handle holds (its arrays shared, not copied)."""
        return _record_of(self)


structref.define_proxy(Handle, HandleType, ["record"])


@njit(cache=True)
def make_handle(record):
    """A :class:`Handle` holding ``record`` (compiled once per record type).

    Parameters
    ----------
    record : NamedTuple
        The record of arrays and numbers to hold, shared, not copied; its fields
        carry their own units. [-]
    """
    return Handle(record)


@njit(cache=True)
def _record_of(handle):
    return handle.record
