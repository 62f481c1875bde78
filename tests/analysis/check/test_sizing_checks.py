"""Radiator output, pipe schedule, pump margin and source power of ``check``."""

from __future__ import annotations

import math

import pytest
from check_house import house, house_text
from scipy.optimize import brentq

from simheat.analysis.check import check_scheme
from simheat.analysis.check.fixes.radiator import RADIATOR_STEP_W, radiator_fix
from simheat.analysis.check.starving import design_point
from simheat.physics.pump import fit_pump_curve
from simheat.physics.water import density_kg_m3, specific_heat_J_kg_K
from simheat.scenario import parse_scenario

# EN 442-2 nominal log mean excess temperature, (75 - 65) / ln(55 / 45). [K]
DT_N = 10.0 / math.log(55.0 / 45.0)


def en442_output_W(nominal_W, n, supply_C, flow_kg_s, room_C, cp):
    """Steady output by EN 442 written out here: m cp (Ts - Tr) = Phi_n (LMTD/dTn)^n."""

    def balance(tr):
        lmtd = (supply_C - tr) / math.log((supply_C - room_C) / (tr - room_C))
        return flow_kg_s * cp * (supply_C - tr) - nominal_W * (lmtd / DT_N) ** n

    tr = brentq(balance, room_C + 1e-9, supply_C - 1e-9, xtol=1e-12)
    return flow_kg_s * cp * (supply_C - tr)


@pytest.fixture(scope="module")
def result():
    return check_scheme(house(), "direct_return")


def test_radiator_output_at_design_follows_en442(result):
    cp = float(specific_heat_J_kg_K(70.0 - 7.5))  # mean design water temperature
    for r in result.radiators:
        expected = en442_output_W(1400.0, 1.3, 70.0, r.design_flow_kg_s, 20.0, cp)
        assert r.output_W == pytest.approx(expected, rel=1e-9)
        # 1000 W share at 70/55 with a 20 °C room from 1.4 kW nominal: a margin
        assert r.share_W == pytest.approx(1000.0, rel=1e-12)
        assert not r.undersized


def test_nominal_for_load_gives_the_share_exactly(result):
    cp = float(specific_heat_J_kg_K(62.5))
    for r in result.radiators:
        out = en442_output_W(
            r.nominal_for_load_W, 1.3, 70.0, r.design_flow_kg_s, 20.0, cp
        )
        assert out == pytest.approx(r.share_W, rel=1e-8)


def test_header_too_small_is_flagged_for_velocity():
    small = check_scheme(house(header="cu_10x1"), "direct_return")
    rows = {p.link: p for p in small.pipes}
    first = rows["header:supply:rad_a"]
    # 6 kW at 15 K: m = 6000 / (cp 15); cu_10x1 bore 8 mm
    m = 6000.0 / (float(specific_heat_J_kg_K(62.5)) * 15.0)
    v = m / (float(density_kg_m3(62.5)) * math.pi / 4.0 * 0.008**2)
    assert first.design_velocity_m_s == pytest.approx(v, rel=1e-9)
    assert "velocity" in first.over_limit
    assert first.velocity_limit_m_s == 0.7  # [layout.sizing] default
    wide = check_scheme(house(header="cu_28x1"), "direct_return")
    headers = [p for p in wide.pipes if p.role == "header"]
    assert headers
    assert not any(p.over_limit for p in headers)


def test_pump_margin_is_the_curve_at_design_flow_minus_the_index_need(result):
    (pump,) = result.pumps
    # the scenario's curve as simheat fits it (m3/h, kPa in; SI coefficients out)
    a0, a1, a2 = fit_pump_curve([0.0, 0.3, 0.6, 0.9], [30.0, 28.0, 22.0, 12.0])
    q = pump.design_flow_m3_h / 3600.0
    assert pump.available_Pa == pytest.approx(a0 + a1 * q + a2 * q * q, rel=1e-6)
    assert pump.margin_Pa == pytest.approx(pump.available_Pa - pump.need_Pa)
    assert pump.index_emitter == "rad_f"  # the longest circuit of direct return


def test_source_compares_its_power_with_the_design_load(result):
    assert result.source.design_load_W == pytest.approx(6000.0, rel=1e-12)
    assert result.source.margin_W == pytest.approx(12000.0 - 6000.0, rel=1e-12)
    assert result.source.at_limit_fraction is None


def test_undersized_radiator_gets_the_smallest_bigger_radiator():
    text = house_text(header="cu_28x1").replace(
        'id = "rad_c"\nroom = "c"\nnominal_power_kW = 1.4',
        'id = "rad_c"\nroom = "c"\nnominal_power_kW = 1.1',
    )
    scenario = parse_scenario(text, origin="small_radiator.toml")
    result = check_scheme(scenario, "direct_return")
    (short,) = result.starving
    assert (short.id, short.reason) == ("rad_c", "output")
    (fix,) = short.fixes
    assert fix.ok
    assert fix.output_W >= 1000.0
    nominal = fix.edits[0].value * 1e3
    cp = float(specific_heat_J_kg_K(62.5))
    flow = 1000.0 / (cp * 15.0)
    # 10 W less falls short of the 1000 W share at design flow (EN 442 above)
    less = en442_output_W(nominal - RADIATOR_STEP_W, 1.3, 70.0, flow, 20.0, cp)
    assert less < 1000.0 <= en442_output_W(nominal, 1.3, 70.0, flow, 20.0, cp)
    assert radiator_fix(design_point(scenario, "direct_return"), 2).edits == fix.edits
