"""The hand-over page in a real headless Chromium: loads clean, renders, prints A4.

Chromium comes from the system's packages (Debian ``chromium``). CI installs it
(``.ci/run``) and sets ``CI``: there a missing browser fails this module loudly.
On a developer's machine without it the module is skipped with the install
command.
"""

from __future__ import annotations

import io
import os
import re

import numpy as np
import pytest
from devtools_pipe import INSTALL_HINT, Browser, find_chromium

from simheat.report.html import write_html

SCREEN = (1280, 900)  # CSS px
A4_PX = (794, 1123)  # A4 at 96 CSS px per inch: 210 x 297 mm
A4_PT = (595.28, 841.89)  # A4 in PDF points (ISO 216)

CHROMIUM = find_chromium()
if CHROMIUM is None:
    message = f"Chromium not found; install it with: {INSTALL_HINT}"
    if os.environ.get("CI"):
        pytest.fail(f"required in CI: {message}", pytrace=False)
    pytest.skip(message, allow_module_level=True)


@pytest.fixture(scope="module")
def browser(tmp_path_factory, hostile_page):
    path = write_html(hostile_page, tmp_path_factory.mktemp("page") / "report.html")
    b = Browser(CHROMIUM)
    try:
        b.load(path.as_uri())
        yield b
    finally:
        b.close()


def _pixels(png: bytes) -> np.ndarray:
    from matplotlib.image import imread

    return imread(io.BytesIO(png), format="png")[..., :3]


def _assert_not_blank(png: bytes, size: tuple[int, int]) -> None:
    rgb = _pixels(png)
    assert rgb.shape[:2] == (size[1], size[0])
    ink = np.any(rgb < 0.85, axis=-1)  # anything visibly darker than the paper
    # A blank or failed page is one flat colour; a rendered page has text, rules
    # and the caution box: well over 1 % of the pixels carry ink.
    assert ink.mean() > 0.01
    assert len(np.unique((rgb * 255).astype(np.uint8).reshape(-1, 3), axis=0)) > 50


def test_page_loads_without_console_errors(browser):
    assert browser.console_errors() == []


def test_screen_screenshot_is_not_blank(browser):
    _assert_not_blank(browser.screenshot(*SCREEN), SCREEN)


def test_print_a4_screenshot_is_not_blank(browser):
    _assert_not_blank(browser.screenshot(*A4_PX, media="print"), A4_PX)


def test_print_to_pdf_gives_a4_pages(browser):
    pdf = browser.pdf()
    assert pdf.startswith(b"%PDF")
    boxes = re.findall(rb"/MediaBox\s*\[\s*0\s+0\s+([\d.]+)\s+([\d.]+)\s*\]", pdf)
    assert len(boxes) >= 3  # cover, comparison, a page per scheme at least
    for width, height in boxes:
        # Chromium rounds the page to whole CSS pixels: within 1.5 pt of A4.
        assert float(width) == pytest.approx(A4_PT[0], abs=1.5)
        assert float(height) == pytest.approx(A4_PT[1], abs=1.5)
    assert browser.console_errors() == []


def test_the_page_really_is_checked(browser):
    # The browser sees the page's own text: the hostile name, escaped, as text.
    result = browser.call(
        "Runtime.evaluate",
        {"expression": "document.querySelector('h1').textContent"},
        session=True,
    )
    assert result["result"]["value"].startswith('Villa "<script>')
    scripts = browser.call(
        "Runtime.evaluate",
        {"expression": "document.scripts.length"},
        session=True,
    )
    assert scripts["result"]["value"] == 0
