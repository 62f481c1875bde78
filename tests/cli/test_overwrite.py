"""Every command refuses to replace an output file with the same one-line message."""

from __future__ import annotations

import click
import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.cli.common import SimheatCommand, exists_message, refuse_to_overwrite

# (arguments after the scenario, file the command writes relative to --out)
WRITERS = {
    "run": (["run", "{scenario}", "--out", "{out}"], "tiny_direct_return.h5"),
    "run_figure": (
        ["run", "{scenario}", "--out", "{out}"],
        "tiny_direct_return_warmup.png",
    ),
    "compare": (["compare", "{scenario}", "--out", "{out}"], "tiny_compare.png"),
    "throttle_all": (
        [
            "throttle",
            "{scenario}",
            "--emitter",
            "all",
            "--opening",
            "0",
            "--out",
            "{out}",
        ],
        "tiny_direct_return_throttle.png",
    ),  # fmt: skip
    "throttle_at_min": (
        [
            "throttle",
            "{scenario}",
            "--emitter",
            "front_rad",
            "--opening",
            "0",
            "--at-min",
            "10",
            "--out",
            "{out}",
        ],
        "tiny_direct_return_throttle_front_rad.png",
    ),  # fmt: skip
    "layouts": (
        ["layouts", "{scenario}", "--scheme", "direct_return", "--figure", "{out}"],
        "tiny_direct_return_schematic.png",
    ),
}


@pytest.mark.parametrize("writer", sorted(WRITERS))
def test_existing_output_is_refused_in_one_line_and_kept(tiny_house, tmp_path, writer):
    args, name = WRITERS[writer]
    out = tmp_path / "out"
    out.mkdir()
    existing = out / name
    existing.write_bytes(b"keep me")
    argv = [a.format(scenario=tiny_house, out=out) for a in args]
    result = CliRunner().invoke(main, argv)
    assert result.exit_code == 2
    message = f"error: {existing} exists; pass --overwrite to replace it"
    if writer.startswith("run"):  # the one command that can keep what exists
        message += ", or --resume to keep complete runs of this scenario"
    assert result.stderr == message + "\n"
    assert existing.read_bytes() == b"keep me"
    assert sorted(p.name for p in out.iterdir()) == [name]  # nothing else written


def test_library_refusal_is_worded_for_the_command_line():
    # runs.store refuses in Python-API words; the CLI names its own option.
    @click.command("writer", cls=SimheatCommand)
    def writer() -> None:
        raise FileExistsError(
            "out/a.h5: file exists; pass overwrite=True to replace it"
        )

    result = CliRunner().invoke(writer, [])
    assert result.exit_code == 2
    assert result.stderr == "error: out/a.h5 exists; pass --overwrite to replace it\n"


def test_refuse_to_overwrite_names_the_first_existing_path(tmp_path):
    paths = [tmp_path / "a.png", tmp_path / "b.png", tmp_path / "c.png"]
    paths[1].touch()
    paths[2].touch()
    with pytest.raises(FileExistsError) as info:
        refuse_to_overwrite(paths, overwrite=False)
    assert info.value.filename == str(paths[1])
    refuse_to_overwrite(paths, overwrite=True)  # no error with the flag


def test_exists_message_is_one_line():
    assert exists_message("d/f.png") == "d/f.png exists; pass --overwrite to replace it"
