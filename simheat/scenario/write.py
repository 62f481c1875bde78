"""Write scenario text to a file: a temporary name first, then a rename."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from simheat.errors import ScenarioError


def write_scenario_text(
    text: str, path: str | Path, *, overwrite: bool = False
) -> Path:
    """Write a scenario's TOML text to ``path`` atomically.

    Parameters
    ----------
    text : str
        The scenario text. [-]
    path : str or Path
        Destination file. [-]
    overwrite : bool
        Whether an existing file may be replaced. [-]

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    FileExistsError
        When ``path`` exists and ``overwrite`` is False (nothing is written).
    ScenarioError
        When the file cannot be written (the message names the path).

    Notes
    -----
    The text goes to a temporary file in the destination's folder, which is
    then renamed over the destination, so an interrupted write never leaves a
    half file under the final name.
    """
    path = Path(path)
    if path.exists() and not overwrite:
        raise FileExistsError(17, "file exists", str(path))
    folder = path.parent if str(path.parent) else Path(".")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise ScenarioError(
            f"{path}: cannot write scenario file ({exc.strerror})"
        ) from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as handle:
            handle.write(text)
        os.replace(tmp, path)
    except OSError as exc:
        Path(tmp).unlink(missing_ok=True)
        raise ScenarioError(
            f"{path}: cannot write scenario file ({exc.strerror})"
        ) from None
    return path
