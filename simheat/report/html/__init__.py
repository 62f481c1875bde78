"""The hand-over report: one self-contained HTML page of a house and its schemes.

:func:`handover_html` lays out a :class:`~simheat.analysis.handover.Handover`
(computed and verified by :func:`~simheat.analysis.handover.build_handover`) with
the Jinja2 template shipped in ``templates/``: autoescaping is on, so every
string from the scenario (names, ids, description) is HTML-escaped; only the
figures, SVG written and escaped by matplotlib, are inserted as markup. The page
needs no other file and loads nothing: the stylesheet is inline, the figures are
inline SVG, and a content security policy forbids every fetch. A print
stylesheet lays it out on A4. :func:`write_html` writes it atomically.

Jinja2 is imported on first use, so importing this package stays light.
"""

from __future__ import annotations

from datetime import UTC, datetime
from importlib import resources
from pathlib import Path
from typing import TYPE_CHECKING

from simheat.files import write_text

if TYPE_CHECKING:
    from simheat.analysis.handover import Handover

TEMPLATE = "handover.html.j2"
STYLESHEET = "handover.css"

__all__ = ["handover_html", "write_html"]


def _environment():
    from jinja2 import Environment, PackageLoader, StrictUndefined

    return Environment(
        loader=PackageLoader("simheat.report.html", "templates"),
        autoescape=True,
        undefined=StrictUndefined,
        keep_trailing_newline=True,
    )


def handover_html(handover: Handover, generated: str | None = None) -> str:
    """The hand-over page of a house as HTML text.

    Parameters
    ----------
    handover : Handover
        What the report states (:func:`simheat.analysis.handover.build_handover`). [-]
    generated : str, optional
        When the page was made, as printed on it; now (UTC) by default. [-]

    Returns
    -------
    str
        The whole page: inline stylesheet, inline SVG figures, no script.
    """
    from simheat import __version__
    from simheat.report.html.context import page_context

    if generated is None:
        generated = datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
    context = page_context(handover, generated, __version__)
    stylesheet = (
        resources.files("simheat.report.html")
        .joinpath("templates", STYLESHEET)
        .read_text(encoding="utf-8")
    )
    template = _environment().get_template(TEMPLATE)
    return template.render(stylesheet=stylesheet, **context)


def write_html(text: str, path: str | Path, *, overwrite: bool = False) -> Path:
    """Write a page to ``path`` through a temporary name; never replace silently.

    Parameters
    ----------
    text : str
        The page. [-]
    path : str or Path
        Where to write it. [-]
    overwrite : bool, optional
        Replace an existing file. [-]

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    FileExistsError
        When ``path`` exists and ``overwrite`` is false (``filename`` is the
        path; the file is left as it was).
    OutputError
        When the folder cannot be written.

    Notes
    -----
    Written through :func:`simheat.files.write_text`: a temporary name of ours,
    then a rename.
    """
    return write_text(text, path, overwrite=overwrite)
