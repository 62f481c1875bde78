"""save_figure writes through a temporary name and never replaces unasked."""

from __future__ import annotations

import pytest
from matplotlib.figure import Figure

from simheat.plots import save_figure


def small_figure() -> Figure:
    fig = Figure(figsize=(2.0, 1.5))
    fig.add_subplot().plot([0.0, 1.0], [0.0, 1.0])
    return fig


def test_existing_file_is_refused_and_kept(tmp_path):
    path = tmp_path / "f.png"
    path.write_bytes(b"keep me")
    with pytest.raises(FileExistsError) as info:
        save_figure(small_figure(), path)
    assert info.value.filename == str(path)
    assert path.read_bytes() == b"keep me"
    assert [p.name for p in tmp_path.iterdir()] == ["f.png"]  # no temporary left


def test_overwrite_replaces_the_file(tmp_path):
    path = tmp_path / "f.png"
    path.write_bytes(b"old")
    save_figure(small_figure(), path, overwrite=True)
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_only_the_figure_is_left_in_the_directory(tmp_path):
    save_figure(small_figure(), tmp_path / "f.svg")
    assert [p.name for p in tmp_path.iterdir()] == ["f.svg"]


def test_a_failed_write_leaves_no_file(tmp_path):
    class Broken(Figure):
        def savefig(self, fname, **kwargs):
            with open(fname, "wb") as f:
                f.write(b"half a fig")
            raise RuntimeError("renderer failed")

    with pytest.raises(RuntimeError, match="renderer failed"):
        save_figure(Broken(), tmp_path / "f.png")
    assert list(tmp_path.iterdir()) == []
