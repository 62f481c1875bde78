"""Files that survive a kill: temporary names, renames, and stale leftovers.

Every file simheat writes (run files, figures, scenario text, reports) is
written under a temporary name in the target's own folder, flushed to disk and
renamed onto its final name only when complete. A process killed mid-write
therefore leaves no half file under a final name, only a temporary file whose
name starts with :data:`TEMPORARY_PREFIX` and carries the writer's process id:
``.simheat-tmp-<pid>-<random>-<final name>``.

Such leftovers are cleaned on the next write into the same folder
(:func:`clean_stale`). Only our own names are touched, and only stale ones:
a temporary file is stale when the process that wrote it is no longer running
on this machine *and* the file has not changed for :data:`STALE_AFTER_S`. The
age condition protects a writer that this machine cannot see (another host
writing into a shared folder, another container's process ids) and a process
id that was reused; either way the worst case is a leftover kept a little
longer.

This module imports only the standard library, so the command line can use it
before anything heavy is loaded.
"""

from __future__ import annotations

import contextlib
import errno
import os
import secrets
import time
from collections.abc import Iterator
from pathlib import Path

from simheat.errors import OutputError

TEMPORARY_PREFIX = ".simheat-tmp-"
# A temporary file of a process that is gone is removed once it is this old:
# longer than any single write of a run file or figure takes. [s]
STALE_AFTER_S = 600.0
# Longest final name kept in a temporary name (file names are limited to 255
# bytes on common filesystems; the prefix, pid and random part take < 40). [-]
_NAME_KEPT = 180

__all__ = [
    "STALE_AFTER_S",
    "TEMPORARY_PREFIX",
    "atomic_path",
    "clean_stale",
    "output_folder",
    "temporary_path",
    "write_bytes",
    "write_text",
]


def temporary_path(path: str | Path) -> Path:
    """A fresh temporary name beside ``path``, carrying this process's id.

    Parameters
    ----------
    path : str or Path
        The final file name. [-]

    Returns
    -------
    Path
        ``<folder>/.simheat-tmp-<pid>-<random>-<name>``.
    """
    path = Path(path)
    token = secrets.token_hex(4)
    return path.with_name(
        f"{TEMPORARY_PREFIX}{os.getpid()}-{token}-{path.name[-_NAME_KEPT:]}"
    )


def _writer_pid(name: str) -> int | None:
    """Process id in a temporary name of ours, or None when it has none."""
    head = name[len(TEMPORARY_PREFIX) :].split("-", 1)[0]
    return int(head) if head.isdigit() else None


def _running(pid: int) -> bool:
    """Whether a process with this id runs on this machine (as far as we see)."""
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OverflowError, OSError):
        return True  # someone else's process, or we cannot tell: keep the file
    return True


def clean_stale(folder: str | Path, *, now: float | None = None) -> list[Path]:
    """Remove stale temporary files of ours from ``folder``.

    Parameters
    ----------
    folder : str or Path
        The folder about to be written into. [-]
    now : float, optional
        Current time (seconds since the epoch); the clock when omitted. [s]

    Returns
    -------
    list of Path
        The files removed.

    Notes
    -----
    A file is removed only when its name starts with :data:`TEMPORARY_PREFIX`
    and holds a process id, that process is not running, and the file was last
    modified at least :data:`STALE_AFTER_S` ago. Errors (a file removed by
    someone else meanwhile, a folder that cannot be listed) are ignored: the
    cleaning is a courtesy, never a reason for a write to fail.
    """
    now = time.time() if now is None else now
    removed = []
    try:
        entries = list(os.scandir(folder))
    except OSError:
        return removed
    for entry in entries:
        if not entry.name.startswith(TEMPORARY_PREFIX):
            continue
        pid = _writer_pid(entry.name)
        try:
            if pid is None or not entry.is_file(follow_symlinks=False):
                continue
            if now - entry.stat(follow_symlinks=False).st_mtime < STALE_AFTER_S:
                continue
            if _running(pid):
                continue
            os.unlink(entry.path)
        except OSError:
            continue
        removed.append(Path(entry.path))
    return removed


def _refuse_existing(path: Path) -> None:
    raise FileExistsError(errno.EEXIST, "file exists", str(path))


def _move_into_place(temporary: Path, path: Path, overwrite: bool) -> None:
    """Rename ``temporary`` onto ``path``; without ``overwrite`` never replace."""
    if overwrite:
        os.replace(temporary, path)
        return
    try:
        os.link(temporary, path)  # fails if path appeared since the check
    except FileExistsError:
        _refuse_existing(path)
    except OSError:  # filesystems without hard links
        if path.exists():
            _refuse_existing(path)
        os.replace(temporary, path)


def _fsync(path: Path) -> None:
    with open(path, "rb+") as handle:
        os.fsync(handle.fileno())


@contextlib.contextmanager
def atomic_path(path: str | Path, *, overwrite: bool = False) -> Iterator[Path]:
    """Write a file under a temporary name; rename it onto ``path`` when done.

    Use as ``with atomic_path(target) as tmp: write(tmp)``. When the block ends
    normally the temporary file is flushed to disk and renamed onto ``path``;
    when it raises, the temporary file is removed and ``path`` is untouched.
    Stale temporary files of killed processes in the folder are cleaned first
    (:func:`clean_stale`).

    Parameters
    ----------
    path : str or Path
        The final file. [-]
    overwrite : bool
        Replace an existing ``path``; refuse when false. [-]

    Yields
    ------
    Path
        The temporary path to write (not created yet).

    Raises
    ------
    FileExistsError
        When ``path`` exists (or appears meanwhile) and ``overwrite`` is false;
        ``filename`` is the path.
    OutputError
        When the folder cannot be written (the message names it).
    """
    path = Path(path)
    if not overwrite and path.exists():
        _refuse_existing(path)
    clean_stale(path.parent)
    temporary = temporary_path(path)
    try:
        yield temporary
        _fsync(temporary)
        _move_into_place(temporary, path, overwrite)
    except (FileExistsError, OutputError):
        raise
    except OSError as exc:
        raise OutputError(f"{path}: cannot write ({_reason(exc)})") from None
    finally:
        with contextlib.suppress(OSError):
            temporary.unlink(missing_ok=True)


def write_bytes(data: bytes, path: str | Path, *, overwrite: bool = False) -> Path:
    """Write bytes to ``path`` through a temporary file and a rename.

    Parameters
    ----------
    data : bytes
        File content. [-]
    path : str or Path
        The final file. [-]
    overwrite : bool
        Replace an existing ``path``. [-]

    Returns
    -------
    Path
        The path written.
    """
    path = Path(path)
    with atomic_path(path, overwrite=overwrite) as temporary:
        with open(temporary, "xb") as handle:
            handle.write(data)
    return path


def write_text(text: str, path: str | Path, *, overwrite: bool = False) -> Path:
    """Write UTF-8 text to ``path`` through a temporary file and a rename.

    Parameters
    ----------
    text : str
        File content. [-]
    path : str or Path
        The final file. [-]
    overwrite : bool
        Replace an existing ``path``. [-]

    Returns
    -------
    Path
        The path written.
    """
    return write_bytes(text.encode("utf-8"), path, overwrite=overwrite)


def _reason(exc: OSError) -> str:
    """One line of an OS error: its text without the path it repeats."""
    return exc.strerror or type(exc).__name__


def output_folder(folder: str | Path) -> Path:
    """Make sure ``folder`` exists and can be written, before any work.

    Parameters
    ----------
    folder : str or Path
        Folder for output files (``--out``). [-]

    Returns
    -------
    Path
        The folder.

    Raises
    ------
    OutputError
        When it cannot be made (a regular file in the way, no permission) or a
        file cannot be created in it; one line naming the folder.
    """
    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise OutputError(f"{folder}: output folder is a file, not a folder")
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise OutputError(
            f"{folder}: cannot make the output folder ({_reason(exc)})"
        ) from None
    probe = temporary_path(folder / "probe")
    try:
        with open(probe, "xb"):
            pass
    except OSError as exc:
        raise OutputError(
            f"{folder}: cannot write into the output folder ({_reason(exc)})"
        ) from None
    finally:
        with contextlib.suppress(OSError):
            probe.unlink(missing_ok=True)
    return folder
