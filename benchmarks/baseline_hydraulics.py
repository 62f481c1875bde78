"""Plain numpy/scipy baseline for the flow split of a two-pipe ladder network.

This is the solve a careful engineer would write with scipy alone, for the same
ladder networks that :mod:`simheat.hydraulics.layouts` builds. It exists to give
the benchmark an honest reference point for simheat's compiled network solver,
and to check that both find the same flows.

Formulation (loop method)
-------------------------
The emitter links are the unknowns. Every other link (pump, source, feed pipes,
supply and return headers) belongs to a spanning tree; in a ladder that tree is a
single path from the end of the supply header through the plant to the end of
the return header. Each emitter closes one loop with that path. With the path
nodes numbered ``0..P`` and emitter ``j`` joining path positions ``a_j`` (its
``from_node``) and ``b_j`` (its ``to_node``):

- the flow of path link ``k`` (from position ``k-1`` to ``k``) is a cumulative
  sum of the emitter flows entering and leaving the path before position ``k``,
- node pressures along the path are cumulative sums of the link losses, and
- the residual of loop ``j`` is ``F_j(q_j) - (p(a_j) - p(b_j))``, where ``F`` is
  a link's pressure loss minus its pump rise.

The Jacobian is ``diag(F'_emitters) + D diag(F'_path) D^T`` with ``D`` the signed
loop-path incidence; since every loop covers one contiguous stretch of the path,
its entries are differences of a cumulative sum of ``F'_path`` over the overlap
of two stretches, assembled densely in ``O(N^2)``.

Physics are the same equations as simheat's compiled kernels
(:mod:`simheat.physics._kernels`), rewritten here as vectorised numpy:
Darcy-Weisbach with the laminar law below Re 2000, Colebrook-White above 4000
(Newton's method from the Swamee-Jain start) and a cubic Hermite blend between,
local losses with the same zero-flow regularisation, the Kv valve law with the
same leakage fraction, and the quadratic pump curve with the affinity laws.

This module also generates the benchmark ladders as scenario text, so that the
networks are built through the real path: TOML text ->
:func:`simheat.scenario.parse_scenario` -> :func:`simheat.hydraulics.layouts.build`.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

import numpy as np
import scipy.optimize

from simheat.hydraulics import layouts
from simheat.hydraulics.network import LINK_EMITTER, Network
from simheat.physics import _kernels as physics_kernels
from simheat.physics import water
from simheat.physics.pipe_catalog import pipe_type
from simheat.scenario import parse_scenario

# Constants shared with the compiled kernels, so both solve the same equations.
RE_LAMINAR_MAX = physics_kernels.RE_LAMINAR_MAX
RE_TURBULENT_MIN = physics_kernels.RE_TURBULENT_MIN
ZETA_V0_M_S = physics_kernels.ZETA_REGULARISATION_VELOCITY_M_S
FLOW_M0_KG_S = physics_kernels.REGULARISATION_MASS_FLOW_KG_S
LEAKAGE_FRACTION = physics_kernels.LEAKAGE_FRACTION
CHECK_R_PA_S_KG = physics_kernels.CHECK_VALVE_REVERSE_RESISTANCE_PA_S_KG
CHECK_BLEND_KG_S = physics_kernels.CHECK_VALVE_BLEND_FLOW_KG_S
# Kv definition Q [m3/h] = Kv sqrt(dp [bar] 1000 / rho), solved for dp with
# Q = 3600 m / rho: dp = KV_CONSTANT m^2 / (rho Kv^2).
KV_CONSTANT = 1e5 * 3600.0**2 / 1000.0
COLEBROOK_RTOL = 1e-14
COLEBROOK_MAX_ITER = 20

# --- benchmark ladders ---------------------------------------------------------
LADDER_TEE_SPACING_M = 3.0  # header length between neighbouring tees [m]
LADDER_BRANCH_LENGTH_M = 1.0  # branch length from header to emitter, one way [m]
LADDER_FEED_LENGTH_M = 4.0  # plant to the first tee, one way [m]
LADDER_BRANCH_PIPE = "cu_15x1"
LADDER_ROOM_LOAD_W = 1000.0  # design heat load per room (one emitter per room)
LADDER_TOTAL_LOAD_MAX_W = 80e3  # larger ladders get smaller rooms [W]
LADDER_SUPPLY_TEMP_C = 70.0
LADDER_DROP_K = 15.0
LADDER_OUTDOOR_C = -10.0
LADDER_SETPOINT_C = 20.0
# Header candidates, smallest first, and the design velocity they must keep to.
LADDER_HEADER_PIPES = ("cu_28x1", "cu_35x1.5", "cu_42x1.5", "cu_54x1.5")
LADDER_HEADER_PIPE_LARGE = "steel_dn50"  # used from LADDER_LARGE_N emitters on
LADDER_LARGE_N = 200
LADDER_HEADER_VELOCITY_MAX_M_S = 1.0
# Radiator valve of the ladders: a fine-preset body, Kv rising geometrically
# from preset 1 to 26 (an invented table spanning what balancing needs here).
LADDER_PRESETS = tuple(range(1, 27))
LADDER_PRESET_KV_M3_H = tuple(0.002 * 1.26 ** (p - 1) for p in LADDER_PRESETS)
# Pressure drop left for the index circuit's valve at design flow. [Pa]
LADDER_INDEX_VALVE_DP_PA = 10e3
# Pump curve H0 (1 - 0.25 (Q/Qd)^2): H(Qd) = 0.75 H0 is the design head and
# H(2 Qd) = 0.
LADDER_PUMP_HEAD_MAX_KPA = 1000.0  # scenario loader limit


def ladder_room_load_W(n_emitters: int) -> float:
    """Design heat load of each room of an ``n_emitters`` ladder. [W]"""
    return min(LADDER_ROOM_LOAD_W, LADDER_TOTAL_LOAD_MAX_W / n_emitters)


def ladder_design_flow_kg_s(n_emitters: int) -> float:
    """Design mass flow of each emitter of an ``n_emitters`` ladder. [kg/s]"""
    cp = float(water.specific_heat_J_kg_K(LADDER_SUPPLY_TEMP_C - LADDER_DROP_K / 2))
    return ladder_room_load_W(n_emitters) / (cp * LADDER_DROP_K)


def ladder_header_pipe(n_emitters: int) -> str:
    """Header pipe of an ``n_emitters`` ladder: smallest copper within 1 m/s."""
    if n_emitters >= LADDER_LARGE_N:
        return LADDER_HEADER_PIPE_LARGE
    rho = float(water.density_kg_m3(LADDER_SUPPLY_TEMP_C))
    total = n_emitters * ladder_design_flow_kg_s(n_emitters)
    for name in LADDER_HEADER_PIPES:
        d = pipe_type(name).inner_diameter_m
        if total / (rho * math.pi / 4.0 * d * d) <= LADDER_HEADER_VELOCITY_MAX_M_S:
            return name
    return LADDER_HEADER_PIPE_LARGE


def ladder_scenario_text(
    n_emitters: int,
    pump_head_at_design_kPa: float = 40.0,
    presets: list[int] | None = None,
) -> str:
    """Scenario TOML of a one-floor ladder: N rooms, one emitter each.

    Tees every 3 m with 1 m branches; the pump curve passes through
    ``pump_head_at_design_kPa`` at the total design flow; ``presets`` gives
    each emitter's valve preset (default: fully open, the highest).
    """
    load_W = ladder_room_load_W(n_emitters)
    power_kW = 1.1 * load_W / 1e3
    flow_m3_h = (
        n_emitters
        * ladder_design_flow_kg_s(n_emitters)
        / float(water.density_kg_m3(LADDER_SUPPLY_TEMP_C))
        * 3600.0
    )
    if presets is None:
        presets = [LADDER_PRESETS[-1]] * n_emitters
    h0 = pump_head_at_design_kPa / 0.75
    x = np.array([0.0, 0.5, 1.0, 1.5, 2.0])
    pump_flows = ", ".join(f"{v:.12g}" for v in x * flow_m3_h)
    pump_heads = ", ".join(f"{v:.12g}" for v in h0 * (1.0 - 0.25 * x * x))
    width = len(str(n_emitters))
    ids = [f"{i + 1:0{width}d}" for i in range(n_emitters)]
    out = [
        f'name = "Benchmark ladder, {n_emitters} emitters"',
        'schemes = ["direct_return", "reverse_return"]',
        "",
        "[design]",
        f"outdoor_temp_C = {LADDER_OUTDOOR_C}",
        f"supply_temp_C = {LADDER_SUPPLY_TEMP_C}",
        f"temperature_drop_K = {LADDER_DROP_K}",
        "",
        "[source]",
        f"max_power_kW = {1.2 * n_emitters * load_W / 1e3:.6g}",
        f"flow_temp_C = {LADDER_SUPPLY_TEMP_C}",
        "water_volume_L = 3.0",
        "",
        "[pump]",
        f"flow_m3_per_h = [{pump_flows}]",
        f"head_kPa = [{pump_heads}]",
        "",
        "[valve_types.ladder_valve]",
        f"presets = [{', '.join(str(p) for p in LADDER_PRESETS)}]",
        f"kv_m3_per_h = [{', '.join(f'{k:.12g}' for k in LADDER_PRESET_KV_M3_H)}]",
        "",
    ]
    for i in ids:
        out += [
            "[[rooms]]",
            f'id = "room{i}"',
            "floor_area_m2 = 14.0",
            f"design_heat_load_W = {load_W:.6g}",
            f"setpoint_C = {LADDER_SETPOINT_C}",
            "",
        ]
    for i, preset in zip(ids, presets, strict=True):
        out += [
            "[[emitters]]",
            f'id = "rad{i}"',
            f'room = "room{i}"',
            f"nominal_power_kW = {power_kW:.6g}",
            'valve_type = "ladder_valve"',
            f"preset = {int(preset)}",
            "",
        ]
    out += [
        "[route]",
        f'header_pipe = "{ladder_header_pipe(n_emitters)}"',
        f'branch_pipe = "{LADDER_BRANCH_PIPE}"',
        f"feed_length_m = {LADDER_FEED_LENGTH_M}",
        "insulated = true",
        "",
        "[[route.floors]]",
        "floor = 0",
        "tees = [",
    ]
    out += [
        f'  {{ emitter = "rad{i}", header_length_m = {LADDER_TEE_SPACING_M}, '
        f"branch_length_m = {LADDER_BRANCH_LENGTH_M} }},"
        for i in ids
    ]
    out += ["]", ""]
    return "\n".join(out)


@dataclass(frozen=True)
class Ladder:
    """A benchmark ladder built through the scenario path, pump and presets sized."""

    n_emitters: int
    scheme: str
    text: str
    network: Network
    header_pipe: str
    design_flow_kg_s: float  # per emitter
    index_loss_kPa: float  # worst loop loss at design flows, valve and pump excluded
    pump_head_at_design_kPa: float
    presets: tuple[int, ...]


def build_ladder(n_emitters: int, scheme: str, water_temp_C: float = 70.0) -> Ladder:
    """Build an ``n_emitters`` ladder of ``scheme``, balanced by valve presets.

    A first build (valves fully open) gives each loop's loss at design flows
    without its valve. The pump is sized to the worst loop plus
    ``LADDER_INDEX_VALVE_DP_PA`` for its valve; every other valve gets the
    preset whose Kv comes nearest (in ratio) to the one that takes up the
    rest of the pump head. The scenario is then built again. Discrete presets
    leave the flows within roughly +-12 % of design, as in a real commissioning.
    """
    provisional = layouts.build(
        parse_scenario(ladder_scenario_text(n_emitters), origin="<ladder>"), scheme
    )
    design = ladder_design_flow_kg_s(n_emitters)
    model = LadderBaseline(provisional, water_temp_C=water_temp_C)
    q = np.full(model.n_emitters, design)
    loss = model.loop_loss_Pa(q, include_pumps=False, include_valves=False)
    index_Pa = float(np.max(loss))
    head_Pa = index_Pa + LADDER_INDEX_VALVE_DP_PA
    if head_Pa / 0.75 > LADDER_PUMP_HEAD_MAX_KPA * 1e3:
        raise ValueError(
            f"a {n_emitters}-emitter ladder needs {head_Pa / 1e3:.0f} kPa at design "
            f"flow, beyond the pump-head limit of the scenario format"
        )
    rho = float(water.density_kg_m3(water_temp_C))
    kv_needed = q * np.sqrt(KV_CONSTANT / (rho * (head_Pa - loss)))
    table = np.log(np.array(LADDER_PRESET_KV_M3_H))
    nearest = np.argmin(np.abs(np.log(kv_needed)[:, None] - table[None, :]), axis=1)
    presets = tuple(int(LADDER_PRESETS[i]) for i in nearest)
    text = ladder_scenario_text(n_emitters, head_Pa / 1e3, list(presets))
    network = layouts.build(parse_scenario(text, origin="<ladder>"), scheme)
    return Ladder(
        n_emitters=n_emitters,
        scheme=scheme,
        text=text,
        network=network,
        header_pipe=ladder_header_pipe(n_emitters),
        design_flow_kg_s=design,
        index_loss_kPa=index_Pa / 1e3,
        pump_head_at_design_kPa=head_Pa / 1e3,
        presets=presets,
    )


# --- vectorised physics --------------------------------------------------------
def _colebrook(reynolds, relative_roughness):
    """Colebrook-White friction factor and d f / d Re, vectorised."""
    a = relative_roughness / 3.7
    b = 2.51 / reynolds
    k = 2.0 / math.log(10.0)
    x = -2.0 * np.log10(a + 5.74 / reynolds**0.9)  # Swamee-Jain start
    active = np.ones(x.shape, dtype=bool)
    for _ in range(COLEBROOK_MAX_ITER):
        inner = a + b * x
        step = (x + 2.0 * np.log10(inner)) / (1.0 + k * b / inner)
        step = np.where(active, step, 0.0)
        x = x - step
        active &= np.abs(step) > COLEBROOK_RTOL * np.abs(x)
        if not active.any():
            break
    inner = a + b * x
    dx_dre = (k * b * x / (reynolds * inner)) / (1.0 + k * b / inner)
    return 1.0 / (x * x), -2.0 * dx_dre / (x * x * x)


def friction_factor(reynolds, relative_roughness):
    """Darcy friction factor and d f / d Re for Re > 2000, vectorised.

    Colebrook-White from Re 4000, a cubic Hermite blend from the laminar law at
    Re 2000 in between (the laminar range itself is handled by the caller).
    """
    re = np.asarray(reynolds, dtype=np.float64)
    rr = np.broadcast_to(relative_roughness, re.shape)
    f = np.empty_like(re)
    df = np.empty_like(re)
    turbulent = re >= RE_TURBULENT_MIN
    if turbulent.any():
        f[turbulent], df[turbulent] = _colebrook(re[turbulent], rr[turbulent])
    blend = ~turbulent
    if blend.any():
        width = RE_TURBULENT_MIN - RE_LAMINAR_MAX
        f0 = 64.0 / RE_LAMINAR_MAX
        m0 = -64.0 / RE_LAMINAR_MAX**2 * width
        f1, df1 = _colebrook(np.full(blend.sum(), RE_TURBULENT_MIN), rr[blend])
        m1 = df1 * width
        s = (re[blend] - RE_LAMINAR_MAX) / width
        s2, s3 = s * s, s * s * s
        f[blend] = (
            (2 * s3 - 3 * s2 + 1) * f0
            + (s3 - 2 * s2 + s) * m0
            + (-2 * s3 + 3 * s2) * f1
            + (s3 - s2) * m1
        )
        df[blend] = (
            (6 * s2 - 6 * s) * f0
            + (3 * s2 - 4 * s + 1) * m0
            + (-6 * s2 + 6 * s) * f1
            + (3 * s2 - 2 * s) * m1
        ) / width
    return f, df


class LinkLosses:
    """Pressure loss minus pump rise of a set of links, and its flow slope.

    Water properties are evaluated once, at the links' fixed temperatures.
    """

    def __init__(self, network: Network, links: np.ndarray, water_temp_C) -> None:
        net = network
        temp = np.broadcast_to(
            np.asarray(water_temp_C, dtype=np.float64), (net.n_links,)
        )[links]
        self.n = len(links)
        self.rho = np.asarray(water.density_kg_m3(temp), dtype=np.float64)
        self.mu = np.asarray(water.viscosity_Pa_s(temp), dtype=np.float64)
        length, d = net.length_m[links], net.inner_diameter_m[links]
        zeta, kv = net.zeta[links], net.kv_m3_h[links]
        pump = np.asarray(net.pump_coeffs)[links]
        self.pipe = np.flatnonzero((length > 0.0) | (zeta > 0.0))
        self.valve = np.flatnonzero(kv > 0.0)
        self.pump = np.flatnonzero(np.any(pump != 0.0, axis=1))
        self.check = np.flatnonzero(np.asarray(net.check_valve)[links])
        p = self.pipe
        self.length, self.d = length[p], d[p]
        self.rough_rel = net.roughness_m[links][p] / d[p]
        self.zeta = zeta[p]
        self.area = 0.25 * math.pi * self.d**2
        self.kv = kv[self.valve]
        self.a0, self.a1, self.a2 = pump[self.pump].T

    def __call__(self, m, opening=None, pump_speed=1.0, include_valves=True):
        """Return ``(loss_Pa, slope_Pa_s_kg)`` for link flows ``m`` [kg/s].

        ``opening`` and ``pump_speed`` are one value per link (or one value);
        a pump at speed 0 is its curve's a2 resistance.
        """
        loss = np.zeros(self.n)
        slope = np.zeros(self.n)
        p = self.pipe
        if p.size:
            rho, mu = self.rho[p], self.mu[p]
            v = m[p] / (rho * self.area)
            speed = np.abs(v)
            re = rho * speed * self.d / mu
            dp = np.zeros(p.size)
            ds = np.zeros(p.size)
            has_l = self.length > 0.0
            lam = has_l & (re <= RE_LAMINAR_MAX)
            k_lam = 32.0 * mu * self.length / (self.d * self.d)
            dp[lam] = k_lam[lam] * v[lam]
            ds[lam] = k_lam[lam]
            turb = has_l & ~lam
            if turb.any():
                f, df = friction_factor(re[turb], self.rough_rel[turb])
                c = 0.5 * rho[turb] * self.length[turb] / self.d[turb]
                dp[turb] = c * f * v[turb] * speed[turb]
                ds[turb] = c * speed[turb] * (2.0 * f + re[turb] * df)
            z = self.zeta > 0.0
            root = np.sqrt(v * v + ZETA_V0_M_S**2)
            c = 0.5 * rho * self.zeta
            dp += np.where(z, c * v * root, 0.0)
            ds += np.where(z, c * (2.0 * v * v + ZETA_V0_M_S**2) / root, 0.0)
            loss[p] += dp
            slope[p] += ds / (rho * self.area)
        k = self.valve
        if k.size and include_valves:
            o = 1.0 if opening is None else np.clip(opening[k], 0.0, 1.0)
            kv = self.kv * (LEAKAGE_FRACTION + (1.0 - LEAKAGE_FRACTION) * o)
            c = KV_CONSTANT / (self.rho[k] * kv * kv)
            mk = m[k]
            root = np.sqrt(mk * mk + FLOW_M0_KG_S**2)
            loss[k] += c * mk * root
            slope[k] += c * (2.0 * mk * mk + FLOW_M0_KG_S**2) / root
        k = self.check
        if k.size:
            # closed check valve: -R (u - m_b ln(1 + u/m_b)) for reverse flow u
            u = np.maximum(-m[k], 0.0)
            loss[k] -= CHECK_R_PA_S_KG * (
                u - CHECK_BLEND_KG_S * np.log1p(u / CHECK_BLEND_KG_S)
            )
            slope[k] += CHECK_R_PA_S_KG * u / (CHECK_BLEND_KG_S + u)
        k = self.pump
        if k.size:
            rho = self.rho[k]
            speed = np.broadcast_to(np.asarray(pump_speed, dtype=np.float64), (self.n,))
            s = np.maximum(speed[k], 0.0)
            q = m[k] / rho
            q0 = FLOW_M0_KG_S / rho
            root = np.sqrt(q * q + q0 * q0)
            loss[k] -= self.a0 * s * s + self.a1 * s * q + self.a2 * q * root
            slope[k] -= (self.a1 * s + self.a2 * (2.0 * q * q + q0 * q0) / root) / rho
        return loss, slope


# --- the loop-method solve -----------------------------------------------------
@dataclass
class BaselineResult:
    """Outcome of one baseline solve."""

    method: str
    success: bool
    emitter_flow_kg_s: np.ndarray
    mass_flow_kg_s: np.ndarray  # every link, in network order
    max_residual_Pa: float
    nfev: int
    njev: int
    wall_s: float
    message: str


class LadderBaseline:
    """Loop-method flow solve of a ladder network with scipy.optimize.root.

    Parameters
    ----------
    network : Network
        A network whose non-emitter links form a single path spanning all nodes
        (both two-pipe layouts of simheat do).
    water_temp_C : float or ndarray
        Water temperature, one value or one per link. [°C]
    """

    def __init__(self, network: Network, water_temp_C=70.0) -> None:
        net = network
        self.network = net
        chords = np.flatnonzero(net.link_kind == LINK_EMITTER)
        emitter_links = net.emitter_links()
        if not np.array_equal(np.sort(chords), np.sort(emitter_links)):
            raise ValueError("every emitter link must carry an emitter index")
        self.chords = emitter_links  # unknown j is emitter j, scenario order
        tree = np.setdiff1d(np.arange(net.n_links), self.chords)
        if len(tree) != net.n_nodes - 1:
            raise ValueError(
                f"the non-emitter links ({len(tree)}) must form a spanning tree of "
                f"the {net.n_nodes} nodes"
            )
        # Walk the tree as a path: find an end, then follow the links.
        touching: list[list[int]] = [[] for _ in range(net.n_nodes)]
        for k in tree:
            touching[net.from_node[k]].append(int(k))
            touching[net.to_node[k]].append(int(k))
        degree = np.array([len(t) for t in touching])
        if degree.max() > 2 or np.count_nonzero(degree == 1) != 2:
            raise ValueError("the non-emitter links do not form a single path")
        node = int(np.flatnonzero(degree == 1)[0])
        position = np.full(net.n_nodes, -1, dtype=np.int64)
        position[node] = 0
        path_links, path_sign = [], []
        previous = -1
        for step in range(1, net.n_nodes):
            k = next(x for x in touching[node] if x != previous)
            forward = net.from_node[k] == node
            node = int(net.to_node[k] if forward else net.from_node[k])
            if position[node] >= 0:
                raise ValueError("the non-emitter links contain a loop")
            position[node] = step
            path_links.append(k)
            path_sign.append(1.0 if forward else -1.0)
            previous = k
        self.path_links = np.array(path_links, dtype=np.int64)
        self.path_sign = np.array(path_sign)
        self.n_path = len(path_links)
        self.pos_a = position[net.from_node[self.chords]]
        self.pos_b = position[net.to_node[self.chords]]
        self.lo = np.minimum(self.pos_a, self.pos_b)
        self.hi = np.maximum(self.pos_a, self.pos_b)
        self.sigma = np.where(self.pos_b < self.pos_a, 1.0, -1.0)
        self.n_emitters = len(self.chords)
        self.chord_losses = LinkLosses(net, self.chords, water_temp_C)
        self.path_losses = LinkLosses(net, self.path_links, water_temp_C)
        self._min_hi = np.minimum.outer(self.hi, self.hi)
        self._max_lo = np.maximum.outer(self.lo, self.lo)
        self._overlap = self._min_hi > self._max_lo
        self._sign_outer = np.outer(self.sigma, self.sigma)
        self._diag = np.arange(self.n_emitters)

    # flows ----------------------------------------------------------------
    def path_flow_kg_s(self, q: np.ndarray) -> np.ndarray:
        """Flow of each path link in its own direction, from emitter flows."""
        n = self.n_path + 1
        inject = np.bincount(self.pos_b, q, n) - np.bincount(self.pos_a, q, n)
        return self.path_sign * np.cumsum(inject)[:-1]

    def link_flows_kg_s(self, q: np.ndarray) -> np.ndarray:
        """Flow of every link in network order, from emitter flows."""
        m = np.empty(self.network.n_links)
        m[self.chords] = q
        m[self.path_links] = self.path_flow_kg_s(q)
        return m

    def _opening(self, opening, links):
        return None if opening is None else np.asarray(opening)[links]

    # equations ------------------------------------------------------------
    def loop_loss_Pa(
        self, q, opening=None, include_pumps=True, include_valves=True
    ) -> np.ndarray:
        """Pressure loss around each emitter loop (pump rise subtracted)."""
        path_loss, _ = self.path_losses(
            self.path_flow_kg_s(q), self._opening(opening, self.path_links)
        )
        if not include_pumps:
            path_loss = path_loss.copy()
            pumps = self.path_losses.pump
            path_loss[pumps] = 0.0
        chord_loss, _ = self.chord_losses(
            q, self._opening(opening, self.chords), include_valves=include_valves
        )
        cum = np.concatenate(([0.0], np.cumsum(self.path_sign * path_loss)))
        return chord_loss + self.sigma * (cum[self.hi] - cum[self.lo])

    def residual_Pa(self, q, opening=None) -> np.ndarray:
        """Pressure balance of each emitter loop. [Pa]"""
        return self.loop_loss_Pa(q, opening)

    def jacobian(self, q, opening=None) -> np.ndarray:
        """Analytic Jacobian of :meth:`residual_Pa`. [Pa s/kg]"""
        _, path_slope = self.path_losses(
            self.path_flow_kg_s(q), self._opening(opening, self.path_links)
        )
        _, chord_slope = self.chord_losses(q, self._opening(opening, self.chords))
        cum = np.concatenate(([0.0], np.cumsum(path_slope)))
        jac = np.where(self._overlap, cum[self._min_hi] - cum[self._max_lo], 0.0)
        jac *= self._sign_outer
        jac[self._diag, self._diag] += chord_slope
        return jac

    # solves -----------------------------------------------------------------
    def solve(
        self,
        q0: np.ndarray,
        *,
        method: str = "hybr",
        opening=None,
        xtol: float = 1e-12,
        fatol_Pa: float = 1e-6,
        max_iter: int = 200,
    ) -> BaselineResult:
        """Solve the loop equations from ``q0`` with ``scipy.optimize.root``.

        ``method="hybr"`` uses MINPACK's hybrid Powell method with the analytic
        Jacobian; ``method="krylov"`` uses Newton-Krylov (LGMRES, Jacobian-free).
        """
        q0 = np.asarray(q0, dtype=np.float64)

        def fun(q):
            return self.residual_Pa(q, opening)

        started = time.perf_counter()
        if method == "hybr":
            sol = scipy.optimize.root(
                fun,
                q0,
                jac=lambda q: self.jacobian(q, opening),
                method="hybr",
                options={"xtol": xtol},
            )
        elif method == "krylov":
            sol = scipy.optimize.root(
                fun,
                q0,
                method="krylov",
                options={"fatol": fatol_Pa, "maxiter": max_iter},
            )
        else:
            raise ValueError(f"unknown method {method!r}")
        wall = time.perf_counter() - started
        residual = float(np.max(np.abs(fun(sol.x))))
        return BaselineResult(
            method=method,
            success=bool(sol.success),
            emitter_flow_kg_s=sol.x,
            mass_flow_kg_s=self.link_flows_kg_s(sol.x),
            max_residual_Pa=residual,
            nfev=int(getattr(sol, "nfev", getattr(sol, "nit", -1))),
            njev=int(getattr(sol, "njev", 0)),
            wall_s=wall,
            message=str(sol.message),
        )


def max_relative_difference(a: np.ndarray, b: np.ndarray) -> float:
    """Largest ``|a - b| / |b|`` over entries (b taken as the reference)."""
    a, b = np.asarray(a), np.asarray(b)
    return float(np.max(np.abs(a - b) / np.maximum(np.abs(b), 1e-300)))
