"""The warm-up model's finite-difference Jacobian and the integrator options on it.

:class:`DifferenceJacobian` is the part of
:class:`~simheat.dynamics.integrate.WarmUpModel` that serves the implicit
integrators: the sparsity pattern
(:func:`~simheat.dynamics.jacobian.jacobian_sparsity`), the columns differenced in
compiled code one group at a time
(:func:`simheat.dynamics._kernels.warmup_jacobian_entry`), the checked fallback
when a flow solve fails inside it, and the ``solve_ivp`` options that use it. It
works on the model's records and compiled right-hand side, which the model class
provides.
"""

from __future__ import annotations

import numpy as np
from scipy.sparse import csc_matrix

from simheat._handle import Handle
from simheat.dynamics import _kernels
from simheat.dynamics.jacobian import (
    difference_steps,
    jacobian_arrays,
    jacobian_sparsity,
)
from simheat.dynamics.segments import Segment, controls_at
from simheat.dynamics.stiff import FixedPatternBDF, FixedPatternLU

__all__ = ["DifferenceJacobian"]


class DifferenceJacobian:
    """Finite-difference Jacobian of a warm-up model's right-hand side (a mixin).

    The class it is mixed into provides ``model``, ``network``, ``scenario``,
    ``slices``, ``source_link``, ``n_flow_solves``, the compiled right-hand side
    ``_compiled(t, y, seg, dy)`` and its records' handle ``_handle``; it sets
    ``_jac = None`` until :meth:`prepare_jacobian` runs.
    """

    def jacobian_sparsity(self):
        """Which derivative depends on which state (:func:`jacobian_sparsity`)."""
        return jacobian_sparsity(self.model, self.network, self.source_link)

    def prepare_jacobian(self, atol: np.ndarray) -> None:
        """Set up :meth:`jacobian`: pattern, column groups and difference steps.

        Parameters
        ----------
        atol : ndarray
            Absolute tolerances of the states: the floor of the difference step's
            scale, as in scipy's own finite differences. [K or J]
        """
        atol = np.asarray(atol, dtype=np.float64)
        if self._jac is not None and np.array_equal(atol, self._jac_atol):
            return  # prepared already (a model run again)
        pattern = self.jacobian_sparsity().tocsc()
        pattern.sort_indices()
        self._jac_pattern = pattern
        self._jac = jacobian_arrays(pattern)
        self._jac_handle = Handle(self._jac)
        self._jac_atol = atol
        self._jac_f0 = np.empty(self.model.n_states)

    def solver_options(self, method: str) -> dict:
        """``solve_ivp`` options for an integrator name.

        One of :data:`simheat.dynamics.integrate.INTEGRATORS`.

        BDF runs as :class:`simheat.dynamics.stiff.FixedPatternBDF` (scipy's BDF,
        compiled LU on the Jacobian's pattern, sensors ordered last); Radau gets
        the compiled Jacobian; LSODA uses its own finite differences.
        Call :meth:`prepare_jacobian` first for BDF and Radau.

        Parameters
        ----------
        method : str
            ``"BDF"``, ``"Radau"`` or ``"LSODA"``. [-]
        """
        if method == "LSODA":
            return {"method": method}
        if method != "BDF":
            return {"method": method, "jac": self.jacobian}
        structure = FixedPatternLU(
            self._jac_pattern,
            last_columns=np.arange(
                self.slices["sensors"].start, self.slices["sensors"].stop
            ),
        )
        return {
            "method": FixedPatternBDF,
            "jac": self.jacobian,
            "lu_structure": structure,
        }

    def jacobian(self, t: float, y: np.ndarray, seg: Segment):
        """Finite-difference Jacobian of :meth:`rhs` on the sparse pattern (CSC).

        The differences are taken in compiled code, one right-hand side per column
        group (:func:`_kernels.warmup_jacobian`), with scipy's step rule
        (:func:`~simheat.dynamics.jacobian.difference_steps`). Call
        :meth:`prepare_jacobian` first. Rows of the energy counters are left
        out, as in the pattern.

        Parameters
        ----------
        t : float
            Time from the start of the run. [s]
        y : ndarray, shape (n_states,)
            State: cell, air, structure and sensor temperatures [°C], energy
            counters [J].
        seg : Segment
            The schedule segment ``t`` lies in. [-]

        Returns
        -------
        scipy.sparse.csc_matrix, shape (n_states, n_states)
            ``d(dy/dt)/dy`` on the pattern of :meth:`jacobian_sparsity`. [1/s]
        """
        y = np.ascontiguousarray(y, dtype=np.float64)
        f0 = self._jac_f0
        self._compiled(t, y, seg, f0)
        step = difference_steps(y, f0, self._jac_atol)
        jac = self._jac
        status = _kernels.warmup_jacobian_entry(
            y,
            f0,
            step,
            self._jac_handle,
            self._handle,
            controls_at(self.scenario, seg, t, seg.circulating),
        )
        n_groups = len(jac.group_start) - 1
        if seg.circulating:
            self.n_flow_solves += n_groups
        if status != 0:
            self._difference_columns_checked(t, y, seg, f0, step)
        n = self.model.n_states
        return csc_matrix(
            (jac.data.copy(), jac.indices.copy(), jac.indptr.copy()), shape=(n, n)
        )

    def _difference_columns_checked(self, t, y, seg, f0, step) -> None:
        """Redo the Jacobian's columns through the checked path after a failure.

        A warm-started flow solve failed inside the compiled Jacobian: each
        group's right-hand side goes through :meth:`_compiled`, which restarts
        cold and raises if that fails too.
        """
        self._warm = False
        jac = self._jac
        start, columns = jac.group_start, jac.group_columns
        perturbed = y.copy()
        dy = np.empty_like(y)
        for g in range(len(start) - 1):
            cols = columns[start[g] : start[g + 1]]
            perturbed[cols] += step[cols]
            self._compiled(t, perturbed, seg, dy)
            perturbed[cols] = y[cols]
            for j in cols:
                rows = slice(jac.indptr[j], jac.indptr[j + 1])
                entries = jac.indices[rows]
                jac.data[rows] = (dy[entries] - f0[entries]) / step[j]
