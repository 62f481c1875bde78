"""scipy's BDF integrator with a compiled sparse LU on the Jacobian's fixed pattern.

``solve_ivp(method="BDF")`` factorizes ``I - c J`` with SuperLU each time the step
size or the Jacobian changes and solves with it at every Newton iteration. For
the warm-up model the pattern never changes, so :class:`FixedPatternBDF` does
the ordering and symbolic factorization once (:class:`FixedPatternLU`) and each
factorization and solve in compiled code (:mod:`simheat.dynamics._lu_kernels`).
The step control, order selection, Newton iteration and dense output are scipy's
own: the class only swaps the linear algebra, so a run takes the same steps as
with ``method="BDF"`` up to round-off in the linear solves.

Pivots are taken on the diagonal after a symmetric fill-reducing ordering. That
is safe for ``I - c J`` of a heat-transfer model, whose diagonal dominates; a
pivot below :data:`PIVOT_RTOL` of its row falls back to SuperLU with partial
pivoting for that factorization (counted in ``n_pivot_fallbacks``).
"""

from __future__ import annotations

import numpy as np
from scipy.integrate import BDF
from scipy.sparse import csc_matrix, csr_matrix, eye, issparse
from scipy.sparse.csgraph import reverse_cuthill_mckee
from scipy.sparse.linalg import splu

from simheat.dynamics import _lu_kernels

# A diagonal pivot is safe when larger than this fraction of its row's largest
# entry; below it the factorization is redone by SuperLU with partial pivoting. [-]
PIVOT_RTOL = 1e-10


class FixedPatternLU:
    """Ordering and symbolic LU factors of ``I - c J`` for one Jacobian pattern.

    Parameters
    ----------
    jacobian_pattern : scipy.sparse matrix
        Pattern of ``J`` (entries that may be nonzero), shape (n, n). The
        integrator's Jacobians must come in CSC form with exactly this pattern
        (sorted indices), as :meth:`WarmUpModel.jacobian` returns them. [-]
    last_columns : sequence of int
        States ordered last: those every other equation depends on (the
        thermostatic sensors, whose openings move every flow). Placed last they
        cause no fill outside the trailing block. [-]

    Notes
    -----
    The remaining states are ordered by reverse Cuthill-McKee [1]_ on the
    symmetrized pattern, which keeps the water cells of one pipe and their room
    close together.

    References
    ----------
    .. [1] E. Cuthill, J. McKee, "Reducing the bandwidth of sparse symmetric
       matrices", Proc. 24th ACM National Conference, 1969.
    """

    def __init__(self, jacobian_pattern, last_columns=()) -> None:
        pattern = csc_matrix(jacobian_pattern, dtype=np.float64, copy=True)
        pattern.sum_duplicates()
        pattern.sort_indices()
        n = pattern.shape[0]
        if pattern.shape != (n, n):
            raise ValueError(f"Jacobian pattern must be square, got {pattern.shape}")
        self.n = n
        self.jacobian_indptr = pattern.indptr.astype(np.int64)
        self.jacobian_indices = pattern.indices.astype(np.int64)

        last = np.unique(np.asarray(last_columns, dtype=np.int64))
        rest = np.setdiff1d(np.arange(n, dtype=np.int64), last)
        pattern.data[:] = 1.0
        shifted = (pattern + eye(n, format="csc")).tocsr()
        symmetric = (shifted + shifted.T).tocsr()
        within = symmetric[rest][:, rest]
        order_rest = rest[reverse_cuthill_mckee(within, symmetric_mode=True)]
        self.order = np.concatenate([order_rest, last]).astype(np.int64)
        position = np.empty(n, dtype=np.int64)
        position[self.order] = np.arange(n, dtype=np.int64)

        permuted = csr_matrix(shifted[self.order][:, self.order])
        permuted.sort_indices()
        (
            self.indptr,
            self.indices,
            self.diag,
        ) = _lu_kernels.symbolic_factor_pattern(
            permuted.indptr.astype(np.int64), permuted.indices.astype(np.int64), n
        )

        # Where each stored entry of J lands in the factor pattern.
        columns = np.repeat(np.arange(n, dtype=np.int64), np.diff(self.jacobian_indptr))
        keys = position[self.jacobian_indices] * n + position[columns]
        factor_rows = np.repeat(np.arange(n, dtype=np.int64), np.diff(self.indptr))
        factor_keys = factor_rows * n + self.indices
        self.jacobian_position = np.searchsorted(factor_keys, keys).astype(np.int64)
        if not np.array_equal(factor_keys[self.jacobian_position], keys):
            raise AssertionError("factor pattern misses an entry of the Jacobian")

    @property
    def factor_nnz(self) -> int:
        """Stored entries of L and U together. [-]."""
        return int(self.indices.shape[0])

    def matches(self, matrix) -> bool:
        """Whether a CSC matrix is stored on exactly this Jacobian pattern.

        Parameters
        ----------
        matrix : scipy.sparse matrix
            The matrix to test (any sparse format; only CSC can match). [-]
        """
        return (
            matrix.format == "csc"
            and matrix.indices.shape == self.jacobian_indices.shape
            and np.array_equal(matrix.indptr, self.jacobian_indptr)
            and np.array_equal(matrix.indices, self.jacobian_indices)
        )


class _Shifted:
    """``I - c J`` as the values of its factor pattern (not yet factorized)."""

    __slots__ = ("scaled_jacobian", "values")

    def __init__(self, scaled_jacobian, values: np.ndarray) -> None:
        self.scaled_jacobian = scaled_jacobian
        self.values = values


class _Identity:
    """Stands for ``I`` in scipy's ``self.I - c * J``: builds :class:`_Shifted`."""

    def __init__(self, structure: FixedPatternLU) -> None:
        self._structure = structure
        self._sparse = eye(structure.n, format="csc")

    def __sub__(self, scaled_jacobian):
        s = self._structure
        if not (issparse(scaled_jacobian) and s.matches(scaled_jacobian)):
            return self._sparse - scaled_jacobian  # another pattern: plain SuperLU
        values = np.empty(s.factor_nnz)
        _lu_kernels.assemble_identity_minus(
            scaled_jacobian.data, s.jacobian_position, s.diag, values
        )
        return _Shifted(scaled_jacobian, values)


class FixedPatternBDF(BDF):
    """scipy's BDF with compiled LU factorizations on a fixed Jacobian pattern.

    Use through ``solve_ivp(..., method=FixedPatternBDF, lu_structure=structure,
    jac=jacobian)`` where ``jacobian`` returns CSC matrices on the pattern
    ``structure`` was built from. Every other option is scipy's BDF's.

    Parameters
    ----------
    fun : callable
        ``fun(t, y)``: the time derivative of the state, as for scipy's BDF. [-]
    t0 : float
        Initial time. [s]
    y0 : ndarray
        Initial state. [state units]
    t_bound : float
        Time the integration may not pass. [s]
    lu_structure : FixedPatternLU
        Ordering and symbolic factors of the Jacobian's pattern. [-]
    **options
        scipy BDF's other options (``rtol``, ``atol``, ``jac``, ...), passed
        on unchanged. [-]

    Attributes
    ----------
    n_pivot_fallbacks : int
        Factorizations redone by SuperLU because a diagonal pivot was unsafe. [-]
    """

    def __init__(self, fun, t0, y0, t_bound, *, lu_structure, **options) -> None:
        self._structure = lu_structure
        self._work = np.empty(lu_structure.n)
        self._solve_work = np.empty(lu_structure.n)
        self.n_pivot_fallbacks = 0
        super().__init__(fun, t0, y0, t_bound, **options)
        self.I = _Identity(lu_structure)
        self.lu = self._factorize
        self.solve_lu = self._solve

    def _factorize(self, shifted):
        self.nlu += 1
        if not isinstance(shifted, _Shifted):
            return splu(csc_matrix(shifted))
        s = self._structure
        failed = _lu_kernels.factor_in_place(
            s.indptr, s.indices, s.diag, shifted.values, self._work, PIVOT_RTOL
        )
        if failed >= 0:
            self.n_pivot_fallbacks += 1
            return splu(csc_matrix(eye(s.n, format="csc") - shifted.scaled_jacobian))
        return shifted.values

    def _solve(self, factors, rhs):
        if not isinstance(factors, np.ndarray):
            return factors.solve(rhs)
        s = self._structure
        out = np.empty(s.n)
        _lu_kernels.solve_factored(
            s.indptr,
            s.indices,
            s.diag,
            factors,
            s.order,
            np.ascontiguousarray(rhs, dtype=np.float64),
            out,
            self._solve_work,
        )
        return out
