"""Tests of the numba cache keyed on the kernel sources (simheat/_jit.py)."""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
import time
from pathlib import Path

import pytest

import simheat
from simheat import _jit

PACKAGE = Path(simheat.__file__).resolve().parent


def _copy_package(tmp_path: Path) -> Path:
    """A copy of the simheat sources (no caches) under ``tmp_path``."""
    target = tmp_path / "src" / "simheat"
    shutil.copytree(PACKAGE, target, ignore=shutil.ignore_patterns("__pycache__"))
    return target


def _run(code: str, src: Path, cache_dir: Path) -> str:
    """Run ``code`` in a fresh interpreter on the sources in ``src``."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(src.parent)
    env["NUMBA_CACHE_DIR"] = str(cache_dir)
    env.pop("NUMBA_DISABLE_JIT", None)
    done = subprocess.run(
        [sys.executable, "-c", code],
        cwd=src.parent,  # "-c" puts the working directory first on sys.path
        env=env,
        capture_output=True,
        text=True,
        check=False,
        timeout=300,
    )
    assert done.returncode == 0, done.stderr
    return done.stdout.strip()


def _edit(path: Path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert text.count(old) == 1, old
    path.write_text(text.replace(old, new), encoding="utf-8")


def test_every_module_using_numba_is_a_keyed_kernel_module():
    # A module that compiled kernels, or defined numba types, without going
    # through simheat._jit would escape the key; one that does is keyed.
    sources = set(_jit.kernel_sources())
    for path in PACKAGE.rglob("*.py"):
        text = path.read_text(encoding="utf-8")
        uses_numba = re.search(r"^\s*(from numba\b|import numba)", text, re.M)
        if uses_numba or "@njit" in text:
            assert path in sources, path
            assert path.name == "_jit.py" or "from simheat._jit import njit" in text


def test_kernel_sources_follow_the_imports_of_kernel_modules(tmp_path):
    # Constants a kernel module imports are compiled into its kernels, so the
    # modules it imports from (and theirs) key the cache too.
    pkg = tmp_path / "simheat"
    (pkg / "a").mkdir(parents=True)
    (pkg / "b").mkdir()
    shutil.copy(PACKAGE / "_jit.py", pkg / "_jit.py")
    for init in (pkg, pkg / "a", pkg / "b"):
        (init / "__init__.py").write_text("")
    (pkg / "a" / "_kernels.py").write_text(
        "from simheat._jit import njit\n"
        "from simheat.a.constants import SCALE\n"
        "from simheat.b import (\n    helper,  # a module named in the list\n)\n"
    )
    (pkg / "a" / "constants.py").write_text("from simheat.b.base import BASE\n")
    (pkg / "b" / "base.py").write_text("BASE = 2.0\n")
    (pkg / "b" / "helper.py").write_text("X = 1\n")
    (pkg / "b" / "unrelated.py").write_text("Y = 1\n")
    names = {p.relative_to(pkg).as_posix() for p in _jit.kernel_sources(pkg)}
    assert names == {
        "_jit.py",
        "a/_kernels.py",
        "a/constants.py",
        "b/__init__.py",
        "b/base.py",
        "b/helper.py",
    }


def test_editing_a_kernel_source_changes_the_cache_key(tmp_path):
    src = _copy_package(tmp_path)
    before = _jit.cache_key(src)
    assert before == _jit.cache_key(PACKAGE)  # the key depends on content only
    _edit(
        src / "physics" / "_kernels.py",
        "RE_TURBULENT_MIN = 4000.0",
        "RE_TURBULENT_MIN = 4000.0  # edited",
    )
    after = _jit.cache_key(src)
    assert after != before
    # a module no kernel imports from does not key the cache
    (src / "report.py").write_text("# edited\n", encoding="utf-8")
    assert _jit.cache_key(src) == after


def test_a_process_caches_under_the_key_of_its_sources(tmp_path):
    # numba imported before simheat: the cache directory is still set before
    # any kernel is decorated, nested under the user's NUMBA_CACHE_DIR.
    src = _copy_package(tmp_path)
    code = (
        "import numba\n"
        "from simheat.physics import _kernels\n"
        "print(_kernels.water_density_kg_m3._cache._cache_path)\n"
    )
    cache = tmp_path / "cache"
    path = Path(_run(code, src, cache))
    key = _jit.cache_key(src)
    assert path.is_relative_to(cache / f"simheat-{key}")
    _edit(src / "physics" / "_water_kernels.py", "_KELL_DEN = ", "_KELL_DEN =  ")
    moved = Path(_run(code, src, cache))
    assert moved.is_relative_to(cache / f"simheat-{_jit.cache_key(src)}")
    assert not moved.is_relative_to(cache / f"simheat-{key}")


def test_a_changed_inlined_kernel_is_not_served_from_the_cache(tmp_path):
    # The hazard itself: a hydraulics kernel inlines the Colebrook-White onset
    # Reynolds number from physics/_kernels.py. Change that constant only, and a
    # second process with the same cache must compute with the new value.
    src = _copy_package(tmp_path)
    code = (
        "import numpy as np\n"
        "from simheat.hydraulics import _kernels\n"
        "f, df = np.zeros(1), np.zeros(1)\n"
        "_kernels.onset_friction(np.ones(1), np.full(1, 0.02), np.zeros(1), f, df)\n"
        "print(float(f[0]))\n"
    )
    cache = tmp_path / "cache"
    at_4000 = float(_run(code, src, cache))
    assert at_4000 == pytest.approx(0.316 / 4000.0**0.25, rel=0.05)  # Blasius
    _edit(
        src / "physics" / "_kernels.py",
        "RE_TURBULENT_MIN = 4000.0",
        "RE_TURBULENT_MIN = 8000.0",
    )
    at_8000 = float(_run(code, src, cache))
    # smooth pipe: Blasius f = 0.316 Re^-0.25 within 5 % up to Re 1e5
    assert at_8000 == pytest.approx(0.316 / 8000.0**0.25, rel=0.05)


def test_kernels_taking_records_load_from_the_cache_in_a_second_process(tmp_path):
    # Named tuples and the StructRef handle are argument types numba must
    # pickle into the cache index and find again in another process.
    src = _copy_package(tmp_path)
    code = (
        "import numpy as np\n"
        "from simheat._handle import Handle, make_handle\n"
        "from simheat.hydraulics import _kernels as k\n"
        "memory = k.ColebrookMemory(np.zeros(1), np.zeros(1), np.zeros(1))\n"
        "coef = np.zeros((k.N_COEF_ROWS, 1))\n"
        "coef[k.C_MODE] = -1.0\n"
        "k.evaluate_links(np.ones(1), coef, memory, np.zeros(1), np.zeros(1))\n"
        "Handle(memory)\n"
        "hits = len(k.evaluate_links.stats.cache_hits)\n"
        "hits += len(make_handle.stats.cache_hits)\n"
        "misses = len(k.evaluate_links.stats.cache_misses)\n"
        "misses += len(make_handle.stats.cache_misses)\n"
        "print(hits, misses)\n"
    )
    cache = tmp_path / "cache"
    assert _run(code, src, cache) == "0 2"  # compiled and saved
    assert _run(code, src, cache) == "2 0"  # loaded, nothing compiled


def test_user_cache_dir_is_respected_and_nested(tmp_path):
    path = _jit.choose_cache_dir("0123456789abcdef", {"NUMBA_CACHE_DIR": str(tmp_path)})
    assert path == tmp_path / "simheat-0123456789abcdef"
    assert path.is_dir()


def test_default_cache_lives_in_the_user_cache_directory(tmp_path):
    path = _jit.choose_cache_dir("0123456789abcdef", {"XDG_CACHE_HOME": str(tmp_path)})
    assert path == tmp_path / "simheat" / "numba" / "0123456789abcdef"


def test_an_unwritable_cache_directory_falls_back_to_a_temporary_one(tmp_path):
    blocker = tmp_path / "not_a_dir"
    blocker.write_text("")
    path = _jit.choose_cache_dir("0123456789abcdef", {"NUMBA_CACHE_DIR": str(blocker)})
    assert path is not None
    assert path.name == "0123456789abcdef"
    assert not path.is_relative_to(blocker)


def test_a_new_key_prunes_all_but_the_most_recently_used(tmp_path):
    now = time.time()
    for i in range(_jit.KEEP_KEYS + 2):
        old = tmp_path / f"simheat-{i:016x}"
        old.mkdir()
        os.utime(old, (now - 1000 * (i + 1), now - 1000 * (i + 1)))
    (tmp_path / "other").mkdir()  # not a key directory: never touched
    path = _jit.choose_cache_dir("f" * 16, {"NUMBA_CACHE_DIR": str(tmp_path)})
    kept = sorted(p.name for p in tmp_path.iterdir())
    expected = [f"simheat-{i:016x}" for i in range(_jit.KEEP_KEYS - 1)]
    assert kept == sorted(["other", path.name, *expected])
