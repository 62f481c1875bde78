"""Expand a sweep into its variants: grid, zip or space-filling random points.

A variant is one point of the parameters under one scheme. Variants are numbered
point by point, schemes fastest, so the numbering is a pure function of the sweep
text: a resumed sweep finds every variant under the same id.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from typing import Any

import numpy as np

from simheat.batch.spec import SweepSpec

# Draws of a normal distribution use the inverse CDF of a unit-interval point; a
# point of exactly 0 or 1 would give an infinite value, so points are kept this far
# inside the interval (a 6.4-sigma draw at most). [-]
_UNIT_MARGIN = 1e-10


@dataclass(frozen=True)
class Variant:
    """One variant of a sweep.

    Attributes
    ----------
    id : int
        Position in the expanded sweep, from 0. [-]
    scheme : str
        Piping scheme it runs under. [-]
    values : tuple
        One entry per parameter, in the sweep's order: the value set, or the
        factor (``scale``) or the offset (``offset``, in the key's unit).
        [the key's unit; - for a factor]
    """

    id: int
    scheme: str
    values: tuple


def expand(spec: SweepSpec) -> list[Variant]:
    """All variants of a sweep, in id order.

    Parameters
    ----------
    spec : SweepSpec
        The checked sweep. [-]

    Returns
    -------
    list of Variant
        Points times schemes, schemes varying fastest.

    Notes
    -----
    ``grid``: every combination of the parameters' values, the first parameter
    varying slowest. ``zip``: the i-th value of every parameter together.
    ``random``: ``samples`` points of a scrambled Latin hypercube (McKay,
    Beckman & Conover 1979) or Sobol sequence (Sobol' 1967) on the unit cube, from
    ``scipy.stats.qmc`` seeded with ``seed``, mapped through each parameter's
    distribution (inverse CDF): uniform ``low + u (high - low)``, normal
    ``mean + sd * Phi^-1(u)``, choice the ``floor(u k)``-th of ``k`` values.

    References
    ----------
    .. [1] M. D. McKay, R. J. Beckman, W. J. Conover, "A comparison of three
       methods for selecting values of input variables in the analysis of output
       from a computer code", Technometrics 21(2), 1979.
    .. [2] I. M. Sobol', "On the distribution of points in a cube and the
       approximate evaluation of integrals", USSR Comput. Math. Math. Phys. 7(4),
       1967.
    """
    if spec.mode == "grid":
        points = list(itertools.product(*(p.values for p in spec.parameters)))
    elif spec.mode == "zip":
        points = list(zip(*(p.values for p in spec.parameters), strict=True))
    else:
        points = random_points(spec)
    variants = []
    for point in points:
        for scheme in spec.schemes:
            variants.append(Variant(id=len(variants), scheme=scheme, values=point))
    return variants


def random_points(spec: SweepSpec) -> list[tuple]:
    """The random sweep's points, each a tuple of parameter values.

    Parameters
    ----------
    spec : SweepSpec
        A sweep in ``random`` mode. [-]

    Returns
    -------
    list of tuple
        ``spec.samples`` points (plain Python numbers or the chosen values).
    """
    from scipy.stats import norm, qmc

    dimensions = len(spec.parameters)
    engine_class = qmc.Sobol if spec.sampling == "sobol" else qmc.LatinHypercube
    generator = np.random.default_rng(spec.seed)
    try:
        engine = engine_class(dimensions, rng=generator)
    except TypeError:  # scipy < 1.15 calls the generator ``seed``
        engine = engine_class(dimensions, seed=generator)
    unit = engine.random(spec.samples)
    columns: list[list[Any]] = []
    for j, parameter in enumerate(spec.parameters):
        kind, args = parameter.distribution.kind, parameter.distribution.args
        u = unit[:, j]
        if kind == "uniform":
            drawn = [float(v) for v in args[0] + u * (args[1] - args[0])]
        elif kind == "normal":
            inside = np.clip(u, _UNIT_MARGIN, 1.0 - _UNIT_MARGIN)
            drawn = [float(v) for v in args[0] + args[1] * norm.ppf(inside)]
        else:
            index = np.minimum((u * len(args)).astype(int), len(args) - 1)
            drawn = [args[i] for i in index]
        columns.append(drawn)
    return list(zip(*columns, strict=True))


def assignments(spec: SweepSpec, variant: Variant) -> tuple:
    """What a variant changes in the base scenario, in the order to apply it.

    Parameters
    ----------
    spec : SweepSpec
        The sweep. [-]
    variant : Variant
        One of its variants. [-]

    Returns
    -------
    tuple of (segments, operation, value)
        One entry per parameter, see :func:`simheat.batch.keypath.apply`.
    """
    return tuple(
        (p.segments, p.operation, value)
        for p, value in zip(spec.parameters, variant.values, strict=True)
    )
