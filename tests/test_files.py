"""Files that survive a kill: temporary names, renames, and stale leftovers."""

from __future__ import annotations

import os
import subprocess
import sys
import time

import pytest

from simheat.errors import OutputError
from simheat.files import (
    STALE_AFTER_S,
    TEMPORARY_PREFIX,
    atomic_path,
    clean_stale,
    output_folder,
    temporary_path,
    write_text,
)


def _dead_pid() -> int:
    """The id of a process that has exited (and been reaped)."""
    child = subprocess.Popen([sys.executable, "-c", "pass"])
    child.wait()
    return child.pid


def _leftover(folder, pid: int, age_s: float, name: str = "run.h5"):
    path = folder / f"{TEMPORARY_PREFIX}{pid}-abcd1234-{name}"
    path.write_bytes(b"half a file")
    stamp = time.time() - age_s
    os.utime(path, (stamp, stamp))
    return path


def test_temporary_name_carries_prefix_pid_and_final_name(tmp_path):
    tmp = temporary_path(tmp_path / "house_direct_return.h5")
    assert tmp.parent == tmp_path
    assert tmp.name.startswith(f"{TEMPORARY_PREFIX}{os.getpid()}-")
    assert tmp.name.endswith("-house_direct_return.h5")


def test_write_leaves_only_the_final_file(tmp_path):
    write_text("hello\n", tmp_path / "a.txt")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.txt"]
    assert (tmp_path / "a.txt").read_text() == "hello\n"


def _write_half_and_fail(target) -> None:
    with atomic_path(target) as tmp:
        tmp.write_text("half")
        raise RuntimeError("killed half-way")


def test_failure_inside_the_block_leaves_nothing(tmp_path):
    with pytest.raises(RuntimeError, match="killed half-way"):
        _write_half_and_fail(tmp_path / "a.txt")
    assert list(tmp_path.iterdir()) == []


def test_existing_file_is_refused_without_overwrite(tmp_path):
    target = tmp_path / "a.txt"
    target.write_text("old")
    with pytest.raises(FileExistsError, match="file exists") as caught:
        write_text("new", target)
    assert caught.value.filename == str(target)
    assert target.read_text() == "old"
    write_text("new", target, overwrite=True)
    assert target.read_text() == "new"


def test_stale_leftover_of_a_dead_writer_is_cleaned_on_the_next_write(tmp_path):
    stale = _leftover(tmp_path, _dead_pid(), STALE_AFTER_S + 60.0)
    write_text("x", tmp_path / "b.txt")
    assert not stale.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["b.txt"]


def test_recent_leftover_of_a_dead_writer_is_kept(tmp_path):
    # It may belong to a writer this machine cannot see (a shared folder).
    recent = _leftover(tmp_path, _dead_pid(), STALE_AFTER_S / 2.0)
    assert clean_stale(tmp_path) == []
    assert recent.exists()


def test_old_leftover_of_a_running_writer_is_kept(tmp_path):
    own = _leftover(tmp_path, os.getpid(), STALE_AFTER_S + 60.0)
    assert clean_stale(tmp_path) == []
    assert own.exists()


@pytest.mark.parametrize(
    "name",
    [
        "notes.tmp",  # not our prefix
        f"{TEMPORARY_PREFIX}nopid-run.h5",  # our prefix, no process id
        "house.h5",
    ],
)
def test_files_not_ours_are_never_touched(tmp_path, name):
    path = tmp_path / name
    path.write_text("keep")
    stamp = time.time() - 10 * STALE_AFTER_S
    os.utime(path, (stamp, stamp))
    assert clean_stale(tmp_path) == []
    assert path.exists()


def test_output_folder_below_a_regular_file_is_one_line(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("")
    with pytest.raises(OutputError, match=r"file/out: cannot make the output folder"):
        output_folder(blocker / "out")


def test_output_folder_that_is_a_file_is_refused(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("")
    with pytest.raises(OutputError, match=r"file: output folder is a file"):
        output_folder(blocker)


def test_output_folder_is_made_and_left_clean(tmp_path):
    folder = output_folder(tmp_path / "a" / "b")
    assert folder.is_dir()
    assert list(folder.iterdir()) == []
