"""Property-based fuzzing of the bundled scenarios at the TOML level.

Hypothesis mutates a bundled house (bungalow, two-storey, terrace) once or twice:
deletes keys or list entries, swaps in wrong types, NaN and infinities, huge and
tiny numbers, scaled numbers (plausible values that pass the bounds, to reach
the physics), duplicate ids, dangling references and unknown or misspelt keys.
The mutated document is written back as TOML and must end in one of:

- a :class:`ScenarioError` on one short line that starts with a key path
  (``rooms[3].floor_area_m2: ...``);
- a run whose report is strict JSON and whose temperatures lie within the
  model's range (water 0-100 °C, rooms -50 to 60 °C), with closed energy books;
- a :class:`ModelRangeError`: a run that left the model's range stopped there.

A second property sends mutated files through every command that reads a
scenario (``run``, ``flows``, ``layouts``, ``check``, ``balance``, ``compare``,
``throttle``, ``report``, ``readiness``; a test checks the list against the
registered commands): exit 0 with strict JSON, or exit 1 or 2 with one line and no
traceback (never an "internal error").

A third, cheap property loads and resolves many more mutants (up to three
mutations each) without running them.

Runtime is bounded: every house is cut to a 2 h run at a 10 min output step
before mutating (runs the mutations make longer are checked up to loading
only), examples are few (``SIMHEAT_FUZZ_EXAMPLES``, default 40: 320 loads, 40
runs, 30 commands) and derandomized, so the suite sees the same cases on every
machine. Set ``SIMHEAT_FUZZ_EXAMPLES=1000`` (and ``SIMHEAT_FUZZ_SEED`` to
explore other sequences) for a long fuzzing session.
"""

from __future__ import annotations

import copy
import json
import math
import os
import re
import tempfile
import tomllib
from pathlib import Path

import numpy as np
import pytest
import tomlkit
from click.testing import CliRunner
from hypothesis import HealthCheck, event, given, seed, settings
from hypothesis import strategies as st

from simheat.cli import main
from simheat.dynamics import ranges
from simheat.errors import ModelRangeError, ScenarioError
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[1] / "scenarios"


def _bundled(kind: str) -> tuple[str, ...]:
    """Names of the bundled houses (``[[rooms]]``) or sweep files (``base = ...``)."""
    found = []
    for path in sorted(SCENARIOS.glob("*.toml")):
        data = tomllib.loads(path.read_text(encoding="utf-8"))
        if (kind == "house" and "rooms" in data) or (
            kind == "sweep" and "base" in data
        ):
            found.append(path.stem)
    return tuple(found)


# Every bundled house and sweep file is fuzzed: one added to scenarios/ (by any
# branch) is covered from then on.
HOUSES = _bundled("house")
# Examples per property: loading is cheap (milliseconds), a run and a command
# cost a fraction of a second each.
EXAMPLES = int(os.environ.get("SIMHEAT_FUZZ_EXAMPLES", "40"))
LOAD_EXAMPLES = 8 * EXAMPLES
RUN_EXAMPLES = EXAMPLES
CLI_EXAMPLES = max(1, (3 * EXAMPLES) // 4)
FUZZ_SEED = int(os.environ.get("SIMHEAT_FUZZ_SEED", "18"))
# The bounded run: a 2 h morning sampled every 10 min. Mutated files that ask
# for longer runs are checked up to the loader only. [h], [min]
RUN_HOURS = 2.0
RUN_OUTPUT_STEP_MIN = 10.0
# A message starts with a key path: parts without spaces, joined by dots, with
# list positions in brackets, then ": ".
KEY_PATH = re.compile(r"^[^\s:]+(?:\[\d+\])*(?:\.[^\s:]+)*: \S")
MESSAGE_LIMIT = 400  # characters; keys and values are cut well before this

WRONG_TYPES = ("text", True, [1, 2], {"a": 1.0}, 3)
NON_FINITE = (math.nan, math.inf, -math.inf)
EXTREMES = (1e308, -1e308, 1e30, 5e-324, 1e-300, 0, -1, 1e6, 1e-6)
SCALES = (0.1, 0.5, 0.9, 1.1, 2.0, 10.0)
# Mutations and their weights: scaled numbers mostly load and reach the
# physics, the others mostly test the loader's refusals.
OPERATIONS = (
    ("scale",) * 6
    + ("delete",) * 2
    + ("extreme",) * 2
    + ("wrong_type", "non_finite", "duplicate_id", "dangling")
    + ("unknown_key", "misspelt_key")
)


SWEEPS = _bundled("sweep")
# Variants of a fuzzed sweep loaded per example (expanding is cheap; loading
# each variant is the loader's work again).
SWEEP_VARIANTS_LOADED = 3


def _base(house: str) -> dict:
    data = tomllib.loads((SCENARIOS / f"{house}.toml").read_text(encoding="utf-8"))
    simulation = data.setdefault("simulation", {})
    simulation["duration_h"] = RUN_HOURS
    simulation["output_step_min"] = RUN_OUTPUT_STEP_MIN
    return data


BASES = {house: _base(house) for house in HOUSES}
SWEEP_BASES = {
    name: tomllib.loads((SCENARIOS / f"{name}.toml").read_text(encoding="utf-8"))
    for name in SWEEPS
}


def _paths(node, prefix=()) -> list[tuple]:
    """Every (path, value) of a document, tables and lists included."""
    found = []
    items = node.items() if isinstance(node, dict) else enumerate(node)
    for key, value in items:
        path = (*prefix, key)
        found.append((path, value))
        if isinstance(value, dict | list):
            found += _paths(value, path)
    return found


def _parent(document, path):
    node = document
    for step in path[:-1]:
        node = node[step]
    return node


def _mutate(data, document: dict) -> str:
    """Apply one drawn mutation in place; return a label for the record."""
    operation = data.draw(st.sampled_from(OPERATIONS), label="operation")
    paths = _paths(document)
    if operation in ("unknown_key", "misspelt_key"):
        tables = [(p, v) for p, v in paths if isinstance(v, dict)] + [((), document)]
        path, table = data.draw(st.sampled_from(tables), label="table")
        if operation == "unknown_key" or not table:
            table["zzz_unknown"] = 1.0
            return f"{operation} {path}"
        key = data.draw(st.sampled_from(sorted(table)), label="key")
        if len(key) > 2:
            i = data.draw(st.integers(0, len(key) - 2), label="swap")
            typo = key[:i] + key[i + 1] + key[i] + key[i + 2 :]
            table[typo] = table.pop(key)
        return f"{operation} {(*path, key)}"
    if operation == "duplicate_id":
        ids = [
            (p, v)
            for p, v in paths
            if p[-1] == "id" and isinstance(p[-2], int) and p[-2] > 0
        ]
        if ids:
            path, _ = data.draw(st.sampled_from(ids), label="id")
            siblings = _parent(document, path[:-1])
            siblings[path[-2]]["id"] = siblings[0].get("id", "x")
            return f"{operation} {path}"
        operation = "delete"
    if operation == "dangling":
        texts = [(p, v) for p, v in paths if isinstance(v, str) and p[-1] != "name"]
        if texts:
            path, _ = data.draw(st.sampled_from(texts), label="reference")
            _parent(document, path)[path[-1]] = "nowhere"
            return f"{operation} {path}"
        operation = "delete"
    numbers = [
        (p, v)
        for p, v in paths
        if isinstance(v, int | float) and not isinstance(v, bool)
    ]
    if operation in ("non_finite", "extreme", "scale") and numbers:
        path, value = data.draw(st.sampled_from(numbers), label="number")
        if operation == "non_finite":
            new = data.draw(st.sampled_from(NON_FINITE), label="value")
        elif operation == "extreme":
            new = data.draw(st.sampled_from(EXTREMES), label="value")
        else:
            new = value * data.draw(st.sampled_from(SCALES), label="factor")
        _parent(document, path)[path[-1]] = new
        return f"{operation} {path} -> {new!r}"
    path, value = data.draw(st.sampled_from(paths), label="path")
    parent = _parent(document, path)
    if operation == "wrong_type":
        choices = [w for w in WRONG_TYPES if type(w) is not type(value)]
        parent[path[-1]] = data.draw(st.sampled_from(choices), label="value")
    else:
        del parent[path[-1]]
    return f"{operation} {path}"


def mutated_text(data, most: int = 2, bases=None) -> tuple[str, list[str]]:
    """A bundled house (or sweep), mutated one to ``most`` times, as TOML text."""
    bases = BASES if bases is None else bases
    house = data.draw(st.sampled_from(sorted(bases)), label="house")
    document = copy.deepcopy(bases[house])
    done = [
        _mutate(data, document)
        for _ in range(data.draw(st.integers(1, most), label="mutations"))
    ]
    return tomlkit.dumps(document), [house, *done]


def _check_scenario_error(exc: ScenarioError) -> None:
    message = str(exc)
    assert "\n" not in message
    assert len(message) <= MESSAGE_LIMIT + 200, message[:200]
    assert KEY_PATH.match(message), message


def _strict(text: str):
    def refuse(constant):
        raise AssertionError(f"non-strict JSON constant {constant}")

    return json.loads(text, parse_constant=refuse)


def _check_run(scenario) -> str:
    """Simulate a loaded mutant; return what happened (for the statistics)."""
    from simheat.dynamics.simulate import simulate
    from simheat.report import run_summary_dict, to_json

    try:
        run = simulate(scenario)
    except ModelRangeError as exc:
        message = str(exc)
        if "\n" in message:
            raise AssertionError(f"two-line message: {message!r}") from None
        return "run stopped out of range"
    except ScenarioError as exc:  # checks that need a derived quantity
        _check_scenario_error(exc)
        return "refused when resolving"
    _strict(to_json(run_summary_dict(run)))
    water = np.concatenate([run.supply_temp_C, run.return_temp_C])
    rooms = np.concatenate([run.air_temp_C.ravel(), run.structure_temp_C.ravel()])
    assert np.all(np.isfinite(water))
    assert np.all(np.isfinite(rooms))
    assert ranges.WATER_MIN_C <= water.min()
    assert water.max() <= ranges.WATER_MAX_C
    assert ranges.ROOM_MIN_C <= rooms.min()
    assert rooms.max() <= ranges.ROOM_MAX_C
    assert abs(run.summary.energy.balance_error_pct) < 0.5
    return "ran within bounds"


def _fuzz_settings(examples: int, *checks) -> settings:
    return settings(
        max_examples=examples,
        deadline=None,
        derandomize="SIMHEAT_FUZZ_SEED" not in os.environ,
        suppress_health_check=[
            HealthCheck.too_slow,
            HealthCheck.data_too_large,
            *checks,
        ],
        database=None,
    )


@seed(FUZZ_SEED)
@_fuzz_settings(LOAD_EXAMPLES)
@given(data=st.data())
def test_mutated_scenario_loads_or_is_refused_by_key(data):
    from simheat.resolve import resolve

    text, record = mutated_text(data, most=3)
    data.draw(st.just(record), label="record")
    try:
        resolve(parse_scenario(text, origin="fuzz.toml"))
    except ScenarioError as exc:
        _check_scenario_error(exc)
        event("refused")
    else:
        event("loaded and resolved")


@seed(FUZZ_SEED)
@_fuzz_settings(RUN_EXAMPLES)
@given(data=st.data())
def test_mutated_scenario_is_refused_by_key_or_runs_within_bounds(data):
    text, record = mutated_text(data)
    data.draw(st.just(record), label="record")  # shown when an example fails
    try:
        scenario = parse_scenario(text, origin="fuzz.toml")
    except ScenarioError as exc:
        _check_scenario_error(exc)
        event("refused when loading")
        return
    if scenario.simulation.duration_s > 3600.0 * RUN_HOURS:
        event("loaded; run longer than the budget")
        return  # a longer run than the suite's budget: loading was the check
    event(_check_run(scenario))


@seed(FUZZ_SEED)
@_fuzz_settings(LOAD_EXAMPLES // 2)
@given(data=st.data())
def test_mutated_sweep_is_refused_by_key_or_expands_to_loadable_variants(data):
    from simheat.batch.expand import assignments, expand
    from simheat.batch.spec import parse_sweep
    from simheat.batch.variant import variant_text

    text, record = mutated_text(data, most=2, bases=SWEEP_BASES)
    data.draw(st.just(record), label="record")
    try:
        spec = parse_sweep(text, origin="fuzz_sweep.toml", base_dir=SCENARIOS)
    except ScenarioError as exc:
        _check_scenario_error(exc)
        event("sweep refused")
        return
    for parameter in spec.parameters:  # the sweep file stores them as strict JSON
        json.dumps(parameter.values, allow_nan=False)
        if parameter.distribution is not None:
            json.dumps(parameter.distribution.args, allow_nan=False)
    for variant in expand(spec)[:SWEEP_VARIANTS_LOADED]:
        try:
            parse_scenario(variant_text(spec.base_text, assignments(spec, variant)))
        except ScenarioError as exc:
            _check_scenario_error(exc)
            event("variant refused")
            return
    event("sweep expanded, variants load")


CLI_COMMANDS = (
    ["run", "--json", "--out", "{out}"],
    ["flows", "--json"],
    ["layouts", "--json"],
    ["check", "--json"],
    ["balance", "--json"],
    ["compare", "--json", "--out", "{out}"],
    ["throttle", "--emitter", "all", "--opening", "0.5", "--json", "--out", "{out}"],
    ["report", "--json", "--out", "{out}"],
    ["readiness", "--json"],
)
# Commands that read something other than a scenario, fuzzed elsewhere.
NOT_SCENARIO_COMMANDS = {
    "plot": "reads run files: tests/runs/test_damaged_run_files.py",
    "sweep": "reads sweep files: the sweep property above",
}


@seed(FUZZ_SEED)
@_fuzz_settings(CLI_EXAMPLES, HealthCheck.function_scoped_fixture)
@given(data=st.data())
def test_mutated_scenario_on_the_command_line_is_one_line_or_strict_json(
    data, tmp_path
):
    text, record = mutated_text(data)
    command = data.draw(st.sampled_from(CLI_COMMANDS), label="command")
    data.draw(st.just(record), label="record")
    # tmp_path is shared by every example: each gets a folder of its own, so
    # an earlier example's outputs never turn this one into a refusal
    folder = Path(tempfile.mkdtemp(dir=tmp_path))
    path = folder / "fuzz.toml"
    path.write_text(text, encoding="utf-8")
    extra = [a.format(out=folder / "out") for a in command[1:]]
    result = CliRunner().invoke(main, [command[0], str(path), *extra])
    event(f"{command[0]}: exit {result.exit_code}")
    assert "Traceback" not in result.output
    if result.exit_code == 0:
        _strict(result.stdout)
        return
    assert result.exit_code in (1, 2), (result.exit_code, result.output[-400:])
    assert result.stderr.count("\n") == 1, result.stderr
    assert not result.stderr.startswith("internal error"), result.stderr
    assert "pass --overwrite" not in result.stderr, result.stderr


def test_every_command_is_fuzzed():
    # A command added to the CLI (by any branch) must join the command-line
    # property, or say here what it reads instead of a scenario.
    from simheat.cli import COMMANDS

    fuzzed = {command[0] for command in CLI_COMMANDS}
    assert set(COMMANDS) == fuzzed | set(NOT_SCENARIO_COMMANDS)
    assert not fuzzed & set(NOT_SCENARIO_COMMANDS)


def test_the_bundled_files_are_found():
    assert {"bungalow", "two_storey", "terrace"} <= set(HOUSES)
    assert len(SWEEPS) >= 2


@pytest.mark.parametrize("house", HOUSES)
def test_the_unmutated_bases_load(house):
    # The fuzz starts from valid houses: a base that no longer loads would turn
    # every example into a refusal and test nothing.
    parse_scenario(tomlkit.dumps(copy.deepcopy(BASES[house])), origin="base.toml")
