"""Checks of a run file on load: its seal, and the type, shape and values of each part.

A run file written by :func:`simheat.runs.store.save_run` is *sealed*: HDF5's
user block (the first :data:`USER_BLOCK_BYTES` bytes, which HDF5 tools skip)
holds a SHA-256 digest of everything after it. A file whose bytes changed since
(a flipped bit anywhere, garbage appended, a cut tail) no longer matches and is
refused before HDF5 reads it. Files without a seal (written by an older simheat,
or rewritten by another tool) are read without that check.

Whether sealed or not, every part read is checked: attributes of the right type
(the solver record is a JSON object, the schema version an integer), datasets of
the right kind (integers where indices are stored, numbers elsewhere), shapes
that agree with each other and with the embedded scenario, indices in range and
series finite. Each problem is one :class:`~simheat.errors.RunFileError` line
naming the file and the part.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import h5py
import numpy as np

from simheat.errors import RunFileError

# HDF5 user block holding the seal; the smallest size HDF5 allows. [bytes]
USER_BLOCK_BYTES = 512
SEAL_MAGIC = b"simheat-run-file sha256 "
_CHUNK_BYTES = 1 << 20  # read size while hashing [bytes]


def _digest(path: Path) -> str:
    """SHA-256 of the file after its user block, as hex."""
    sha = hashlib.sha256()
    with open(path, "rb") as handle:
        handle.seek(USER_BLOCK_BYTES)
        while chunk := handle.read(_CHUNK_BYTES):
            sha.update(chunk)
    return sha.hexdigest()


def seal(path: str | Path) -> None:
    """Write the digest of a finished run file into its user block.

    Parameters
    ----------
    path : str or Path
        A closed HDF5 file created with a user block of
        :data:`USER_BLOCK_BYTES` bytes. [-]
    """
    path = Path(path)
    header = SEAL_MAGIC + _digest(path).encode("ascii") + b"\n"
    with open(path, "rb+") as handle:
        handle.write(header.ljust(USER_BLOCK_BYTES, b"\0"))


def check_seal(path: str | Path) -> bool:
    """Check a run file's seal, if it has one.

    Parameters
    ----------
    path : str or Path
        The run file. [-]

    Returns
    -------
    bool
        True when the file is sealed and matches; False when it has no seal.

    Raises
    ------
    RunFileError
        When the file has a seal that its content no longer matches.
    """
    path = Path(path)
    with open(path, "rb") as handle:
        head = handle.read(USER_BLOCK_BYTES)
    if not head.startswith(SEAL_MAGIC):
        return False
    stored = head[len(SEAL_MAGIC) : len(SEAL_MAGIC) + 64]
    if stored.decode("ascii", "replace") != _digest(path):
        raise RunFileError(
            f"{path}: damaged run file: its content changed since it was written "
            "(checksum mismatch); simulate again to get a sound file"
        )
    return True


def fail(path: Path, problem: str) -> RunFileError:
    """The error of a damaged part (returned, so callers ``raise`` it).

    Parameters
    ----------
    path : Path
        The run file. [-]
    problem : str
        What is wrong, naming the part. [-]
    """
    return RunFileError(f"{path}: damaged run file: {problem}")


def attribute(obj: h5py.HLObject, name: str, path: Path) -> object:
    """An attribute of a group or dataset; missing -> RunFileError.

    Parameters
    ----------
    obj : h5py group or dataset
        Where the attribute sits. [-]
    name : str
        Attribute name. [-]
    path : Path
        The run file, for messages. [-]
    """
    if name not in obj.attrs:
        where = obj.name if obj.name != "/" else "the root"
        raise fail(path, f"attribute {name!r} missing on {where}")
    try:
        return obj.attrs[name]
    except (OSError, TypeError, ValueError) as exc:
        raise fail(path, f"attribute {name!r} unreadable ({exc})") from None


def text_attribute(obj: h5py.HLObject, name: str, path: Path) -> str:
    """A string attribute.

    Parameters
    ----------
    obj : h5py group or dataset
        Where the attribute sits. [-]
    name : str
        Attribute name. [-]
    path : Path
        The run file, for messages. [-]
    """
    value = attribute(obj, name, path)
    if isinstance(value, bytes):
        value = value.decode("utf-8", "replace")
    if not isinstance(value, str):
        raise fail(path, f"attribute {name!r} must be text, got {_shown(value)}")
    return value


def integer_attribute(obj: h5py.HLObject, name: str, path: Path) -> int:
    """An integer attribute.

    Parameters
    ----------
    obj : h5py group or dataset
        Where the attribute sits. [-]
    name : str
        Attribute name. [-]
    path : Path
        The run file, for messages. [-]
    """
    value = attribute(obj, name, path)
    if isinstance(value, np.ndarray) and value.shape == ():
        value = value[()]
    if isinstance(value, bool | np.bool_) or not isinstance(value, int | np.integer):
        raise fail(path, f"attribute {name!r} must be an integer, got {_shown(value)}")
    return int(value)


def number_attribute(
    obj: h5py.HLObject, name: str, path: Path, *, allow_nan: bool = False
) -> float:
    """A finite number attribute (NaN allowed where a value may be missing).

    Parameters
    ----------
    obj : h5py group or dataset
        Where the attribute sits. [-]
    name : str
        Attribute name. [-]
    path : Path
        The run file, for messages. [-]
    allow_nan : bool
        Accept NaN (a missing value). [-]
    """
    value = attribute(obj, name, path)
    if isinstance(value, np.ndarray) and value.shape == ():
        value = value[()]
    if isinstance(value, bool | np.bool_) or not isinstance(
        value, int | float | np.integer | np.floating
    ):
        raise fail(path, f"attribute {name!r} must be a number, got {_shown(value)}")
    number = float(value)
    if np.isinf(number) or (np.isnan(number) and not allow_nan):
        raise fail(path, f"attribute {name!r} must be finite, got {number}")
    return number


def json_attribute(obj: h5py.HLObject, name: str, path: Path) -> dict:
    """An attribute holding the JSON text of an object.

    Parameters
    ----------
    obj : h5py group or dataset
        Where the attribute sits. [-]
    name : str
        Attribute name. [-]
    path : Path
        The run file, for messages. [-]
    """
    text = text_attribute(obj, name, path)
    try:
        value = json.loads(text)
    except ValueError:
        raise fail(path, f"attribute {name!r} is not JSON text") from None
    if not isinstance(value, dict):
        raise fail(path, f"attribute {name!r} must hold a JSON object")
    return value


def group(f: h5py.File, name: str, path: Path) -> h5py.Group:
    """A group of the file; missing -> RunFileError.

    Parameters
    ----------
    f : h5py.File
        The open run file. [-]
    name : str
        Path of the group in the file. [-]
    path : Path
        The run file, for messages. [-]
    """
    item = f.get(name)
    if not isinstance(item, h5py.Group):
        raise fail(path, f"group {name!r} missing")
    return item


def dataset(f: h5py.File, name: str, path: Path) -> h5py.Dataset:
    """A dataset of the file; missing -> RunFileError.

    Parameters
    ----------
    f : h5py.File
        The open run file. [-]
    name : str
        Path of the dataset in the file. [-]
    path : Path
        The run file, for messages. [-]
    """
    item = f.get(name)
    if not isinstance(item, h5py.Dataset):
        raise fail(path, f"dataset {name!r} missing")
    return item


def strings(
    f: h5py.File, name: str, path: Path, length: int | None = None
) -> tuple[str, ...]:
    """A 1-D dataset of strings, of ``length`` entries when given.

    Parameters
    ----------
    f : h5py.File
        The open run file. [-]
    name : str
        Path of the dataset in the file. [-]
    path : Path
        The run file, for messages. [-]
    length : int, optional
        Required number of entries. [-]
    """
    data = dataset(f, name, path)
    if data.dtype.kind not in "OSU" or data.ndim != 1:
        raise fail(path, f"dataset {name!r} must be a list of strings")
    try:
        values = tuple(str(v) for v in data.asstr()[()])
    except (OSError, TypeError, ValueError, UnicodeDecodeError) as exc:
        raise fail(path, f"dataset {name!r} unreadable ({exc})") from None
    if length is not None and len(values) != length:
        raise fail(
            path, f"dataset {name!r} has {len(values)} entries, expected {length}"
        )
    return values


def text(f: h5py.File, name: str, path: Path) -> str:
    """A scalar string dataset.

    Parameters
    ----------
    f : h5py.File
        The open run file. [-]
    name : str
        Path of the dataset in the file. [-]
    path : Path
        The run file, for messages. [-]
    """
    data = dataset(f, name, path)
    if data.dtype.kind not in "OSU" or data.shape != ():
        raise fail(path, f"dataset {name!r} must be one string")
    try:
        return str(data.asstr()[()])
    except (OSError, TypeError, ValueError, UnicodeDecodeError) as exc:
        raise fail(path, f"dataset {name!r} unreadable ({exc})") from None


def array(
    f: h5py.File,
    name: str,
    path: Path,
    shape: tuple[int | None, ...],
    *,
    kind: str = "float",
    finite: bool = True,
    low: int | None = None,
    high: int | None = None,
) -> np.ndarray:
    """A numeric dataset of the given kind and shape, checked.

    Parameters
    ----------
    f : h5py.File
        The open run file. [-]
    name : str
        Path of the dataset in the file. [-]
    path : Path
        The run file, for messages. [-]
    shape : tuple of (int or None)
        Required shape; None leaves a dimension free. [-]
    kind : {"float", "int", "bool"}
        Numbers (integers accepted), integers (indices and codes) or booleans. [-]
    finite : bool
        For numbers: every value finite (else NaN allowed, infinity never). [-]
    low, high : int, optional
        For integers: inclusive bounds of every value. [-]

    Returns
    -------
    ndarray
        The data.
    """
    data = dataset(f, name, path)
    allowed = {"float": "fiu", "int": "iu", "bool": "b"}[kind]
    if data.dtype.kind not in allowed:
        wanted = {"float": "numbers", "int": "integers", "bool": "true/false"}[kind]
        raise fail(path, f"dataset {name!r} must hold {wanted}, got {data.dtype}")
    if len(data.shape) != len(shape) or any(
        want is not None and got != want
        for got, want in zip(data.shape, shape, strict=True)
    ):
        expected = "(" + ", ".join("n" if s is None else str(s) for s in shape) + ")"
        raise fail(
            path, f"dataset {name!r} has shape {data.shape}, expected {expected}"
        )
    try:
        values = data[()]
    except (OSError, TypeError, ValueError) as exc:
        raise fail(path, f"dataset {name!r} unreadable ({exc})") from None
    if kind == "float":
        values = np.asarray(values, dtype=np.float64)
        bad = ~np.isfinite(values) if finite else np.isinf(values)
        if bad.any():
            what = "finite" if finite else "finite or NaN"
            raise fail(
                path,
                f"dataset {name!r} must be {what}, got {values[bad].flat[0]} at "
                f"position {int(np.flatnonzero(bad.ravel())[0])}",
            )
    if kind == "int" and values.size:
        if (low is not None and values.min() < low) or (
            high is not None and values.max() > high
        ):
            raise fail(path, f"dataset {name!r} holds values outside {low} to {high}")
    return values


def increasing(values: np.ndarray, name: str, path: Path) -> None:
    """Refuse a time axis that does not strictly increase.

    Parameters
    ----------
    values : ndarray
        The axis. [s]
    name : str
        Its dataset, for messages. [-]
    path : Path
        The run file, for messages. [-]
    """
    if values.size < 2 or np.any(np.diff(values) <= 0.0):
        raise fail(path, f"dataset {name!r} must hold increasing times")


def _shown(value: object) -> str:
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."
