"""numba's ``njit`` with an on-disk cache that cannot serve stale kernels.

numba checks a cached kernel against its own source file only. A kernel that
inlines a kernel (or reads a constant) from another module keeps its old
machine code when only that other module changes. simheat therefore keeps its
cache in a directory named after a hash of every kernel source: importing this
module (which every kernel module does, for ``njit``) computes the hash and
points numba's cache there before any kernel is decorated. A changed kernel
source, or a changed module a kernel module imports from, gives a new
directory and a fresh compilation; nothing needs clearing by hand.

Which sources count: every module of the package that imports ``njit`` from
here (a *kernel module*), and, transitively, every ``simheat`` module those
import from (their constants are compiled into the kernels). The numba and
Python versions are part of the key too.

Where the cache lives:

- ``$NUMBA_CACHE_DIR/simheat-<key>`` when the user set ``NUMBA_CACHE_DIR``;
- otherwise the user's cache directory, ``<cache>/simheat/numba/<key>``
  (``$XDG_CACHE_HOME`` or ``~/.cache`` on Linux, ``~/Library/Caches`` on
  macOS, ``%LOCALAPPDATA%`` on Windows): an installed package may sit in a
  read-only place, and the hashed directory must not depend on it;
- if that cannot be written, ``<tmp>/simheat-numba-<uid>/<key>`` in the
  system's temporary directory; if that fails too, numba's default (beside
  the sources, where the hazard above remains).

Each use marks its key directory as used; when a new key directory is made,
only the ``KEEP_KEYS`` most recently used sibling key directories are kept
(each holds a full compilation, about 10 MB).

Reading the environment at import is deliberate and confined to this module:
numba itself decides a kernel's cache location when the kernel is decorated.
"""

from __future__ import annotations

import hashlib
import os
import re
import shutil
import sys
import tempfile
from collections.abc import Mapping
from pathlib import Path

import numba
from numba import njit
from numba.core import config

__all__ = ["CACHE_DIR", "cache_key", "kernel_sources", "njit"]

PACKAGE_DIR = Path(__file__).resolve().parent
# How many key directories (compilations of different sources) are kept. [-]
KEEP_KEYS = 8
# Characters of the sha256 hex digest used as the key. [-]
KEY_LENGTH = 16
KEY_PREFIX_UNDER_USER_DIR = "simheat-"
_KERNEL_MARK = re.compile(rb"^from simheat\._jit import", re.MULTILINE)
_FROM_IMPORT = re.compile(
    rb"^[ \t]*from[ \t]+(simheat(?:\.\w+)*)[ \t]+import[ \t]+(\([^)]*\)|[^\n]*)",
    re.MULTILINE,
)
_PLAIN_IMPORT = re.compile(rb"^[ \t]*import[ \t]+(simheat(?:\.\w+)*)", re.MULTILINE)
_COMMENT = re.compile(rb"#[^\n]*")
_NAME = re.compile(rb"\b(\w+)\b(?:[ \t]+as[ \t]+\w+)?")


def _module_file(package_dir: Path, dotted: str) -> Path | None:
    """Source file of ``simheat.a.b`` under ``package_dir`` (None if absent)."""
    parts = dotted.split(".")[1:]
    base = package_dir.joinpath(*parts)
    for candidate in (base.with_suffix(".py"), base / "__init__.py"):
        if candidate.is_file():
            return candidate
    return None


def _imported_files(package_dir: Path, source: bytes) -> set[Path]:
    """Modules of simheat a source imports (``from m import x`` may name one)."""
    found: set[Path] = set()
    for match in _PLAIN_IMPORT.finditer(source):
        path = _module_file(package_dir, match.group(1).decode())
        if path is not None:
            found.add(path)
    for match in _FROM_IMPORT.finditer(source):
        module = match.group(1).decode()
        path = _module_file(package_dir, module)
        if path is not None:
            found.add(path)
        names = _COMMENT.sub(b"", match.group(2))
        for name in _NAME.findall(names):
            sub = _module_file(package_dir, f"{module}.{name.decode()}")
            if sub is not None:
                found.add(sub)
    return found


def kernel_sources(package_dir: Path = PACKAGE_DIR) -> list[Path]:
    """The source files whose content keys the cache, sorted.

    Parameters
    ----------
    package_dir : Path
        The ``simheat`` package directory. [-]

    Returns
    -------
    list of Path
        Every kernel module (it imports ``njit`` from this module), this module,
        and every ``simheat`` module reachable from them by imports.
    """
    texts: dict[Path, bytes] = {}
    pending = [package_dir / "_jit.py"]
    for path in package_dir.rglob("*.py"):
        if "__pycache__" in path.parts:
            continue
        text = path.read_bytes()
        if _KERNEL_MARK.search(text):
            texts[path] = text
            pending.append(path)
    seen: set[Path] = set()
    while pending:
        path = pending.pop()
        if path in seen or not path.is_file():
            continue
        seen.add(path)
        text = texts.get(path)
        if text is None:
            text = texts[path] = path.read_bytes()
        pending.extend(_imported_files(package_dir, text) - seen)
    return sorted(seen)


def cache_key(package_dir: Path = PACKAGE_DIR) -> str:
    """Hash of the kernel sources, numba's version and Python's.

    Parameters
    ----------
    package_dir : Path
        The ``simheat`` package directory. [-]

    Returns
    -------
    str
        ``KEY_LENGTH`` hexadecimal characters. [-]
    """
    digest = hashlib.sha256()
    digest.update(f"numba {numba.__version__} python {sys.version}\0".encode())
    for path in kernel_sources(package_dir):
        digest.update(path.relative_to(package_dir).as_posix().encode() + b"\0")
        digest.update(path.read_bytes() + b"\0")
    return digest.hexdigest()[:KEY_LENGTH]


def _user_cache_root(environ: Mapping[str, str]) -> Path:
    """The platform's per-user cache directory."""
    if environ.get("XDG_CACHE_HOME"):
        return Path(environ["XDG_CACHE_HOME"])
    if sys.platform == "darwin":
        return Path.home() / "Library" / "Caches"
    if sys.platform == "win32" and environ.get("LOCALAPPDATA"):
        return Path(environ["LOCALAPPDATA"])
    return Path.home() / ".cache"


def _candidates(environ: Mapping[str, str]) -> list[tuple[Path, str]]:
    """(parent directory, key prefix) to try, in order."""
    user = environ.get("NUMBA_CACHE_DIR", "")
    uid = os.getuid() if hasattr(os, "getuid") else "user"
    first = (
        (Path(user), KEY_PREFIX_UNDER_USER_DIR)
        if user
        else (_user_cache_root(environ) / "simheat" / "numba", "")
    )
    return [first, (Path(tempfile.gettempdir()) / f"simheat-numba-{uid}", "")]


def _is_key_dir(name: str, prefix: str) -> bool:
    return (
        name.startswith(prefix)
        and len(name) == len(prefix) + KEY_LENGTH
        and all(c in "0123456789abcdef" for c in name[len(prefix) :])
    )


def prune(parent: Path, prefix: str, keep: int = KEEP_KEYS) -> None:
    """Remove all but the ``keep`` most recently used key directories in ``parent``.

    Parameters
    ----------
    parent : Path
        Directory holding key directories. [-]
    prefix : str
        Their name prefix. [-]
    keep : int
        How many to keep. [-]
    """
    try:
        dirs = [
            p for p in parent.iterdir() if p.is_dir() and _is_key_dir(p.name, prefix)
        ]
        dirs.sort(key=lambda p: p.stat().st_mtime, reverse=True)
    except OSError:
        return
    for old in dirs[keep:]:
        shutil.rmtree(old, ignore_errors=True)


def choose_cache_dir(key: str, environ: Mapping[str, str]) -> Path | None:
    """Create (or reuse) and mark the key directory; prune old ones when new.

    Parameters
    ----------
    key : str
        The cache key (:func:`cache_key`). [-]
    environ : mapping
        Environment variables (``NUMBA_CACHE_DIR``, ``XDG_CACHE_HOME``). [-]

    Returns
    -------
    Path or None
        The writable key directory, or None when no candidate is writable.
    """
    for parent, prefix in _candidates(environ):
        path = parent / f"{prefix}{key}"
        try:
            new = not path.is_dir()
            path.mkdir(parents=True, exist_ok=True)
            if not os.access(path, os.W_OK):
                continue
            os.utime(path)  # mark as used (for pruning)
        except OSError:
            continue
        if new:
            prune(parent, prefix)
        return path
    return None


def _install() -> Path | None:
    path = choose_cache_dir(cache_key(), os.environ)
    if path is not None:
        config.CACHE_DIR = str(path)
    return path


# The cache directory of this process's kernels (None: numba's default).
CACHE_DIR = _install()
