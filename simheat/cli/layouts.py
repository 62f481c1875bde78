"""``simheat layouts``: every piping scheme's pipe, fittings, index circuit and pump."""

from __future__ import annotations

import json
from pathlib import Path

import click

from simheat.cli.common import (
    SimheatCommand,
    json_option,
    scenario_argument,
    scheme_option,
)
from simheat.report import CAUTION

FITTING_WORDS = {
    "tee": ("tee", "tees"),
    "elbow": ("elbow", "elbows"),
    "manifold_connection": ("manifold connection", "manifold connections"),
    "diverter_tee": ("diverter tee", "diverter tees"),
    "low_loss_header": ("low-loss header", "low-loss headers"),
}


def _figures_text(f, limits) -> str:
    total = sum(f.pipe_length_m.values())
    lines = [f"{f.scheme}"]
    sizes = ", ".join(
        f"{name} {length:.1f} m" for name, length in f.pipe_length_m.items()
    )
    lines.append(f"  pipe:          {total:.1f} m ({sizes})")
    counts = ", ".join(
        f"{n} {FITTING_WORDS[kind][n != 1]}" for kind, n in f.fitting_count.items() if n
    )
    lines.append(f"  fittings:      {counts}")
    lines.append(
        f"  index circuit: {f.index_emitter}, {f.index_pressure_drop_kPa:.1f} kPa "
        "at design flows"
    )
    for p in f.pumps:
        lines.append(
            f"  pump duty:     {p.pump} {p.flow_m3_h:.2f} m3/h at {p.head_kPa:.1f} kPa"
        )
    lines.append(f"  water volume:  {f.water_volume_L:.1f} L")
    if f.over_limit:
        worst = ", ".join(
            f"{name} ({v:.2f} m/s, {g:.0f} Pa/m)" for name, v, g in f.over_limit[:3]
        )
        more = f" and {len(f.over_limit) - 3} more" if len(f.over_limit) > 3 else ""
        lines.append(
            f"  sizing:        {len(f.over_limit)} run(s) above the limits: "
            f"{worst}{more}"
        )
    else:
        lines.append("  sizing:        every run within the limits")
    return "\n".join(lines)


@click.command("layouts", cls=SimheatCommand)
@scenario_argument
@scheme_option
@json_option
@click.option(
    "--figure",
    "figure_dir",
    type=click.Path(file_okay=False, path_type=Path),
    help="Directory for one schematic (PNG) per scheme.",
)
@click.option("--overwrite", is_flag=True, help="Replace existing figures.")
def layouts_command(
    scenario: Path,
    scheme: str | None,
    as_json: bool,
    figure_dir: Path | None,
    overwrite: bool,
) -> None:
    """Compare every piping scheme: pipe, fittings, index circuit, pump, water.

    Without --scheme every scheme simheat knows is built from the scenario's one
    description of rooms, radiators and route.
    """
    from simheat.hydraulics.layouts import SCHEMES, describe
    from simheat.hydraulics.sizing import design_figures
    from simheat.scenario import load_scenario

    loaded = load_scenario(scenario)
    names = [scheme] if scheme else list(SCHEMES)
    built = {name: describe(loaded, name) for name in names}
    figures = {name: design_figures(b) for name, b in built.items()}
    paths = {}
    if figure_dir is not None:
        paths = {
            name: figure_dir / f"{scenario.stem}_{name}_schematic.png" for name in names
        }
        if not overwrite:
            for path in paths.values():
                if path.exists():
                    raise FileExistsError(
                        f"{path} exists; pass --overwrite to replace it"
                    )
        from simheat.plots import save_figure
        from simheat.plots.schematic import plot_schematic

        figure_dir.mkdir(parents=True, exist_ok=True)
        for name in names:
            title = f"{loaded.name}\n{name.replace('_', ' ')}"
            save_figure(plot_schematic(built[name], title=title), paths[name])
    limits = loaded.layout.sizing
    if as_json:
        data = {
            "scenario": loaded.name,
            "sizing_limits": {
                "mode": limits.mode,
                "header_velocity_max_m_per_s": limits.header_velocity_max_m_s,
                "branch_velocity_max_m_per_s": limits.branch_velocity_max_m_s,
                "gradient_max_Pa_per_m": limits.gradient_max_Pa_m,
            },
            "schemes": [
                {
                    **figures[name].to_dict(),
                    **({"figure": str(paths[name])} if paths else {}),
                }
                for name in names
            ],
            "caution": CAUTION,
        }
        click.echo(json.dumps(data, indent=2))
        return
    click.echo(f"{loaded.name}: piping schemes at design flows")
    click.echo(
        f"sizing limits ({limits.mode} sizes; common trade practice): "
        f"{limits.header_velocity_max_m_s:g} m/s in headers, "
        f"{limits.branch_velocity_max_m_s:g} m/s in branches, "
        f"{limits.gradient_max_Pa_m:g} Pa/m\n"
    )
    for name in names:
        click.echo(_figures_text(figures[name], limits))
        if paths:
            click.echo(f"  schematic:     {paths[name]}")
        click.echo("")
    click.echo(CAUTION)
