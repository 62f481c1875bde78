"""Every callable documents each of its parameters, with a unit.

STYLE.md section 3: numpydoc ``Parameters`` sections in which every parameter's
entry carries its unit in brackets (``[Pa]``, ``[kg/s]``; ``[-]`` when it has
none). This walks every simheat module -- the ``_kernels`` modules too, whose
compiled functions are the package's internal API -- and checks each function,
each class's constructor and each method whose name does not start with ``_``;
numba dispatchers are read through ``py_func``. A record class (dataclass or
named tuple) may document its fields under ``Attributes`` instead.
"""

import dataclasses
import importlib
import inspect
import pkgutil
import re

import pytest

import simheat

# A unit in brackets: not a subscript or type argument (``names[i]``,
# ``list[str]``: a word character before the bracket), not a citation (``[1]_``).
UNIT = re.compile(r"(?<!\w)\[(?!\d+\])[^\[\]]+\](?!_)")


def _modules():
    names = [info.name for info in pkgutil.walk_packages(simheat.__path__, "simheat.")]
    for name in sorted(["simheat", *names]):
        yield importlib.import_module(name)


def _own_constructor(cls) -> bool:
    return "__init__" in vars(cls) or "__new__" in vars(cls)


def _callables():
    """Yield (dotted name, function or class) for everything the test checks."""
    for module in _modules():
        for name, obj in vars(module).items():
            obj = inspect.unwrap(getattr(obj, "py_func", obj))
            if name.startswith("_") or getattr(obj, "__module__", None) != (
                module.__name__
            ):
                continue  # private, or imported from elsewhere
            key = f"{module.__name__}.{name}"
            if inspect.isfunction(obj):
                yield key, obj
            elif inspect.isclass(obj):
                if _own_constructor(obj):
                    yield key, obj
                for attr, member in vars(obj).items():
                    member = getattr(member, "__func__", member)  # static/classmethod
                    if not attr.startswith("_") and inspect.isfunction(member):
                        yield f"{key}.{attr}", member


def _is_record(cls) -> bool:
    return dataclasses.is_dataclass(cls) or (
        issubclass(cls, tuple) and hasattr(cls, "_fields")
    )


def _parameters(obj) -> list[str]:
    """Signature parameters (a class: its constructor's), without self/cls."""
    return [
        name
        for name in inspect.signature(obj).parameters
        if name not in ("self", "cls")
    ]


def _entries(doc: str, sections: tuple[str, ...]) -> dict[str, str]:
    """Map each parameter named in ``sections`` to its entry's description.

    An entry opens with an unindented ``name : type`` line (several names may
    share it: ``from_node, to_node : ndarray``) and runs over the indented lines
    that follow it.
    """
    lines = inspect.cleandoc(doc).splitlines()
    entries: dict[str, list[str]] = {}
    in_section = False
    description: list[str] | None = None
    for line, underline in zip(lines, [*lines[1:], ""], strict=True):
        stripped = line.strip()
        if stripped and set(underline.strip()) == {"-"}:  # a section header
            in_section = stripped in sections
            description = None
        elif not in_section or set(stripped) == {"-"}:
            continue
        elif line and not line[0].isspace():
            description = []
            for name in line.partition(":")[0].split(","):
                entries[name.strip().lstrip("*")] = description
        elif description is not None:
            description.append(line)
    return {name: "\n".join(text) for name, text in entries.items()}


def _problems(obj) -> dict[str, list[str]]:
    """Parameters of ``obj`` that are undocumented, or documented without a unit."""
    sections = ("Parameters", "Other Parameters")
    if inspect.isclass(obj) and _is_record(obj):
        sections += ("Attributes",)
    entries = _entries(inspect.getdoc(obj) or "", sections)
    problems: dict[str, list[str]] = {"undocumented": [], "no [unit]": []}
    for name in _parameters(obj):
        if name not in entries:
            problems["undocumented"].append(name)
        elif not UNIT.search(entries[name]):
            problems["no [unit]"].append(name)
    return {kind: names for kind, names in problems.items() if names}


CALLABLES = dict(_callables())


@pytest.mark.parametrize(
    "name", sorted(name for name, obj in CALLABLES.items() if _parameters(obj))
)
def test_every_parameter_is_documented_with_a_unit(name):
    assert _problems(CALLABLES[name]) == {}


def test_the_walk_reaches_functions_methods_and_classes():
    # guards the walk: an empty walk would leave the test above with nothing to check
    objects = list(CALLABLES.values())
    functions = [obj for obj in objects if inspect.isfunction(obj)]
    assert any("." not in obj.__qualname__ for obj in functions)  # module level
    assert any("." in obj.__qualname__ for obj in functions)  # methods
    assert any(inspect.isclass(obj) and _is_record(obj) for obj in objects)
    assert any(inspect.isclass(obj) and not _is_record(obj) for obj in objects)


def test_the_checker_finds_missing_entries_and_units():
    def sample(length_m, width_m, names, count, depth_m, *rest, **options):
        """Sample.

        Parameters
        ----------
        length_m : float
            Length. [m]
        width_m : float
            Width.
        names : list[str]
            A type argument is not a unit; nor is ``names[0]``.
        count, *rest : int
            Counted as in [1]_.
        **options
            Passed on. [-]

        Returns
        -------
        depth_m : float
            Documented as a return value, not as a parameter. [m]

        References
        ----------
        .. [1] A source.
        """

    assert _problems(sample) == {
        "undocumented": ["depth_m"],
        "no [unit]": ["width_m", "names", "count", "rest"],
    }


def test_records_may_document_fields_as_attributes_other_classes_may_not():
    doc = """A box.

    Attributes
    ----------
    width_m, height_m : float
        Outer size. [m]
    """

    @dataclasses.dataclass
    class Record:
        __doc__ = doc
        width_m: float
        height_m: float

    class Plain:
        __doc__ = doc

        def __init__(self, width_m, height_m):
            pass

    assert _problems(Record) == {}
    assert _problems(Plain) == {"undocumented": ["width_m", "height_m"]}
