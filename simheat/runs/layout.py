"""The run file's layout: schema version, groups, datasets and their units.

Data only (no I/O): :mod:`simheat.runs.store` writes and reads files of this
layout.

File layout (schema version 3)::

    /                               attributes:
    |                                 format          "simheat-run"
    |                                 schema_version  3
    |                                 simheat_version code version that wrote the file
    |                                 scheme          piping scheme of the run
    |                                 created_utc     ISO 8601 time of writing
    |                                 scenario_origin where the scenario text came from
    |                                 solver          JSON text of the solver settings
    |                                                 and counters
    |                                 initial_state   "night" (the run starts when
    |                                                 the heating went off the
    |                                                 evening before) or "given"
    +-- scenario_toml               the scenario's original TOML text (UTF-8 string)
    +-- network/                    attributes: scheme, reference_node
    |   +-- node_names              strings, one per node
    |   +-- link_names              strings, one per link
    |   +-- emitter_ids             strings, one per emitter
    |   +-- node_line, node_distance_m, link_kind, from_node, to_node, length_m,
    |       inner_diameter_m, roughness_m, zeta, kv_m3_h, pump_coeffs,
    |       emitter_index, water_volume_m3, loss_W_per_m_K, surroundings_room,
    |       check_valve, pump_mode, pump_setpoint_Pa, closed
    |                               one dataset per array of the Network, each with
    |                               a ``units`` attribute ("-" for indices and codes)
    +-- series/                     gzip-compressed; ``units`` on every dataset,
    |   |                           ``columns`` (room, emitter or counter ids) on 2-D
    |   +-- time_s                  (n_times,)             "s"
    |   +-- outdoor_temp_C          (n_times,)             "degC"
    |   +-- air_temp_C              (n_times, n_rooms)     "degC"
    |   +-- structure_temp_C        (n_times, n_rooms)     "degC"
    |   +-- emitter_flow_kg_s       (n_times, n_emitters)  "kg/s"
    |   +-- emitter_output_W        (n_times, n_emitters)  "W"
    |   +-- emitter_inlet_temp_C    (n_times, n_emitters)  "degC"
    |   +-- supply_temp_C           (n_times,)             "degC"
    |   +-- return_temp_C           (n_times,)             "degC"
    |   +-- source_power_W          (n_times,)             "W"
    |   +-- energy_J                (n_times, 5)           "J"   columns: source,
    |   |                                                         emitted_to_rooms,
    |   |                                                         pipe_losses,
    |   |                                                         pipe_to_unheated,
    |   |                                                         electricity
    |   +-- stored_heat_J           (n_times,)             "J"
    |   +-- source_capacity_W       (n_times,)             "W"
    |   +-- electric_power_W        (n_times,)             "W"
    |   +-- source_flow_kg_s        (n_times,)             "kg/s"
    +-- night/                      only with initial_state "night": the night
    |   |                           before the morning, heating and pumps off;
    |   |                           attributes off_clock ("HH:MM"), off_clock_s
    |   |                           (s after midnight), note; gzip-compressed,
    |   |                           ``units`` and ``columns`` as in series/
    |   +-- time_s                  (n_night,) "s", negative: from the night's
    |   |                           start up to 0, the morning's start
    |   +-- outdoor_temp_C          (n_night,)             "degC"
    |   +-- air_temp_C              (n_night, n_rooms)     "degC"
    |   +-- structure_temp_C        (n_night, n_rooms)     "degC"
    |   +-- emitter_output_W        (n_night, n_emitters)  "W"
    |   +-- stored_heat_J           (n_night,)             "J"
    +-- summary/                    attributes peak_source_power_W, hot_water_level_C,
                                    source_at_limit (share of comfort at the power
                                    limit or a heat pump's capacity),
                                    source_below_min_flow (a heat pump's share of
                                    comfort below its minimum flow; NaN when not
                                    applicable); both absent from older files
        +-- rooms/                  one entry per room, in scenario order:
        |                           id, setpoint_C, time_to_setpoint_s,
        |                           final_air_temp_C, time_to_setpoint_operative_s,
        |                           final_operative_temp_C, overshoot_K (times are
        |                           NaN when the setpoint was not reached)
        +-- emitters/               one entry per emitter: id, room, mean_flow_kg_s,
        |                           design_flow_kg_s, mean_output_W,
        |                           hot_water_arrival_s (NaN when it never arrived)
        +-- energy                  empty group; attributes source_J, room_gains_J,
                                    pipe_losses_J, stored_change_J,
                                    pipe_to_unheated_J (absent in older files),
                                    electric_J

Schema history: version 3 added the night (``initial_state`` and the
``night/`` group; the series, summary and energy books still count from the
start of the morning). Version 2 files, whose runs started from a given state,
read as runs without a night. Version 2 added the operative times, overshoot,
final operative temperature, hot water arrival, peak source power and hot water
level, and the network's check_valve, pump_mode and pump_setpoint_Pa arrays. Version 1
files are refused with a message asking to simulate again (their summaries lack
figures that need the dense output of the integration to compute).
Within version 2 the solver record gained ``pump_stop_times_s`` (stop time of
each pump that stopped, by pump link name); a record without it stopped every
pump at its ``pump_stop_s``, or none (see :attr:`Run.pump_stop_times_s`). The
network gained ``closed`` (links shut for good); a file without it has none.
Heat pumps added, without a new version, the electricity column of
``energy_J`` (the fifth), the series ``source_capacity_W``, ``electric_power_W``
and ``source_flow_kg_s``, the energy attribute ``electric_J`` and the summary
attribute ``source_below_min_flow``. Files written before (version 2, or 3
before heat pumps) come from boilers only and read as such: four energy columns
gain an electricity column of zeros (three columns, from before the unheated
split, stay three), ``electric_J`` reads 0, the capacity reads the scenario's
power limit at every time, the electric power zeros and the source flow None.
"""

from __future__ import annotations

import h5py

SCHEMA_VERSION = 3
OLDEST_READABLE_SCHEMA = 2
FILE_FORMAT = "simheat-run"

# Network arrays and their units ("-" for indices, codes and dimensionless values).
NETWORK_ARRAY_UNITS = {
    "node_line": "-",
    "node_distance_m": "m",
    "link_kind": "-",
    "from_node": "-",
    "to_node": "-",
    "length_m": "m",
    "inner_diameter_m": "m",
    "roughness_m": "m",
    "zeta": "-",
    "kv_m3_h": "m3/h",
    "pump_coeffs": "Pa, Pa s/m3, Pa s2/m6",
    "emitter_index": "-",
    "water_volume_m3": "m3",
    "loss_W_per_m_K": "W/(m K)",
    "surroundings_room": "-",
    "check_valve": "-",
    "pump_mode": "-",
    "pump_setpoint_Pa": "Pa",
    "closed": "-",
}
NETWORK_STRING_ARRAYS = ("node_names", "link_names", "emitter_ids")
# Network arrays added within schema 2: a file without one reads as the default.
NETWORK_ARRAYS_ADDED = ("closed",)

# Time series of a Run: unit and what the columns of a 2-D series are.
SERIES_UNITS = {
    "time_s": "s",
    "outdoor_temp_C": "degC",
    "air_temp_C": "degC",
    "structure_temp_C": "degC",
    "emitter_flow_kg_s": "kg/s",
    "emitter_output_W": "W",
    "emitter_inlet_temp_C": "degC",
    "supply_temp_C": "degC",
    "return_temp_C": "degC",
    "source_power_W": "W",
    "energy_J": "J",
    "stored_heat_J": "J",
}
# Series added later (heat pumps); older files lack them (see store._read_run).
OPTIONAL_SERIES_UNITS = {
    "source_capacity_W": "W",
    "electric_power_W": "W",
    "source_flow_kg_s": "kg/s",
}
# The night's series (a Night's fields) and their units.
NIGHT_SERIES_UNITS = {
    name: SERIES_UNITS[name]
    for name in (
        "time_s",
        "outdoor_temp_C",
        "air_temp_C",
        "structure_temp_C",
        "emitter_output_W",
        "stored_heat_J",
    )
}
ROOM_SERIES = ("air_temp_C", "structure_temp_C")
EMITTER_SERIES = ("emitter_flow_kg_s", "emitter_output_W", "emitter_inlet_temp_C")
# Columns of the cumulative energy counters (see simheat.dynamics.model).
ENERGY_COLUMNS = (
    "source",
    "emitted_to_rooms",
    "pipe_losses",
    "pipe_to_unheated",
    "electricity",
)

ROOM_FIELDS = {
    "setpoint_C": "degC",
    "time_to_setpoint_s": "s",
    "final_air_temp_C": "degC",
    "time_to_setpoint_operative_s": "s",
    "final_operative_temp_C": "degC",
    "overshoot_K": "K",
}
EMITTER_FIELDS = {
    "mean_flow_kg_s": "kg/s",
    "design_flow_kg_s": "kg/s",
    "mean_output_W": "W",
    "hot_water_arrival_s": "s",
}
# Summary fields that may be None (stored as NaN).
OPTIONAL_FIELDS = {
    "time_to_setpoint_s",
    "time_to_setpoint_operative_s",
    "hot_water_arrival_s",
}
SUMMARY_ATTRS = {"peak_source_power_W": "W", "hot_water_level_C": "degC"}
# Summary attributes added later: files written before lack them (read as None).
OPTIONAL_SUMMARY_ATTRS = {"source_at_limit": "-", "source_below_min_flow": "-"}
ENERGY_FIELDS = ("source_J", "room_gains_J", "pipe_losses_J", "stored_change_J")
# Energy attributes added later: files written before lack them (read as 0).
OPTIONAL_ENERGY_FIELDS = ("electric_J",)

STRING = h5py.string_dtype(encoding="utf-8")
GZIP_LEVEL = 4  # moderate gzip level: most of the size gain at a fraction of the cost
