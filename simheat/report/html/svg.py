"""Figures inline as SVG: one self-contained ``<svg>`` element per figure.

A page holds many figures; matplotlib names the elements of each SVG with ids
(glyphs, clip paths, artists' gids) that repeat from figure to figure. Every id
and every reference to one is prefixed with the figure's own prefix, so ids stay
unique on the page and each figure refers only to its own definitions. The XML
declaration, the document type, the metadata block and comments are dropped
(matplotlib writes the text of every label in a comment).
"""

from __future__ import annotations

import io
import re
from typing import TYPE_CHECKING

from markupsafe import Markup

if TYPE_CHECKING:
    from matplotlib.figure import Figure

_HEAD = re.compile(r"^.*?(?=<svg)", re.DOTALL)
_COMMENT = re.compile(r"<!--.*?-->", re.DOTALL)
_METADATA = re.compile(r"<metadata>.*?</metadata>", re.DOTALL)
_ID = re.compile(r'\bid="([^"]*)"')
_URL = re.compile(r"url\(#([^)]*)\)")
_HREF = re.compile(r'href="#([^"]*)"')
_PREFIX_OK = re.compile(r"^[A-Za-z][A-Za-z0-9_-]*$")
SVG_HASH_SALT = "simheat"  # fixed, so the same figure gives the same page

__all__ = ["figure_svg"]


def figure_svg(fig: Figure, prefix: str) -> Markup:
    """A figure as one inline ``<svg>`` element with page-unique ids.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure; it is closed afterwards. [-]
    prefix : str
        Prefix of every id in it: a letter, then letters, digits, ``_`` or
        ``-``. [-]

    Returns
    -------
    markupsafe.Markup
        The ``<svg>`` element, marked safe for the template: matplotlib escapes
        every text it writes (labels, titles, gids) as XML.

    Raises
    ------
    ValueError
        For a prefix that is not a plain name.
    """
    import matplotlib

    if not _PREFIX_OK.match(prefix):
        raise ValueError(f"prefix: must be a plain name, got {prefix!r}")
    buffer = io.StringIO()
    with matplotlib.rc_context({"svg.hashsalt": SVG_HASH_SALT, "svg.fonttype": "path"}):
        fig.savefig(buffer, format="svg", bbox_inches="tight", metadata={"Date": None})
    text = _COMMENT.sub("", _HEAD.sub("", buffer.getvalue(), count=1))
    text = _METADATA.sub("", text, count=1)
    text = _ID.sub(lambda m: f'id="{prefix}-{m.group(1)}"', text)
    text = _URL.sub(lambda m: f"url(#{prefix}-{m.group(1)})", text)
    text = _HREF.sub(lambda m: f'href="#{prefix}-{m.group(1)}"', text)
    text = text.replace("<svg ", '<svg role="img" ', 1)
    return Markup(text.strip())
