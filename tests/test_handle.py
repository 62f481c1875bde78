"""Tests of the record handle (simheat/_handle.py).

Records here are simheat's own: ``make_handle`` is cached, and a record class
defined in a test module would enter its cache index, which another process
could then not read (it cannot import the test module).
"""

from __future__ import annotations

import numpy as np

from simheat._handle import Handle
from simheat._jit import njit
from simheat.hydraulics._kernels import ColebrookMemory


@njit
def _double_x(handle):
    record = handle.record
    for k in range(record.x.shape[0]):
        record.x[k] *= 2.0
    return record.x.sum() + record.reynolds.sum()


def test_compiled_code_reads_the_record_and_writes_into_its_arrays():
    x = np.array([1.0, 2.0, 3.0])
    handle = Handle(ColebrookMemory(x, np.ones(3), np.zeros(3)))
    assert _double_x(handle) == 15.0
    # the handle shares the record's arrays: the caller sees the writes
    np.testing.assert_array_equal(x, [2.0, 4.0, 6.0])


def test_the_record_comes_back_to_python_with_its_arrays_shared():
    x = np.arange(4.0)
    record = Handle(ColebrookMemory(x, np.ones(4), np.zeros(4))).record
    assert isinstance(record, ColebrookMemory)
    record.x[0] = 9.0
    assert x[0] == 9.0
