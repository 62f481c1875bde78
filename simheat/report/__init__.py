"""Text and JSON formatting of simheat's answers: the layer below the CLI.

One module per answer, each with a ``*_dict`` function (JSON-ready data in
practical units, ending with the ``caution``) and a ``*_text`` function (aligned
tables, without the caution; the caller prints it once, last):

- :mod:`~simheat.report.run_summary`: one simulated morning (``simheat run``);
- :mod:`~simheat.report.flow_split`: the steady flow split (``simheat flows``);
- :mod:`~simheat.report.layouts`: every scheme's design figures (``simheat layouts``);
- :mod:`~simheat.report.compare`: schemes side by side (``simheat compare``);
- :mod:`~simheat.report.throttle`: one valve turned down (``simheat throttle``);
- :mod:`~simheat.report.check`: loads, sizing, starving radiators (``simheat check``);
- :mod:`~simheat.report.start_time`: the latest heating start per scheme
  (``--ready-by`` of ``simheat run`` and ``simheat compare``);
- :mod:`~simheat.report.night`: the night before a run's morning;
- :mod:`~simheat.report.sweep`: a sweep's table, JSON and CSV (``simheat sweep``);
- :mod:`~simheat.report.readiness`: low-temperature readiness (``simheat readiness``).

:mod:`~simheat.report.caution` holds :data:`CAUTION`,
:mod:`~simheat.report.numbers` the unit factors and number and time formatters,
:mod:`~simheat.report.output` strict JSON text (:func:`to_json`) and
:func:`with_files`. :mod:`~simheat.report.figures` draws the figures of a run by
kind name (:func:`run_figure`), computing first what a figure needs (the pressure
profile), and those of a sweep file (:func:`plot_sweep_file`: read, compute,
draw, save), since the figure functions in :mod:`simheat.plots` only draw.

The report layer reads analysis results and constants; no analysis imports it.
"""

from __future__ import annotations

from simheat.report.caution import CAUTION
from simheat.report.check import check_dict, check_text, checks_dict
from simheat.report.compare import comparison_dict, comparison_text
from simheat.report.figures import RUN_FIGURES, plot_sweep_file, run_figure
from simheat.report.flow_split import flow_split_dict, flow_split_text
from simheat.report.layouts import layouts_dict, layouts_text
from simheat.report.night import night_dict, night_text
from simheat.report.output import to_json, with_files
from simheat.report.readiness import readiness_dict, readiness_text
from simheat.report.run_summary import (
    run_summary_dict,
    run_summary_text,
    runs_summary_dict,
    scheme_comparison_text,
)
from simheat.report.start_time import (
    start_time_entry,
    start_times_dict,
    start_times_text,
)
from simheat.report.sweep import sweep_csv_text, sweep_dict, sweep_text
from simheat.report.throttle import (
    matrix_dict,
    matrix_text,
    throttle_dict,
    throttle_text,
    transient_dict,
    transient_text,
)

__all__ = [
    "CAUTION",
    "RUN_FIGURES",
    "check_dict",
    "check_text",
    "checks_dict",
    "comparison_dict",
    "comparison_text",
    "flow_split_dict",
    "flow_split_text",
    "layouts_dict",
    "layouts_text",
    "matrix_dict",
    "matrix_text",
    "night_dict",
    "night_text",
    "plot_sweep_file",
    "readiness_dict",
    "readiness_text",
    "run_summary_dict",
    "run_summary_text",
    "run_figure",
    "runs_summary_dict",
    "scheme_comparison_text",
    "start_time_entry",
    "start_times_dict",
    "start_times_text",
    "sweep_csv_text",
    "sweep_dict",
    "sweep_text",
    "throttle_dict",
    "throttle_text",
    "to_json",
    "transient_dict",
    "transient_text",
    "with_files",
]
