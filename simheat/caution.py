"""The safety caution that ends every output stating design figures.

It lives at the top of the package, with no imports, because files as well as
printed reports carry it (a sweep file stores it as an attribute) and the
libraries that write files sit below the report layer.
"""

from __future__ import annotations

CAUTION = (
    "Caution: these are planning estimates only. Hot water can scald and heating "
    "systems work under pressure and on mains power: the installation must follow "
    "local codes and be commissioned by a qualified installer."
)
"""One paragraph; text output prints it last, JSON output carries it as ``caution``."""
