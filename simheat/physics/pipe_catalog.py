"""Catalog of heating pipe sizes: published tube dimensions and wall roughness.

Names read ``<material>_<outer mm>x<wall mm>`` (``steel_dn<DN>`` for threaded steel
tube). Each entry states outer diameter, wall thickness and bore as the standards
list them; the bore is typed in separately so a test can catch a typing slip.

Provenance: every dimension below is written down from memory of the standard
named with it (EN 1057, EN ISO 15875-2, EN 10255) or, for multilayer tube, of the
common size series that makers offer under EN ISO 21003 (the standard fixes no
single wall per size). Check against the current edition of the standard or the
maker's data sheet before relying on a value. Roughness values are handbook
figures (drawn copper 0.0015 mm, commercial steel 0.045 mm; Moody 1944) and
common trade practice for plastic tube (0.007 mm), also from memory.
"""

from __future__ import annotations

from dataclasses import dataclass

from simheat.errors import ScenarioError

MM = 1e-3  # [m/mm]

ROUGHNESS_DRAWN_COPPER_M = 0.0015 * MM  # drawn tubing; Moody (1944), from memory
ROUGHNESS_PLASTIC_M = 0.007 * MM  # PE-X / PE-RT bore; trade practice, from memory
ROUGHNESS_STEEL_M = 0.045 * MM  # commercial steel; Moody (1944), from memory


@dataclass(frozen=True, slots=True)
class PipeType:
    """One tube size of the catalog.

    Parameters
    ----------
    name : str
        Catalog key, for example ``"cu_15x1"``. [-]
    outer_diameter_m : float
        Nominal outer diameter. [m]
    wall_m : float
        Nominal wall thickness. [m]
    inner_diameter_m : float
        Bore, outer diameter minus twice the wall. [m]
    roughness_m : float
        Absolute roughness of the bore. [m]
    standard : str
        Standard (or size series) the dimensions come from. [-]
    material : str
        Tube material. [-]
    """

    name: str
    outer_diameter_m: float
    wall_m: float
    inner_diameter_m: float
    roughness_m: float
    standard: str
    material: str


_COPPER = ("EN 1057", "copper (Cu-DHP), drawn", ROUGHNESS_DRAWN_COPPER_M)
_PEX = ("EN ISO 15875-2", "crosslinked polyethylene (PE-X)", ROUGHNESS_PLASTIC_M)
_MULTILAYER = (
    "EN ISO 21003 common size series",
    "multilayer PE-RT/Al/PE-RT",
    ROUGHNESS_PLASTIC_M,
)
_STEEL = ("EN 10255 medium series", "non-alloy steel", ROUGHNESS_STEEL_M)

# name: (outer mm, wall mm, bore mm, (standard, material, roughness m));
# all dimensions from memory of the standard named (see module docstring).
_TABLE: dict[str, tuple[float, float, float, tuple[str, str, float]]] = {
    "cu_10x1": (10.0, 1.0, 8.0, _COPPER),
    "cu_12x1": (12.0, 1.0, 10.0, _COPPER),
    "cu_15x1": (15.0, 1.0, 13.0, _COPPER),
    "cu_18x1": (18.0, 1.0, 16.0, _COPPER),
    "cu_22x1": (22.0, 1.0, 20.0, _COPPER),
    "cu_28x1": (28.0, 1.0, 26.0, _COPPER),
    "cu_28x1.5": (28.0, 1.5, 25.0, _COPPER),
    "cu_35x1.2": (35.0, 1.2, 32.6, _COPPER),
    "cu_35x1.5": (35.0, 1.5, 32.0, _COPPER),
    "cu_42x1.2": (42.0, 1.2, 39.6, _COPPER),
    "cu_42x1.5": (42.0, 1.5, 39.0, _COPPER),
    "cu_54x1.5": (54.0, 1.5, 51.0, _COPPER),
    "pex_14x2": (14.0, 2.0, 10.0, _PEX),
    "pex_16x2": (16.0, 2.0, 12.0, _PEX),
    "pex_17x2": (17.0, 2.0, 13.0, _PEX),
    "pex_20x2": (20.0, 2.0, 16.0, _PEX),
    "pex_25x2.3": (25.0, 2.3, 20.4, _PEX),
    "pex_32x2.9": (32.0, 2.9, 26.2, _PEX),
    "mlc_16x2": (16.0, 2.0, 12.0, _MULTILAYER),
    "mlc_18x2": (18.0, 2.0, 14.0, _MULTILAYER),
    "mlc_20x2": (20.0, 2.0, 16.0, _MULTILAYER),
    "mlc_26x3": (26.0, 3.0, 20.0, _MULTILAYER),
    "mlc_32x3": (32.0, 3.0, 26.0, _MULTILAYER),
    "mlc_40x3.5": (40.0, 3.5, 33.0, _MULTILAYER),
    "steel_dn10": (17.2, 2.3, 12.6, _STEEL),
    "steel_dn15": (21.3, 2.6, 16.1, _STEEL),
    "steel_dn20": (26.9, 2.6, 21.7, _STEEL),
    "steel_dn25": (33.7, 3.2, 27.3, _STEEL),
    "steel_dn32": (42.4, 3.2, 36.0, _STEEL),
    "steel_dn40": (48.3, 3.2, 41.9, _STEEL),
    "steel_dn50": (60.3, 3.6, 53.1, _STEEL),
}

PIPE_CATALOG: dict[str, PipeType] = {
    name: PipeType(
        name=name,
        outer_diameter_m=outer_mm * MM,
        wall_m=wall_mm * MM,
        inner_diameter_m=bore_mm * MM,
        roughness_m=roughness_m,
        standard=standard,
        material=material,
    )
    for name, (outer_mm, wall_mm, bore_mm, (standard, material, roughness_m)) in (
        _TABLE.items()
    )
}


def pipe_type(name: str) -> PipeType:
    """Look up a tube size in the catalog.

    Parameters
    ----------
    name : str
        Catalog key, for example ``"cu_15x1"`` or ``"steel_dn20"``. [-]

    Returns
    -------
    PipeType
        Dimensions (outer diameter, wall, bore) [m], roughness [m], standard and
        material of the tube.

    Raises
    ------
    ScenarioError
        When ``name`` is not in the catalog; the message lists the known names.

    Notes
    -----
    Dimensions are nominal values of the standards named in each entry and were
    written down from memory; see the module docstring.

    References
    ----------
    .. [1] EN 1057, "Copper and copper alloys - Seamless, round copper tubes for
       water and gas in sanitary and heating applications".
    .. [2] EN ISO 15875-2, "Plastics piping systems for hot and cold water
       installations - Crosslinked polyethylene (PE-X) - Part 2: Pipes".
    .. [3] EN ISO 21003-2, "Multilayer piping systems for hot and cold water
       installations inside buildings - Part 2: Pipes".
    .. [4] EN 10255, "Non-alloy steel tubes suitable for welding and threading".
    .. [5] L. F. Moody, "Friction factors for pipe flow", Trans. ASME 66(8),
       671-684, 1944.

    Examples
    --------
    >>> round(pipe_type("cu_15x1").inner_diameter_m * 1e3, 6)
    13.0
    """
    try:
        return PIPE_CATALOG[name]
    except (KeyError, TypeError):
        known = ", ".join(sorted(PIPE_CATALOG))
        raise ScenarioError(
            f"unknown pipe type {name!r}; known types: {known}"
        ) from None
