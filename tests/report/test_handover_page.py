"""The hand-over page: escaped, self-contained, every section, optional analyses."""

from __future__ import annotations

import re
from html.parser import HTMLParser

import pytest
from hostile_house import HOSTILE_DESCRIPTION, HOSTILE_NAME, HOSTILE_ROOM

import simheat.analysis.handover as handover_module
from simheat.analysis.handover import available_analyses
from simheat.report import CAUTION
from simheat.report.html import handover_html, write_html


class Collector(HTMLParser):
    """Tags, attributes and text of a page, as a browser's parser sees them."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict]] = []
        self.text: list[str] = []
        self._open: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        self._open.append(tag)

    def handle_endtag(self, tag):
        if tag in self._open:
            while self._open.pop() != tag:
                pass

    def handle_data(self, data):
        self.text.append(data)


@pytest.fixture(scope="module")
def parsed(hostile_page):
    collector = Collector()
    collector.feed(hostile_page)
    return collector


def test_no_script_and_no_injected_element(parsed):
    tags = {tag for tag, _ in parsed.tags}
    assert "script" not in tags
    assert "img" not in tags
    assert "b" not in tags  # the description's <b> stays text
    handlers = [
        name for _, attrs in parsed.tags for name in attrs if name.startswith("on")
    ]
    assert handlers == []


def test_hostile_strings_arrive_as_text(parsed, hostile_page):
    text = "".join(parsed.text)
    for hostile in (HOSTILE_NAME, HOSTILE_DESCRIPTION, HOSTILE_ROOM):
        assert hostile in text
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in hostile_page
    assert "&#34;" in hostile_page or "&quot;" in hostile_page  # quotes escaped


def test_page_loads_nothing_from_outside(parsed, hostile_page):
    sources = [
        value
        for _, attrs in parsed.tags
        for name, value in attrs.items()
        if name in ("src", "href", "xlink:href", "data")
    ]
    assert all(value.startswith("#") for value in sources), sources
    # The only absolute URLs are XML namespace names (never fetched).
    for match in re.finditer(r"https?://[^\s\"'<>)]+", hostile_page):
        before = hostile_page[max(0, match.start() - 20) : match.start()]
        assert "xmlns" in before, match.group(0)
    policy = [
        attrs["content"]
        for tag, attrs in parsed.tags
        if tag == "meta" and attrs.get("http-equiv") == "Content-Security-Policy"
    ]
    assert policy == ["default-src 'none'; style-src 'unsafe-inline'; img-src data:"]


def test_ids_are_unique_on_the_page(parsed):
    ids = [attrs["id"] for _, attrs in parsed.tags if "id" in attrs]
    assert len(ids) == len(set(ids))


def test_every_section_is_there(parsed, hostile_handover):
    ids = {attrs.get("id") for _, attrs in parsed.tags}
    assert {"house", "compared", "caution-top", "caution-end"} <= ids
    for item in hostile_handover.schemes:
        assert f"scheme-{item.scheme}" in ids


def test_cautions_open_and_close_the_page(hostile_page):
    assert hostile_page.count(CAUTION) == 2
    assert hostile_page.index(CAUTION) < hostile_page.index('id="house"')


def test_figures_are_inline_svg(parsed, hostile_handover):
    svgs = [attrs for tag, attrs in parsed.tags if tag == "svg"]
    # comparison + schematic, warm-up and pressure per scheme
    assert len(svgs) == 1 + 3 * len(hostile_handover.schemes)


def _rows_of_section(page: str, anchor: str, caption_start: str) -> int:
    section = page[page.index(f'id="{anchor}"') :]
    table = section[section.index(caption_start) :]
    body = table[table.index("<tbody>") : table.index("</tbody>")]
    return body.count("<tr")


def test_radiator_and_pipe_schedules_list_everything(hostile_page, hostile_handover):
    for item in hostile_handover.schemes:
        anchor = f"scheme-{item.scheme}"
        n_emitters = len(item.run.scenario.emitters)
        assert _rows_of_section(hostile_page, anchor, "In route order") == n_emitters
        assert _rows_of_section(hostile_page, anchor, "Every pipe") == len(item.pipes)


def test_print_stylesheet_sets_a4(hostile_page):
    assert "@page { size: A4;" in hostile_page
    assert "@media print" in hostile_page


def test_page_is_written_atomically_and_never_replaced(tmp_path, hostile_page):
    path = write_html(hostile_page, tmp_path / "r.html")
    assert path.read_text(encoding="utf-8") == hostile_page
    with pytest.raises(FileExistsError):
        write_html("other", path)
    assert path.read_text(encoding="utf-8") == hostile_page
    write_html("other", path, overwrite=True)
    assert path.read_text(encoding="utf-8") == "other"
    assert [p.name for p in tmp_path.iterdir()] == ["r.html"]


def test_optional_analyses_are_found_by_their_module(monkeypatch):
    monkeypatch.setattr(
        handover_module,
        "OPTIONAL_ANALYSES",
        {"present": "json", "absent": "simheat.analysis.no_such_analysis"},
    )
    assert available_analyses() == ("present",)


def test_check_and_balance_sections_are_on_the_page(hostile_handover, hostile_page):
    from simheat.report.balance import scheme_balance_dict

    assert set(hostile_handover.analyses) == {"check", "balance"}
    n_schemes = len(hostile_handover.schemes)
    assert hostile_page.count("<h3>Findings and fixes (check)</h3>") == n_schemes
    assert hostile_page.count("<h3>Commissioning table (balance)</h3>") == n_schemes
    for item in hostile_handover.schemes:
        section = hostile_page[hostile_page.index(f'id="scheme-{item.scheme}"') :]
        section = section[section.index("Commissioning table") :]
        data = scheme_balance_dict(item.extras["balance"])
        for valve in data["valves"]:
            pct = f"{valve['verified_flow_pct_of_target']:.1f} %"
            assert f"<td>{valve['emitter']}</td>" in section
            assert pct in section


def test_without_the_optional_analyses_their_sections_are_left_out(hostile_handover):
    import dataclasses

    bare = dataclasses.replace(
        hostile_handover,
        schemes=tuple(
            dataclasses.replace(s, extras={}) for s in hostile_handover.schemes
        ),
        analyses=(),
    )
    page = handover_html(bare, generated="x")
    assert "Findings and fixes" not in page
    assert "Commissioning table" not in page
    assert "Valve settings are those of the scenario: not balanced." in page


def test_a_refusal_is_reported_in_its_section(hostile_handover):
    import dataclasses

    from simheat.analysis.handover import Refused

    first = dataclasses.replace(
        hostile_handover.schemes[0],
        extras={"balance": Refused("pump: cannot give 30 kPa at 0.5 m3/h")},
    )
    changed = dataclasses.replace(hostile_handover, schemes=(first,))
    page = handover_html(changed, generated="x")
    assert "Not balanced: pump: cannot give 30 kPa at 0.5 m3/h" in page


def test_an_analysis_with_a_section_is_laid_out(monkeypatch, hostile_handover):
    import dataclasses

    from simheat.report.html import context

    monkeypatch.setitem(
        context.EXTRA_SECTIONS,
        "demo",
        lambda result: {
            "title": "Demo findings",
            "tables": [{"caption": "c", "head": ["a"], "rows": [[result]]}],
        },
    )
    first = dataclasses.replace(
        hostile_handover.schemes[0], extras={"demo": "<i>value</i>"}
    )
    changed = dataclasses.replace(
        hostile_handover, schemes=(first, *hostile_handover.schemes[1:])
    )
    page = handover_html(changed, generated="x")
    assert "<h3>Demo findings</h3>" in page
    assert "&lt;i&gt;value&lt;/i&gt;" in page


def test_a_starving_radiator_never_reads_90_percent(hostile_handover):
    import dataclasses

    from simheat.report.html.context import radiator_rows

    item = hostile_handover.schemes[0]
    first = item.radiators[0]
    nearly = dataclasses.replace(
        first, verified_flow_kg_s=0.897 * first.design_flow_kg_s, starving=True
    )
    changed = dataclasses.replace(item, radiators=(nearly, *item.radiators[1:]))
    (row,) = [r for r in radiator_rows(changed) if r["cells"][0] == first.id]
    assert row["starving"]
    assert row["cells"][6] == "89.7 %"


def test_the_page_says_how_the_morning_starts(parsed, hostile_scenario):
    # The bungalow's night: heating off at its off_from, the house cooling until
    # start_clock; a scenario that gives its rooms' temperatures has no night.
    from hostile_house import hostile_bungalow_text

    from simheat.report.html.context import _night_fact
    from simheat.scenario import parse_scenario

    text = " ".join(parsed.text)
    assert "Before the morning" in text
    assert "heating off from 22:00: the house cools" in text
    assert "until 05:00" in text
    given = parse_scenario(
        hostile_bungalow_text()
        .replace('off_from = "22:00"', "")
        .replace("[simulation]\n", "[simulation]\ninitial_air_temp_C = 15.0\n", 1),
        "given.toml",
    )
    assert given.schedule.off_clock_s is None
    assert _night_fact(given) == (
        "rooms and water from the temperatures the scenario gives"
    )
