"""Compiled sparse LU on a fixed pattern (numba, cached on disk).

The implicit integrator factorizes ``I - c J`` tens of times per run, always on
the same pattern (the warm-up Jacobian's). These kernels split the work the way
a refactorizing sparse solver does: a symbolic factorization once per pattern
(:func:`symbolic_factor_pattern`), then per matrix only the numeric elimination
(:func:`factor_in_place`) and the triangular solves (:func:`solve_factored`).
Rows and columns are permuted symmetrically beforehand and pivots are taken on
the diagonal; :func:`factor_in_place` reports a pivot that is not safely nonzero
so that the caller can fall back to a pivoting solver.

All matrices are CSR with sorted column indices; ``diag[i]`` is the position of
row ``i``'s diagonal entry in it. The factors share one array: the strictly lower
part holds L (unit diagonal implied), the rest holds U.
"""

from __future__ import annotations

import math

import numpy as np

from simheat._jit import njit


@njit(cache=True)
def symbolic_factor_pattern(indptr, indices, n):
    """Pattern of the LU factors of a CSR pattern with diagonal pivots.

    Row by row: row ``i`` of the factors holds its own pattern plus the upper
    part of every factor row ``k < i`` it meets on the way (in increasing ``k``,
    so fill found on the way is eliminated too). Cost O(n^2 + fill) with a dense
    marker, negligible once per pattern for the sizes here.

    Parameters
    ----------
    indptr, indices : ndarray of int64
        CSR pattern of the (permuted) matrix; every diagonal entry present. [-]
    n : int
        Order of the matrix. [-]

    Returns
    -------
    (ndarray, ndarray, ndarray) of int64
        ``factor_indptr``, ``factor_indices`` (sorted per row) and ``diag``.
    """
    mark = np.full(n, -1, dtype=np.int64)
    capacity = max(2 * indices.shape[0], 16)
    out = np.empty(capacity, dtype=np.int64)
    factor_indptr = np.zeros(n + 1, dtype=np.int64)
    diag = np.empty(n, dtype=np.int64)
    size = 0
    for i in range(n):
        lowest = i
        for p in range(indptr[i], indptr[i + 1]):
            j = indices[p]
            mark[j] = i
            if j < lowest:
                lowest = j
        for k in range(lowest, i):
            if mark[k] != i:
                continue
            for q in range(diag[k] + 1, factor_indptr[k + 1]):
                mark[out[q]] = i
        count = 0
        for j in range(n):
            if mark[j] == i:
                count += 1
        if size + count > capacity:
            capacity = max(2 * capacity, size + count)
            grown = np.empty(capacity, dtype=np.int64)
            grown[:size] = out[:size]
            out = grown
        for j in range(n):
            if mark[j] == i:
                if j == i:
                    diag[i] = size
                out[size] = j
                size += 1
        factor_indptr[i + 1] = size
    return factor_indptr, out[:size].copy(), diag


@njit(cache=True)
def assemble_identity_minus(scaled_data, position, diag, values):
    """Values of ``I - c J`` on the factor pattern (fill entries zero).

    Parameters
    ----------
    scaled_data : ndarray
        Stored values of ``c J`` in the Jacobian's own order. [-]
    position : ndarray of int64
        Position of each of them in the factor pattern. [-]
    diag : ndarray of int64
        Diagonal positions in the factor pattern. [-]
    values : ndarray
        Output, one per factor pattern entry. [-]
    """
    values[:] = 0.0
    for p in range(scaled_data.shape[0]):
        values[position[p]] -= scaled_data[p]
    for i in range(diag.shape[0]):
        values[diag[i]] += 1.0


@njit(cache=True)
def factor_in_place(indptr, indices, diag, values, work, pivot_rtol):
    """Numeric LU factorization on a symbolic pattern, diagonal pivots, in place.

    Row-oriented Gaussian elimination (the IKJ form): row ``i`` is scattered into
    a dense work vector, reduced by the factor rows ``k < i`` in its lower part,
    and gathered back, so ``values`` ends holding L (strictly lower, unit diagonal
    implied) and U.

    Parameters
    ----------
    indptr, indices, diag : ndarray of int64
        Factor pattern from :func:`symbolic_factor_pattern`. [-]
    values : ndarray
        The matrix on the factor pattern on entry; the factors on exit. [-]
    work : ndarray
        Dense workspace of length n. [-]
    pivot_rtol : float
        A pivot counts as safe when its magnitude exceeds ``pivot_rtol`` times the
        largest magnitude in its row of the matrix. [-]

    Returns
    -------
    int
        -1 on success, else the (permuted) row whose pivot was not safe. [-]
    """
    n = indptr.shape[0] - 1
    for i in range(n):
        row_scale = 0.0
        for p in range(indptr[i], indptr[i + 1]):
            v = values[p]
            work[indices[p]] = v
            if abs(v) > row_scale:
                row_scale = abs(v)
        for p in range(indptr[i], diag[i]):
            k = indices[p]
            multiplier = work[k] / values[diag[k]]
            work[k] = multiplier
            if multiplier != 0.0:
                for q in range(diag[k] + 1, indptr[k + 1]):
                    work[indices[q]] -= multiplier * values[q]
        for p in range(indptr[i], indptr[i + 1]):
            values[p] = work[indices[p]]
        pivot = values[diag[i]]
        if not (math.isfinite(pivot) and abs(pivot) > pivot_rtol * row_scale):
            return i
    return -1


@njit(cache=True)
def solve_factored(indptr, indices, diag, values, order, rhs, out, work):
    """Solve ``A x = b`` with the factors of ``P A P^T`` from :func:`factor_in_place`.

    Parameters
    ----------
    indptr, indices, diag, values : ndarray
        Factor pattern and factors. [-]
    order : ndarray of int64
        The permutation: row ``i`` of the factored matrix is row ``order[i]`` of
        ``A``. [-]
    rhs : ndarray
        Right-hand side ``b``. [-]
    out : ndarray
        Solution ``x`` (may not alias ``rhs``). [-]
    work : ndarray
        Workspace of length n. [-]
    """
    n = order.shape[0]
    for i in range(n):
        work[i] = rhs[order[i]]
    for i in range(n):
        s = work[i]
        for p in range(indptr[i], diag[i]):
            s -= values[p] * work[indices[p]]
        work[i] = s
    for i in range(n - 1, -1, -1):
        s = work[i]
        for p in range(diag[i] + 1, indptr[i + 1]):
            s -= values[p] * work[indices[p]]
        work[i] = s / values[diag[i]]
    for i in range(n):
        out[order[i]] = work[i]
