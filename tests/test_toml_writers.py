"""Each TOML writer has one job and one home (DEVELOPERS.md, Conventions).

tomlkit changes a user's scenario text keeping comments and layout, in
simheat/scenario/edits.py only; tomli-w writes a sweep variant's generated text
from a dict, in simheat/batch/variant.py only.
"""

import ast
import tomllib
from pathlib import Path

import simheat
from simheat.batch.variant import variant_text
from simheat.scenario.edits import ScenarioEdit, edited_text

PACKAGE = Path(simheat.__file__).parent
HOMES = {"tomlkit": "scenario/edits.py", "tomli_w": "batch/variant.py"}


def _importers(library: str) -> set[str]:
    found = set()
    for path in PACKAGE.rglob("*.py"):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Import):
                names = [alias.name for alias in node.names]
            elif isinstance(node, ast.ImportFrom) and node.level == 0:
                names = [node.module or ""]
            else:
                continue
            if any(n == library or n.startswith(library + ".") for n in names):
                found.add(path.relative_to(PACKAGE).as_posix())
    return found


def test_each_toml_writer_is_imported_by_its_one_module():
    assert {lib: _importers(lib) for lib in HOMES} == {
        lib: {home} for lib, home in HOMES.items()
    }


TEXT = """# the house
[source]
flow_temp_C = 60.0  # set on the boiler
"""


def test_an_edit_keeps_the_comments_a_variant_text_drops_them():
    edited = edited_text(TEXT, [ScenarioEdit(("source", "flow_temp_C"), 65.0)])
    assert edited == TEXT.replace("60.0", "65.0")
    variant = variant_text(TEXT, ((("source", "flow_temp_C"), "set", 65.0),))
    assert "#" not in variant
    assert tomllib.loads(variant) == tomllib.loads(edited)
