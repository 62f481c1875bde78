"""Physical bounds and small checks that several scenario sections share.

Every numeric key of a scenario is bounded. The bounds are physical, not
arbitrary: each keeps the input inside what a house heating system can be and
inside the range the model's correlations hold, and catches unit mistakes (a
value in W where kW is meant is 1000 times off). The README (*Bounds*) lists
the classes of bound and why; the numbers live here when several sections use
them and beside their key otherwise.
"""

from __future__ import annotations

from simheat.scenario.fields import Table, shown

MAX_FLOOR = 100  # storey number [-]
MIN_FLOOR = -5  # basements [-]
MAX_WATER_L = 1e4  # water content of an emitter or the source [L]
# Lengths. A pipe run of 1 cm, shorter than any tee, holds under a millilitre
# (the idealised one-room checks use such runs); a shorter one's water cell
# would only stiffen the integration (a run of zero length, where the scenario
# allows one, is no pipe). 1000 m is far beyond the longest run in a house. [m]
MIN_PIPE_LENGTH_M = 0.01
MAX_PIPE_LENGTH_M = 1000.0
MAX_SCHEDULE_TIME_H = 8760.0  # one year either side of the start [h]
# Water temperatures. A sealed house system runs its flow at 95 °C at most
# (EN 12828 puts the safety limit at 105 °C; above that the relief valve opens),
# and the water properties of the model are fitted over 0-100 °C (liquid at the
# 1-3 bar of a house system). 25 °C is below any heating flow temperature. [°C]
MIN_FLOW_TEMP_C = 25.0
MAX_FLOW_TEMP_C = 95.0
# Air temperatures outdoors: the coldest design temperatures of inhabited places
# are near -50 °C; 40 °C is a hot summer day. [°C]
MIN_OUTDOOR_C = -50.0
MAX_OUTDOOR_C = 40.0
# Room setpoints: frost protection (5 °C) to a warm bathroom (30 °C). [°C]
MIN_SETPOINT_C = 5.0
MAX_SETPOINT_C = 30.0
# Heat loads per floor area. A poorly insulated room of an old house needs about
# 100-150 W/m2 at design, a passive house about 10 W/m2; 1000 W/m2 is a glass
# room at -50 °C. Below 1 W/m2 a room needs no heating. [W/m2]
MIN_LOAD_W_PER_M2 = 1.0
MAX_LOAD_W_PER_M2 = 1000.0
# Loss coefficients per floor area: 1000 W/m2 at a 50 K difference, and 1 W/m2
# at the 80 K of the coldest design day. [W/(m2 K)]
MIN_LOSS_W_PER_M2K = 0.0125
MAX_LOSS_W_PER_M2K = 20.0
# Internal gains per floor area: dwellings average 2-5 W/m2 (people, appliances,
# lighting; typical figures of EN ISO 13790 national annexes, from memory); a
# kitchen while cooking reaches about 30 W/m2. [W/m2]
MAX_GAINS_W_PER_M2 = 50.0
# Valve Kv: the smallest preset of a precision radiator valve is about 0.02
# m3/h; 0.001 m3/h (1 L/h at 1 bar) is below any preset, a closed valve's
# leakage that the model adds itself. 100 m3/h is a DN65 valve, far beyond a
# house. [m3/h at 1 bar]
MIN_KV_M3_H = 0.001
MAX_KV_M3_H = 100.0
# Presets and lockshield turns are small numbers on a dial. [-]
MAX_PRESET = 1000.0

# Bounds of a given initial room temperature (air or structure): a house standing
# unheated in a hard frost to an overheated one. [°C]
MIN_ROOM_C = -20.0
MAX_ROOM_C = 40.0


def length_m(t: Table, key: str, default=None, *, zero_allowed: bool = False) -> float:
    """A pipe length: :data:`MIN_PIPE_LENGTH_M` to :data:`MAX_PIPE_LENGTH_M`.

    Parameters
    ----------
    t : Table
        The table holding the key. [-]
    key : str
        The key. [-]
    default : float, optional
        Value when the key is absent; required when None. [m]
    zero_allowed : bool
        Accept 0 as well (no pipe). [-]

    Returns
    -------
    float
        The length. [m]
    """
    value = t.number(key) if default is None else t.number(key, default)
    if zero_allowed and value == 0.0:
        return value
    if not MIN_PIPE_LENGTH_M <= value <= MAX_PIPE_LENGTH_M:
        zero = "0 or " if zero_allowed else ""
        raise t.fail(
            key,
            f"must be {zero}{MIN_PIPE_LENGTH_M:g} to {MAX_PIPE_LENGTH_M:g} m, "
            f"got {value:g}",
        )
    return value


def per_area_bound(
    t: Table,
    key: str,
    value: float,
    area_m2: float,
    low: float,
    high: float,
    unit: str,
    why: str,
) -> None:
    """Raise unless ``value / area_m2`` lies within ``low`` to ``high``.

    Parameters
    ----------
    t : Table
        The room's table. [-]
    key : str
        The key holding ``value``. [-]
    value : float
        The value. [unit of the key]
    area_m2 : float
        The room's floor area. [m2]
    low, high : float
        Bounds per square metre of floor. [unit of the key per m2]
    unit : str
        Unit of the bounds, for the message. [-]
    why : str
        Short reason, for the message. [-]

    Raises
    ------
    ScenarioError
        Naming the key, the value per m2 and the bounds.
    """
    per_m2 = value / area_m2
    if not low <= per_m2 <= high:
        raise t.fail(
            key,
            f"{per_m2:.3g} {unit} of floor area is outside {low:g} to {high:g} "
            f"({why}), got {value:g}",
        )


def unique_ids(tables: list[Table], what: str) -> dict[str, int]:
    """Map each table's ``id`` to its index; ids must be non-empty and distinct.

    Parameters
    ----------
    tables : list of Table
        The entries of an array of tables (``[[rooms]]``, ``[[emitters]]``).
    what : str
        Name of the array, for messages. [-]

    Returns
    -------
    dict of str to int
        Index of each id, in file order.
    """
    ids: dict[str, int] = {}
    for i, t in enumerate(tables):
        ident = t.text("id")
        if not ident.strip():
            raise t.fail("id", "must not be empty")
        if ident in ids:
            raise t.fail(
                "id", f"duplicate id {shown(ident)} (also {what}[{ids[ident]}])"
            )
        ids[ident] = i
    return ids


def exactly_one(t: Table, first: str, second: str) -> None:
    """Raise unless exactly one of the keys ``first`` and ``second`` is given.

    Parameters
    ----------
    t : Table
        The table holding the keys. [-]
    first, second : str
        The two keys; the message names ``first``, or ``second`` when a key of
        the table looks like a misspelling of it. [-]

    Raises
    ------
    ScenarioError
        When both or neither are given.
    """
    if t.has(first) and t.has(second):
        raise t.fail(first, f"give only one of {first} or {second}, got both")
    if not (t.has(first) or t.has(second)):
        problem = f"give one of {first} or {second}, got neither"
        likely = (
            second if t.near_unknown(second) and not t.near_unknown(first) else first
        )
        raise t.missing(likely, problem)
