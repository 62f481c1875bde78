"""Every piping scheme built for one house: pipe, fittings, index circuit, pump.

The answer of ``simheat layouts``: each scheme is built from the scenario's one
description of rooms, radiators and route
(:func:`simheat.hydraulics.layouts.describe`) and its design figures are computed
at design flows (:func:`simheat.hydraulics.sizing.design_figures`). Text and JSON
of the result are in :mod:`simheat.report.layouts`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from simheat.hydraulics.layouts import BuiltLayout, describe
from simheat.hydraulics.sizing import DesignFigures, design_figures
from simheat.scenario.model import Scenario, SizingLimits
from simheat.schemes import SCHEME_NAMES

__all__ = ["LayoutDesign", "LayoutDesigns", "design_layouts"]


@dataclass(frozen=True)
class LayoutDesign:
    """One scheme built for the house, with its design figures.

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    built : BuiltLayout
        The built layout (network, pipe types, design flows, drawing positions). [-]
    figures : DesignFigures
        Pipe lengths, fittings, index circuit, pump duties, water volume and the
        runs above the sizing limits. [-]
    """

    scheme: str
    built: BuiltLayout
    figures: DesignFigures


@dataclass(frozen=True)
class LayoutDesigns:
    """Schemes built for one house, in the order asked.

    Attributes
    ----------
    scenario_name : str
        The scenario's name. [-]
    sizing : SizingLimits
        The sizing rule the layouts were built and checked with. [-]
    designs : tuple of LayoutDesign
        One per scheme. [-]
    tapered : bool
        Whether some tee gives its header stretch a pipe of its own: with
        automatic sizing, whether the header segments' sizes are worth listing
        one by one. [-]
    """

    scenario_name: str
    sizing: SizingLimits
    designs: tuple[LayoutDesign, ...]
    tapered: bool = False

    @property
    def list_segments(self) -> bool:
        """Whether to list the header segments one by one (auto sizing or tapered)."""
        return self.sizing.mode == "auto" or self.tapered


def design_layouts(
    scenario: Scenario, schemes: Sequence[str] | None = None
) -> LayoutDesigns:
    """Build schemes for a house and compute each one's design figures.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    schemes : sequence of str, optional
        Schemes to build; every scheme simheat knows
        (:data:`simheat.schemes.SCHEME_NAMES`) by default. [-]

    Returns
    -------
    LayoutDesigns
        The built layouts and their figures, in the order of ``schemes``.

    Raises
    ------
    ScenarioError
        For an unknown scheme, or a route a scheme cannot use.
    """
    names = SCHEME_NAMES if schemes is None else tuple(schemes)
    designs = []
    for name in names:
        built = describe(scenario, name)
        designs.append(LayoutDesign(name, built, design_figures(built)))
    tapered = any(
        t.header_pipe is not None or t.return_header_pipe is not None
        for f in scenario.route.floors
        for t in f.tees
    )
    return LayoutDesigns(scenario.name, scenario.layout.sizing, tuple(designs), tapered)
