"""The banded Laplacian of a Newton step: assembly, L D L^T factor, solves.

Eliminating the flow increments of a Newton step leaves the weighted graph
Laplacian ``A W A^T`` (reference node removed) for the pressure increments.
After a reverse Cuthill-McKee ordering of the nodes it is banded with a small
half bandwidth, so a banded ``L D L^T`` factorization costs ``O(n b^2)``. It is
symmetric positive definite for a connected network when every weight is
positive; a pump on a rising stretch of its curve gives a negative weight, and
the factorization then applies a stricter pivot test.

References
----------
.. [1] G. H. Golub, C. F. Van Loan, Matrix Computations, 4th ed., Johns Hopkins,
   2013, sec. 4.1 and 4.3 (L D L^T, band factorizations).
"""

from __future__ import annotations

import math

import numpy as np

from simheat._jit import njit


@njit(cache=True)
def assemble_laplacian(net, step):
    """Weighted graph Laplacian ``A W A^T`` in lower band storage.

    Parameters
    ----------
    net : NetworkArrays
        The network (``from_node``, ``to_node``, ``node_position``: the row of
        each node in the ordered reduced matrix, -1 for the reference); its
        ``band`` is written: ``band[i, k]`` holds entry ``(i, i - k)``.
        [kg/(Pa s)]
    step : StepArrays
        ``weight`` (``1/D`` per link) is read; ``row_scale`` is written: the
        sum of absolute link weights at each row. [kg/(Pa s)]
    """
    weight = step.weight
    from_node, to_node = net.from_node, net.to_node
    node_position = net.node_position
    band = net.band
    row_scale = step.row_scale
    band[:, :] = 0.0
    row_scale[: band.shape[0]] = 0.0
    for k in range(weight.shape[0]):
        i = node_position[from_node[k]]
        j = node_position[to_node[k]]
        w = weight[k]
        if i >= 0:
            band[i, 0] += w
            row_scale[i] += abs(w)
        if j >= 0:
            band[j, 0] += w
            row_scale[j] += abs(w)
        if i >= 0 and j >= 0:
            if i > j:
                band[i, i - j] -= w
            else:
                band[j, j - i] -= w


@njit(cache=True)
def band_ldlt(band, row_scale, pivot_fraction, require_positive):
    """Factor a banded symmetric matrix in place as ``L D L^T``.

    Parameters
    ----------
    band : ndarray, shape (n, b + 1)
        On entry ``band[i, k]`` = ``M[i, i - k]``; on exit ``band[i, 0]`` holds
        the inverse pivot ``1 / D[i]`` and ``band[i, k]`` (k > 0) the unit lower
        factor ``L[i, i - k]``. [any]
    row_scale : ndarray
        Magnitude against which each pivot is judged. [any]
    pivot_fraction : float
        A pivot below ``pivot_fraction * row_scale[i]`` in magnitude fails. [-]
    require_positive : bool
        Fail on any pivot that is not positive (positive definite matrices). [-]

    Returns
    -------
    bool
        False when a pivot fails (matrix singular, or indefinite when positive
        pivots are required).

    Notes
    -----
    Row-oriented ``L D L^T`` without pivoting restricted to the band, ``O(n b^2)``
    operations [1]_, carrying ``w_j = L[i, j] D[j]`` along the row so that each
    row costs one division. Without pivoting it is stable for positive definite
    matrices; for indefinite ones the pivot test guards against breakdown. A
    row's leading zeros (inside the band, outside the matrix's envelope) stay
    zero in the factor and are skipped.
    """
    n = band.shape[0]
    b = band.shape[1] - 1
    w = np.empty(b + 1)
    for i in range(n):
        j0 = max(0, i - b)
        while j0 < i and band[i, i - j0] == 0.0:
            j0 += 1
        d = band[i, 0]
        for j in range(j0, i):
            s = band[i, i - j]
            for k in range(j0, j):
                s -= w[k - j0] * band[j, j - k]
            w[j - j0] = s
            lower = s * band[j, 0]
            band[i, i - j] = lower
            d -= s * lower
        if not math.isfinite(d) or abs(d) <= pivot_fraction * row_scale[i]:
            return False
        if require_positive and d < 0.0:
            return False
        band[i, 0] = 1.0 / d
    return True


@njit(cache=True)
def band_solve(band, rhs):
    """Solve ``L D L^T x = rhs`` in place with a factor from :func:`band_ldlt`.

    Parameters
    ----------
    band : ndarray, shape (n, b + 1)
        Factor in lower band storage, inverse pivots on the diagonal. [any]
    rhs : ndarray, shape (n,)
        Right-hand side on entry, solution on exit. [any]

    Notes
    -----
    Forward substitution by rows, back substitution by columns of ``L``; both
    skip each row's leading zeros (the factor has none below a row's first
    nonzero, see :func:`band_ldlt`).
    """
    n = band.shape[0]
    b = band.shape[1] - 1
    for i in range(n):
        j0 = max(0, i - b)
        while j0 < i and band[i, i - j0] == 0.0:
            j0 += 1
        s = rhs[i]
        for k in range(j0, i):
            s -= band[i, i - k] * rhs[k]
        rhs[i] = s
    for i in range(n):
        rhs[i] *= band[i, 0]
    # rhs now holds D^-1 L^-1 rhs; solve L^T x = that, column by column
    for i in range(n - 1, -1, -1):
        x = rhs[i]
        j0 = max(0, i - b)
        while j0 < i and band[i, i - j0] == 0.0:
            j0 += 1
        for k in range(j0, i):
            rhs[k] -= band[i, i - k] * x


@njit(cache=True)
def solve_increment(net, step, residual_Pa, imbalance_kg_s):
    """Newton increments from a factored Laplacian.

    Solves ``(A W A^T) dp = A W r - g`` and sets ``dm = W (A^T dp - r)``, so that
    the linearised equations hold: ``A dm = -g`` and ``dm / W - A^T dp = -r``.

    Parameters
    ----------
    net : NetworkArrays
        The network; ``band`` holds the factor from :func:`band_ldlt`. [-]
    step : StepArrays
        ``weight`` (of the factored matrix) is read, ``reduced`` is workspace;
        written: ``dp_Pa`` (zero at the reference) and ``dm_kg_s``. [SI]
    residual_Pa : ndarray
        Link residuals ``r``. [Pa]
    imbalance_kg_s : ndarray
        Node imbalances ``g``. [kg/s]

    Returns
    -------
    float
        The line-search merit of ``r`` and ``g`` with these weights (as
        :func:`~simheat.hydraulics._kernels.newton.merit`), a by-product of
        assembling the right-hand side. [kg2/s2]
    """
    weight = step.weight
    from_node, to_node = net.from_node, net.to_node
    node_position = net.node_position
    band = net.band
    reduced = step.reduced
    dp_out_Pa = step.dp_Pa
    dm_out_kg_s = step.dm_kg_s
    n_red = band.shape[0]
    rhs = reduced[:n_red]
    node_sum = 0.0
    for n in range(node_position.shape[0]):
        g = imbalance_kg_s[n]
        node_sum += g * g
        i = node_position[n]
        if i >= 0:
            rhs[i] = -g
    link_sum = 0.0
    for k in range(weight.shape[0]):
        q = weight[k] * residual_Pa[k]
        link_sum += q * q
        i = node_position[from_node[k]]
        j = node_position[to_node[k]]
        if i >= 0:
            rhs[i] += q
        if j >= 0:
            rhs[j] -= q
    band_solve(band, rhs)
    for n in range(node_position.shape[0]):
        i = node_position[n]
        dp_out_Pa[n] = rhs[i] if i >= 0 else 0.0
    for k in range(weight.shape[0]):
        dm_out_kg_s[k] = weight[k] * (
            dp_out_Pa[from_node[k]] - dp_out_Pa[to_node[k]] - residual_Pa[k]
        )
    return link_sum + node_sum
