"""Write scenario text to a file: a temporary name first, then a rename."""

from __future__ import annotations

from pathlib import Path

from simheat.files import write_text


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
    OutputError
        When the file cannot be written (the message names the path).

    Notes
    -----
    The text goes to a temporary file in the destination's folder, which is
    then renamed over the destination (:func:`simheat.files.write_text`), so an
    interrupted write never leaves a half file under the final name.
    """
    path = Path(path)
    if path.is_dir():
        from simheat.errors import OutputError

        raise OutputError(f"{path}: is a folder; give a file name for the scenario")
    return write_text(text, path, overwrite=overwrite)
