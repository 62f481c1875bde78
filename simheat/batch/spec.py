"""Sweep files (TOML): read and check them before anything runs.

A sweep names a base scenario, the mode of expansion and the parameters::

    base = "two_storey.toml"            # relative to the sweep file
    schemes = ["direct_return", "reverse_return"]   # optional: one more dimension
    mode = "grid"                       # grid | zip | random

    [[parameters]]
    key = "pump.head_kPa"
    scale = [0.8, 1.0, 1.2]

Every key path must exist in the base scenario and ``scale``/``offset`` must meet
numbers there; any problem is a :class:`~simheat.errors.ScenarioError` naming the
parameter (``parameters[1].key: ...``), raised before a single variant runs.
"""

from __future__ import annotations

import hashlib
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from simheat.batch.keypath import KeyPathError, check_operation, split_key
from simheat.errors import ScenarioError
from simheat.scenario import Scenario, parse_scenario
from simheat.scenario.fields import shown, shown_key
from simheat.scenario.load import read_toml
from simheat.schemes import SCHEME_NAMES

MODES = ("grid", "zip", "random")
SAMPLINGS = ("latin_hypercube", "sobol")
DISTRIBUTIONS = ("uniform", "normal", "choice")
LIST_SOURCES = ("values", "range")
# Most variants one sweep may expand to: far above an overnight run, low enough to
# catch a range with a step typed in the wrong unit. [-]
MAX_VARIANTS = 100_000
_TOP_KEYS = {
    "name",
    "description",
    "base",
    "schemes",
    "mode",
    "samples",
    "seed",
    "sampling",
    "parameters",
}
# Relative slack when a range's last point meets its stop: steps such as 0.1 do
# not add up exactly in binary floating point. [-]
_RANGE_SLACK = 1e-9


@dataclass(frozen=True)
class Distribution:
    """A random source of one parameter's values.

    Attributes
    ----------
    kind : str
        ``"uniform"`` (``args = (low, high)``), ``"normal"`` (``(mean, sd)``) or
        ``"choice"`` (the values to choose from, equally likely). [-]
    args : tuple
        The numbers or choices, in the unit of the parameter. [the key's unit]
    """

    kind: str
    args: tuple


@dataclass(frozen=True)
class Parameter:
    """One swept parameter.

    Attributes
    ----------
    key : str
        Dotted key path into the base scenario. [-]
    segments : tuple of str
        The key path split into segments. [-]
    operation : str
        ``"set"``, ``"scale"`` (multiply) or ``"offset"`` (add). [-]
    values : tuple or None
        The points of a grid or zip sweep: values set, factors or offsets.
        [the key's unit; - for a factor]
    distribution : Distribution or None
        The source of a random sweep's draws. [-]
    """

    key: str
    segments: tuple[str, ...]
    operation: str
    values: tuple | None
    distribution: Distribution | None


@dataclass(frozen=True)
class SweepSpec:
    """A checked sweep: its text, its base scenario and its parameters.

    Attributes
    ----------
    name : str
        Title (``name`` in the file, else the file's stem). [-]
    origin : str
        Where the sweep text came from (for messages). [-]
    text : str
        The sweep file's TOML text. [-]
    base_origin : str
        Path of the base scenario. [-]
    base_text : str
        The base scenario's TOML text. [-]
    base : Scenario
        The validated base scenario. [-]
    base_data : dict
        The base scenario as parsed TOML (the dict key paths apply to). [-]
    mode : str
        ``"grid"``, ``"zip"`` or ``"random"``. [-]
    schemes : tuple of str
        Schemes every point runs under. [-]
    parameters : tuple of Parameter
        The swept parameters, in file order (also the order they apply in). [-]
    samples : int or None
        Number of random points. [-]
    seed : int
        Seed of the random points. [-]
    sampling : str
        ``"latin_hypercube"`` or ``"sobol"``. [-]
    """

    name: str
    origin: str
    text: str
    base_origin: str
    base_text: str
    base: Scenario
    base_data: dict
    mode: str
    schemes: tuple[str, ...]
    parameters: tuple[Parameter, ...]
    samples: int | None
    seed: int
    sampling: str

    @property
    def content_hash(self) -> str:
        """SHA-256 of the sweep text and the base scenario text (hex).

        A resumed sweep must have the same hash as the one it continues.
        """
        digest = hashlib.sha256()
        for text in (self.text, self.base_text):
            data = text.encode("utf-8")
            digest.update(len(data).to_bytes(8, "little"))
            digest.update(data)
        return digest.hexdigest()

    @property
    def keys(self) -> tuple[str, ...]:
        """Key paths of the parameters, in order."""
        return tuple(p.key for p in self.parameters)


def load_sweep(path: str | Path) -> SweepSpec:
    """Read and check a sweep file and its base scenario.

    Parameters
    ----------
    path : str or Path
        Path of the sweep file (TOML). [-]

    Returns
    -------
    SweepSpec
        The checked sweep.

    Raises
    ------
    ScenarioError
        When the sweep or its base scenario cannot be read or is invalid; the
        message names the field (``parameters[2].key: ...``) and the file.
    """
    path = Path(path)
    if path.is_dir():
        raise ScenarioError(f"{path}: is a directory; give a sweep file (.toml)")
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except OSError as exc:
        raise ScenarioError(
            f"{path}: cannot read sweep file ({exc.strerror or exc})"
        ) from None
    except UnicodeDecodeError:
        raise ScenarioError(f"{path}: not a UTF-8 text file") from None
    return parse_sweep(text, origin=str(path), base_dir=path.parent, stem=path.stem)


def parse_sweep(
    text: str, origin: str = "<text>", base_dir: str | Path = ".", stem: str = "sweep"
) -> SweepSpec:
    """Check sweep text (TOML) and load its base scenario.

    Parameters
    ----------
    text : str
        The sweep's TOML text. [-]
    origin : str
        Name used in messages (usually the file path). [-]
    base_dir : str or Path
        Directory that ``base`` is relative to. [-]
    stem : str
        Default name of the sweep. [-]

    Returns
    -------
    SweepSpec
        The checked sweep.

    Raises
    ------
    ScenarioError
        On malformed TOML, an unknown or invalid field, an invalid base scenario
        or a key path missing from it.
    """
    data = read_toml(text, origin)

    def fail(where: str, problem: str) -> ScenarioError:
        return ScenarioError(f"{where}: {problem} ({origin})")

    unknown = sorted(set(data) - _TOP_KEYS)
    if unknown:
        raise fail(
            shown_key(unknown[0]),
            f"unknown key (known: {', '.join(sorted(_TOP_KEYS))})",
        )
    name = _string(data, "name", stem, fail)
    _string(data, "description", "", fail)
    base_name = _string(data, "base", None, fail)
    base_path = Path(base_dir) / base_name
    if base_path.is_dir():
        raise fail("base", f"{base_path} is a directory, not a scenario file")
    try:
        base_text = base_path.read_bytes().decode("utf-8-sig")
    except OSError as exc:
        raise fail("base", f"cannot read {base_path} ({exc.strerror or exc})") from None
    except UnicodeDecodeError:
        raise fail("base", f"{base_path} is not a UTF-8 text file") from None
    base = parse_scenario(base_text, origin=str(base_path))
    base_data = read_toml(base_text, str(base_path))

    mode = _string(data, "mode", "grid", fail)
    if mode not in MODES:
        raise fail("mode", f"must be one of {', '.join(MODES)}, got {shown(mode)}")
    schemes = _schemes(data, base, fail)
    samples, seed, sampling = _random_settings(data, mode, fail)
    raw_parameters = data.get("parameters")
    if not isinstance(raw_parameters, list) or not raw_parameters:
        raise fail("parameters", "give at least one [[parameters]] table")
    parameters = tuple(
        _parameter(raw, f"parameters[{i}]", mode, base_data, fail)
        for i, raw in enumerate(raw_parameters)
    )
    keys = [p.key for p in parameters]
    for i, key in enumerate(keys):
        if key in keys[:i]:
            raise fail(f"parameters[{i}].key", f"{shown(key)} is swept twice")
    if mode == "zip":
        lengths = {len(p.values) for p in parameters}
        if len(lengths) > 1:
            counts = ", ".join(f"{p.key}: {len(p.values)}" for p in parameters)
            raise fail(
                "parameters", f"zip mode needs equal numbers of values ({counts})"
            )
    spec = SweepSpec(
        name=name,
        origin=origin,
        text=text,
        base_origin=str(base_path),
        base_text=base_text,
        base=base,
        base_data=base_data,
        mode=mode,
        schemes=schemes,
        parameters=parameters,
        samples=samples,
        seed=seed,
        sampling=sampling,
    )
    count = variant_count(spec)
    if count > MAX_VARIANTS:
        raise fail("parameters", f"expands to {count} variants, over {MAX_VARIANTS}")
    return spec


def variant_count(spec: SweepSpec) -> int:
    """Number of variants the sweep expands to (points times schemes).

    Parameters
    ----------
    spec : SweepSpec
        The sweep. [-]

    Returns
    -------
    int
        Variant count. [-]
    """
    if spec.mode == "random":
        points = spec.samples or 0
    elif spec.mode == "zip":
        points = len(spec.parameters[0].values)
    else:
        points = math.prod(len(p.values) for p in spec.parameters)
    return points * len(spec.schemes)


def _string(data: dict, key: str, default: str | None, fail) -> str:
    if key not in data:
        if default is None:
            raise fail(key, "required key is missing")
        return default
    value = data[key]
    if not isinstance(value, str) or not value.strip():
        raise fail(key, f"must be a non-empty string, got {shown(value)}")
    return value


def _schemes(data: dict, base: Scenario, fail) -> tuple[str, ...]:
    if "schemes" not in data:
        return (base.schemes[0],)
    value = data["schemes"]
    if not isinstance(value, list) or not value:
        raise fail(
            "schemes", f"must be a non-empty list of scheme names, got {shown(value)}"
        )
    for i, scheme in enumerate(value):
        if scheme not in SCHEME_NAMES:
            raise fail(
                f"schemes[{i}]",
                f"unknown scheme {shown(scheme)} (known: {', '.join(SCHEME_NAMES)})",
            )
    if len(set(value)) != len(value):
        raise fail("schemes", "a scheme is listed twice")
    return tuple(value)


def _random_settings(data: dict, mode: str, fail) -> tuple[int | None, int, str]:
    if mode != "random":
        for key in ("samples", "seed", "sampling"):
            if key in data:
                raise fail(key, f"only random mode takes it (mode is {shown(mode)})")
        return None, 0, SAMPLINGS[0]
    samples = data.get("samples")
    if samples is None:
        raise fail("samples", "required key is missing (random mode)")
    if isinstance(samples, bool) or not isinstance(samples, int) or samples < 1:
        raise fail("samples", f"must be a whole number >= 1, got {shown(samples)}")
    seed = data.get("seed", 0)
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise fail("seed", f"must be a whole number >= 0, got {shown(seed)}")
    sampling = data.get("sampling", SAMPLINGS[0])
    if sampling not in SAMPLINGS:
        raise fail(
            "sampling", f"must be one of {', '.join(SAMPLINGS)}, got {shown(sampling)}"
        )
    if sampling == "sobol" and samples & (samples - 1):
        raise fail(
            "samples",
            f"Sobol points keep their balance only in powers of 2, got {samples}",
        )
    return samples, seed, sampling


def _is_number(value: Any) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool)


def _parameter(raw: Any, where: str, mode: str, base_data: dict, fail) -> Parameter:
    if not isinstance(raw, dict):
        raise fail(where, f"must be a table, got {shown(raw)}")
    if "key" not in raw:
        raise fail(f"{where}.key", "required key is missing")
    key = raw["key"]
    forms = [k for k in raw if k != "key"]
    known = (*LIST_SOURCES, *DISTRIBUTIONS, "scale", "offset")
    for form in forms:
        if form not in known:
            raise fail(
                f"{where}.{form}", f"unknown key (known: key, {', '.join(known)})"
            )
    if len(forms) != 1:
        raise fail(where, f"give exactly one of {', '.join(known)}, got {len(forms)}")
    form = forms[0]
    try:
        segments = split_key(key)
    except KeyPathError as exc:
        raise fail(f"{where}.key", str(exc)) from None
    operation = form if form in ("scale", "offset") else "set"
    try:
        check_operation(base_data, segments, operation)
    except KeyPathError as exc:
        raise fail(f"{where}.key", f"{shown(key)}: {exc}") from None
    if operation == "set":
        source, source_where, bare_list = raw, where, False
    else:
        source_where = f"{where}.{form}"
        inner = raw[form]
        source = {"values": inner} if isinstance(inner, list) else inner
        bare_list = isinstance(inner, list)
        if not isinstance(source, dict) or len(source) != 1:
            raise fail(
                source_where,
                "must be a list of numbers or a table with one of "
                f"{', '.join((*LIST_SOURCES, *DISTRIBUTIONS))}",
            )
        for name in source:
            if name not in (*LIST_SOURCES, *DISTRIBUTIONS):
                raise fail(f"{source_where}.{name}", "unknown key")
    (kind,) = (k for k in source if k != "key")
    # Where to point a message: the list itself when scale/offset got a bare list.
    spot = source_where if bare_list else f"{source_where}.{kind}"
    values, distribution = None, None
    if kind in LIST_SOURCES:
        if mode == "random":
            raise fail(spot, "random mode needs uniform, normal or choice")
        values = (
            _values(source[kind], spot, fail)
            if kind == "values"
            else _range(source[kind], spot, fail)
        )
        if operation != "set" and not all(_is_number(v) for v in values):
            raise fail(spot, f"{operation} takes numbers, got {shown(values)}")
    else:
        if mode != "random":
            raise fail(
                spot, f"a distribution needs mode = 'random' (mode is {shown(mode)})"
            )
        distribution = _distribution(kind, source[kind], spot, fail)
        if operation != "set" and kind == "choice":
            if not all(_is_number(v) for v in distribution.args):
                raise fail(
                    spot, f"{operation} takes numbers, got {shown(distribution.args)}"
                )
    return Parameter(
        key=key,
        segments=segments,
        operation=operation,
        values=values,
        distribution=distribution,
    )


def _values(value: Any, where: str, fail) -> tuple:
    if not isinstance(value, list) or not value:
        raise fail(where, f"must be a non-empty list, got {shown(value)}")
    # NaN or an infinity, even inside a table value, would reach the variants
    # and the sweep file's strict JSON: refused here, by position
    spot = _non_finite(value)
    if spot is not None:
        raise fail(f"{where}{spot[0]}", f"must be finite, got {spot[1]}")
    return tuple(value)


def _non_finite(value: Any, at: str = "") -> tuple[str, float] | None:
    """Where in ``value`` (lists and tables walked) a NaN or infinity sits."""
    if isinstance(value, float):
        return None if math.isfinite(value) else (at, value)
    items = ()
    if isinstance(value, list):
        items = ((f"{at}[{i}]", v) for i, v in enumerate(value))
    elif isinstance(value, dict):
        items = ((f"{at}.{shown_key(k)}", v) for k, v in value.items())
    for where, inner in items:
        found = _non_finite(inner, where)
        if found is not None:
            return found
    return None


def _range(value: Any, where: str, fail) -> tuple:
    if not isinstance(value, dict) or set(value) != {"start", "stop", "step"}:
        raise fail(where, "must be a table { start = ..., stop = ..., step = ... }")
    start, stop, step = value["start"], value["stop"], value["step"]
    for name, number in (("start", start), ("stop", stop), ("step", step)):
        if not _is_number(number) or not math.isfinite(number):
            raise fail(
                f"{where}.{name}", f"must be a finite number, got {shown(number)}"
            )
    if step <= 0:
        raise fail(f"{where}.step", f"must be > 0, got {shown(step)}")
    if stop < start:
        raise fail(
            f"{where}.stop", f"must be >= start ({shown(start)}), got {shown(stop)}"
        )
    count = int(math.floor((stop - start) / step * (1.0 + _RANGE_SLACK) + _RANGE_SLACK))
    if count + 1 > MAX_VARIANTS:
        raise fail(where, f"gives {count + 1} values, over {MAX_VARIANTS}")
    whole = all(isinstance(v, int) for v in (start, stop, step))
    if whole:
        return tuple(start + i * step for i in range(count + 1))
    # Round off the binary remainder of repeated steps (0.1 * 3 -> 0.3).
    return tuple(round(start + i * step, 12) for i in range(count + 1))


def _distribution(kind: str, value: Any, where: str, fail) -> Distribution:
    if kind == "choice":
        return Distribution(kind, _values(value, where, fail))
    if (
        not isinstance(value, list)
        or len(value) != 2
        or not all(_is_number(v) and math.isfinite(v) for v in value)
    ):
        raise fail(where, f"must be a list of two finite numbers, got {shown(value)}")
    first, second = float(value[0]), float(value[1])
    if kind == "uniform" and not first < second:
        raise fail(where, f"needs low < high, got {shown(value)}")
    if kind == "normal" and not second > 0:
        raise fail(where, f"needs a standard deviation > 0, got {shown(second)}")
    return Distribution(kind, (first, second))
