"""Room heat loss: coefficient and design load, one from the other."""

from __future__ import annotations

import pytest
from resolve_house import house

from simheat.errors import ScenarioError
from simheat.resolve import loads, resolve


def test_design_heat_load_gives_the_loss_coefficient():
    # 1550 W at 21 °C inside and -10 °C outside: 1550 / 31 = 50 W/K
    living = resolve(house()).rooms[0]
    assert living.heat_loss_W_K == pytest.approx(50.0, rel=1e-12)
    assert living.design_heat_load_W == pytest.approx(1550.0, rel=1e-12)


def test_loss_coefficient_gives_the_design_heat_load():
    # 30 W/K times (18 - (-10)) K = 840 W
    bed = resolve(house()).rooms[1]
    assert bed.heat_loss_W_K == 30.0
    assert bed.design_heat_load_W == pytest.approx(840.0, rel=1e-12)


def test_design_load_follows_the_design_outdoor_temperature():
    # the same 30 W/K at a design outdoor temperature of -16 °C: 30 * 34 = 1020 W
    scenario = house(("outdoor_temp_C = -10.0", "outdoor_temp_C = -16.0"))
    bed = scenario.rooms[1]
    loss = loads.heat_loss_W_K(bed, scenario.design)
    assert loads.design_heat_load_W(loss, bed, scenario.design) == pytest.approx(
        1020.0, rel=1e-12
    )


# The bedroom of the house described by its envelope instead of its 30 W/K. Hand
# calculation (EN 12831 simplified, see simheat.resolve.loads.envelope_load):
# setpoint 18 °C, outdoors -10 °C: 28 K; bridges 0.05 W/(m2 K) on every element
# not toward a heated room.
#   wall     10 m2 * (0.30 + 0.05) * 28           =  98.0 W
#   window    2 m2 * (1.20 + 0.05) * 28           =  70.0 W
#   ceiling  12 m2 * (0.20 + 0.05) * 0.8 * 28     =  67.2 W   (loft, b_u 0.8)
#   floor    12 m2 * (0.40 + 0.05) * 0.45 * 28    =  68.04 W  (ground factor 0.45)
#   wall to the living room at 21 °C: 9 m2 * 1.5 * (18 - 21) = -40.5 W
#   fabric 262.74 W; bridges 0.05*28*(10 + 2) + 0.05*28*(12*0.8 + 12*0.45) = 37.8 W
#   ventilation: 12 m2 * 2.4 m = 28.8 m3 at 0.6 /h = 17.28 m3/h, heat recovery 0.75:
#     0.34 * 17.28 * 0.25 * 28 = 41.1264 W
#   load 303.8664 W; reheat 12 m2 * 10 W/m2 = 120 W
ENVELOPE = """
air_changes_per_h = 0.6
heat_recovery = 0.75
reheat_W_per_m2 = 10.0
[[rooms.elements]]
name = "outer wall"
area_m2 = 10.0
u_W_per_m2K = 0.30
beyond = "outdoors"
[[rooms.elements]]
name = "window"
area_m2 = 2.0
u_W_per_m2K = 1.2
beyond = "outdoors"
[[rooms.elements]]
name = "ceiling to loft"
area_m2 = 12.0
u_W_per_m2K = 0.20
beyond = "unheated"
temperature_factor = 0.8
[[rooms.elements]]
name = "floor"
area_m2 = 12.0
u_W_per_m2K = 0.40
beyond = "ground"
temperature_factor = 0.45
[[rooms.elements]]
name = "wall to living"
area_m2 = 9.0
u_W_per_m2K = 1.5
beyond = "living"
"""
HAND_LOAD_W = 303.8664


def envelope_house(given: str = "", envelope: str = ENVELOPE):
    """The house with the bedroom's 30 W/K replaced by ``given`` and the envelope."""
    old = 'heat_loss_W_per_K = 30.0\nmass_class = "heavy"\n'
    new = given + 'mass_class = "heavy"\n' + envelope
    return house((old, new))


def test_envelope_load_matches_the_hand_calculation():
    # exact arithmetic of the hand calculation above; only round-off differs
    bed = resolve(envelope_house()).rooms[1]
    load = bed.envelope_load
    assert load.fabric_W == pytest.approx(262.74, rel=1e-12)
    assert load.thermal_bridges_W == pytest.approx(37.8, rel=1e-12)
    assert load.ventilation_W == pytest.approx(41.1264, rel=1e-12)
    assert load.total_W == pytest.approx(HAND_LOAD_W, rel=1e-12)
    assert load.reheat_W == pytest.approx(120.0, rel=1e-12)
    assert [e.loss_W for e in load.elements][-1] == pytest.approx(-40.5, rel=1e-12)


def test_computed_load_drives_the_model_like_a_given_one():
    computed = resolve(envelope_house())
    given = resolve(
        envelope_house(given=f"design_heat_load_W = {HAND_LOAD_W}\n", envelope="")
    )
    bed_c, bed_g = computed.rooms[1], given.rooms[1]
    assert not bed_c.load_given
    assert bed_c.design_heat_load_W == pytest.approx(HAND_LOAD_W, rel=1e-12)
    assert bed_c.heat_loss_W_K == pytest.approx(bed_g.heat_loss_W_K, rel=1e-12)
    assert computed.design_mass_flow_kg_s == pytest.approx(
        given.design_mass_flow_kg_s, rel=1e-12
    )


def test_given_load_drives_the_model_when_an_envelope_is_given_too():
    bed = resolve(envelope_house(given="design_heat_load_W = 500.0\n")).rooms[1]
    assert bed.load_given
    assert bed.design_heat_load_W == 500.0
    assert bed.envelope_load.total_W == pytest.approx(HAND_LOAD_W, rel=1e-12)


def test_ventilation_flow_is_an_alternative_to_air_changes():
    # 17.28 m3/h given directly: the same load as 0.6 air changes of 28.8 m3
    envelope = ENVELOPE.replace(
        "air_changes_per_h = 0.6", "ventilation_m3_per_h = 17.28"
    )
    bed = resolve(envelope_house(envelope=envelope)).rooms[1]
    assert bed.envelope_load.total_W == pytest.approx(HAND_LOAD_W, rel=1e-12)


def test_a_room_whose_envelope_gains_heat_is_refused():
    # only a wall to the warmer living room: 9 * 1.5 * (18 - 21) < 0
    envelope = """
air_changes_per_h = 0.0
[[rooms.elements]]
area_m2 = 9.0
u_W_per_m2K = 1.5
beyond = "living"
"""
    with pytest.raises(ScenarioError, match=r"rooms\[1\]\.elements: the design load"):
        resolve(envelope_house(envelope=envelope))


def test_bundled_envelope_scenario_computes_its_loads():
    # scenarios/terrace.toml, the bathroom by hand: 24 °C inside, -10 °C out, 34 K
    #   back wall 4 * 1.05 * 34 = 142.8; window 0.8 * 2.85 * 34 = 77.52
    #   ceiling to the loft 5 * 0.40 * 0.9 * 34 = 61.2
    #   wall to the back bedroom at 20 °C: 7 * 1.8 * 4 = 50.4
    #   extract 54 m3/h with recovery 0.7: 0.34 * 54 * 0.3 * 34 = 187.272
    #   total 519.192 W
    from pathlib import Path

    from simheat.scenario import load_scenario

    path = Path(__file__).resolve().parents[2] / "scenarios" / "terrace.toml"
    scenario = load_scenario(path)
    resolved = resolve(scenario).rooms
    rooms = {r.id: rr for r, rr in zip(scenario.rooms, resolved, strict=True)}
    assert rooms["bath"].design_heat_load_W == pytest.approx(519.192, rel=1e-12)
    assert not rooms["bath"].load_given
    # the hall gives 650 W and describes its envelope: the given load drives
    assert rooms["hall"].load_given
    assert rooms["hall"].design_heat_load_W == 650.0
    assert rooms["hall"].envelope_load.total_W != pytest.approx(650.0, rel=0.05)
    assert all(rr.envelope_load is not None for rr in rooms.values())
