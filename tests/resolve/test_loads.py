"""Room heat loss: coefficient and design load, one from the other."""

from __future__ import annotations

import pytest
from resolve_house import house

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
