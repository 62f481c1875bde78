"""Typed field access with error paths, and the loader's no-crash guarantee.

The property test substitutes JSON-like junk into random places of the valid base
scenario from ``test_load``: the loader must either accept the result or raise
ScenarioError, never another exception.
"""

from __future__ import annotations

import copy
import dataclasses
import re

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from test_load import BASE, render_toml

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario
from simheat.scenario.fields import Table

ORIGIN = "fields.toml"


def table(data: dict, path: str = "rooms[2]") -> Table:
    return Table(data, path, ORIGIN)


def test_non_table_data_is_a_scenario_error():
    with pytest.raises(ScenarioError, match=r"^rooms\[2\]: must be a table, got 3$"):
        table(3)


def test_where_joins_the_path():
    assert table({}).where("height_m") == "rooms[2].height_m"


def test_where_at_top_level_is_the_key():
    assert table({}, "").where("design") == "design"


def test_missing_required_key():
    with pytest.raises(
        ScenarioError,
        match=re.escape(f"rooms[2].height_m: required key is missing ({ORIGIN})"),
    ):
        table({}).number("height_m")


def test_default_is_returned_for_missing_key():
    assert table({}).number("height_m", 2.5) == 2.5


@pytest.mark.parametrize(
    ("value", "bounds", "problem"),
    [
        (-12, {"positive": True}, "must be > 0, got -12"),
        (-0.5, {"non_negative": True}, "must be >= 0, got -0.5"),
        (4.0, {"low": 5.0}, "must be >= 5, got 4"),
        (31.0, {"high": 30.0}, "must be <= 30, got 31"),
        (float("nan"), {}, "must be finite, got nan"),
        (10**400, {}, "must be finite, got 1000"),
        ("3", {}, "must be a number, got '3'"),
        (False, {}, "must be a number, got False"),
    ],
)
def test_number_rejects(value, bounds, problem):
    pattern = "^" + re.escape(f"rooms[2].x: {problem}")
    with pytest.raises(ScenarioError, match=pattern):
        table({"x": value}).number("x", **bounds)


def test_number_accepts_integer_as_float():
    value = table({"x": 3}).number("x", positive=True)
    assert (value, type(value)) == (3.0, float)


@pytest.mark.parametrize(
    ("value", "where", "problem"),
    [
        ([1.0], "x", "must be a list of at least 2 numbers, got [1.0]"),
        ("1, 2", "x", "must be a list of at least 2 numbers, got '1, 2'"),
        ([1.0, True], "x[1]", "must be a number, got True"),
        ([1.0, float("inf")], "x[1]", "must be finite, got inf"),
    ],
)
def test_numbers_rejects(value, where, problem):
    pattern = "^" + re.escape(f"rooms[2].{where}: {problem}")
    with pytest.raises(ScenarioError, match=pattern):
        table({"x": value}).numbers("x", min_len=2)


def test_integer_below_bound():
    with pytest.raises(
        ScenarioError, match=re.escape("rooms[2].floor: must be >= -5, got -6")
    ):
        table({"floor": -6}).integer("floor", low=-5)


def test_text_outside_choices_lists_them():
    pattern = re.escape("rooms[2].mass_class: must be one of heavy, light, got 'lead'")
    with pytest.raises(ScenarioError, match=pattern):
        table({"mass_class": "lead"}).text("mass_class", choices={"light", "heavy"})


def test_tables_gives_indexed_paths():
    tees = table({"tees": [{}, {}]}).tables("tees")
    assert [t.path for t in tees] == ["rooms[2].tees[0]", "rooms[2].tees[1]"]


def test_reject_unknown_names_the_first_unread_key():
    t = table({"height_m": 2.5, "zz": 1, "hieght_m": 2.4})
    t.number("height_m")
    pattern = re.escape(
        "rooms[2].hieght_m: unknown key (check the spelling and the unit)"
    )
    with pytest.raises(ScenarioError, match=f"^{pattern}; did you mean 'height_m'"):
        t.reject_unknown()


def test_reject_unknown_passes_when_every_key_was_read():
    t = table({"height_m": 2.5})
    t.number("height_m")
    t.reject_unknown()
    assert t.number("height_m") == 2.5


# --- property: junk never crashes the loader ----------------------------------------


def _places(node, prefix=()):
    """Every key path and list index in ``node``, depth first."""
    items = node.items() if isinstance(node, dict) else enumerate(node)
    for key, value in items:
        yield (*prefix, key)
        if isinstance(value, dict | list):
            yield from _places(value, (*prefix, key))


PLACES = list(_places(BASE))

_text = st.text(
    alphabet=st.characters(blacklist_categories=("Cs",)), max_size=12
) | st.sampled_from(["living", "rad_bed", "trv", "cu_15x1", "05:00", "direct_return"])
# Numbers are weighted up: most fields are numeric, and extremes find overflow.
_number = (
    st.integers()
    | st.integers(min_value=-(2**80), max_value=2**80).map(lambda i: i * 2**80)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.sampled_from([0, -1, 1e-300, 1e300, -1e300, 1.7e308, 2**63, 10**30])
)
_scalar = st.booleans() | _text | _number | _number
JUNK = _number | st.recursive(
    _scalar,
    lambda inner: (
        st.lists(inner, max_size=4) | st.dictionaries(_text, inner, max_size=4)
    ),
    max_leaves=10,
)
DELETE = object()
EDITS = st.lists(
    st.tuples(st.sampled_from(PLACES), JUNK | st.just(DELETE)), min_size=1, max_size=3
)


def _edited(edits) -> str:
    """BASE with junk edits applied, as TOML text."""
    document = copy.deepcopy(BASE)
    for place, value in edits:
        parent = document
        try:
            for step in place[:-1]:
                parent = parent[step]
            if value is DELETE:
                del parent[place[-1]]
            else:
                parent[place[-1]] = value
        except (KeyError, IndexError, TypeError):
            continue  # an earlier edit removed or replaced this place
    return render_toml(document)


def _numbers_of(obj):
    """Every float and array value in a scenario's dataclasses, recursively."""
    if dataclasses.is_dataclass(obj):
        for field in dataclasses.fields(obj):
            yield from _numbers_of(getattr(obj, field.name))
    elif isinstance(obj, tuple):
        for item in obj:
            yield from _numbers_of(item)
    elif isinstance(obj, float | np.ndarray):
        yield obj


@settings(max_examples=100, deadline=None)
@given(edits=EDITS)
def test_junk_values_raise_only_scenario_error(edits):
    try:
        parse_scenario(_edited(edits), origin=ORIGIN)
    except ScenarioError as exc:
        assert ORIGIN in str(exc)  # noqa: PT017 - every message names the file


@settings(max_examples=100, deadline=None)
@given(edits=EDITS)
def test_accepted_junk_gives_only_finite_numbers(edits):
    try:
        scenario = parse_scenario(_edited(edits), origin=ORIGIN)
    except ScenarioError:
        return
    assert all(np.all(np.isfinite(v)) for v in _numbers_of(scenario))
