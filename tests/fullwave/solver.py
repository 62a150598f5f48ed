"""The full-wave reference: nec2++ (method of moments on thin wires) through PyNEC.

:func:`solve` runs the solver for one :class:`~tests.fullwave.antennas.WireAntenna` and
returns a :class:`Solution`: the input power, the principal-plane far-field cuts, and the
near fields at the comparison points (:func:`comparison_points`) as power densities.

Conventions (docs/references.md § 9): nec2++ phasors are peak values, so the input power is
P = ½ Re(V I*) summed over the feeds, and the plane-wave equivalent power densities are
S_E = |E|²/(2 Z₀) and S_H = Z₀|H|²/2. The wires are lossless, so the radiated power is
the input power. The reference power density is the larger of S_E and S_H at each point
(the stricter of the two, as a field meter reading E or H would see it).

Results are cached under ``cache/`` keyed by the geometry's hash and the points' hash:
the suite reads the cache and re-solves only what changed; :func:`solve_points` computes
fields afresh for a few points so that a test can hold the cache to the live solver.
"""

from __future__ import annotations

import hashlib
import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from tests.fullwave.antennas import WireAntenna, wavelength

Z0_OHM = 376.730313668  # CODATA 2018 characteristic impedance of vacuum
CACHE = Path(__file__).resolve().parent / "cache"
CACHE_VERSION = 2


@dataclass
class Solution:
    antenna: WireAntenna
    input_power_w: float
    h_cut_deg: np.ndarray  # azimuth off boresight, -180..180
    h_cut_dbi: np.ndarray
    v_cut_deg: np.ndarray  # angle below the horizon in the boresight plane, -90..270 (on over the back)
    v_cut_dbi: np.ndarray
    points_m: np.ndarray  # (n, 3)
    s_e: np.ndarray  # |E|^2 / (2 Z0) [W/m^2]
    s_h: np.ndarray  # Z0 |H|^2 / 2 [W/m^2]

    @property
    def reference_w_m2(self) -> np.ndarray:
        """The stricter plane-wave equivalent: max(S_E, S_H) [W/m²] per point."""
        return np.maximum(self.s_e, self.s_h)

    @property
    def peak_gain_dbi(self) -> float:
        return float(max(self.h_cut_dbi.max(), self.v_cut_dbi.max()))


def _context(antenna: WireAntenna):
    from PyNEC import nec_context

    context = nec_context()
    geometry = context.get_geometry()
    for tag, w in enumerate(antenna.wires, start=1):
        geometry.wire(tag, w.segments, *w.a, *w.b, w.radius_m, 1.0, 1.0)
    context.geometry_complete(0)
    context.gn_card(-1, 0, 0, 0, 0, 0, 0, 0)  # free space
    for feed in antenna.feeds:
        w = antenna.wires[feed.wire]
        # I1 = 0 (applied field voltage source), I4 = 0; the first source resets the list
        context.ex_card(0, feed.wire + 1, w.segments // 2 + 1, 0, feed.voltage[0], feed.voltage[1], 0, 0, 0, 0)
    context.fr_card(0, 1, antenna.frequency_mhz, 0)
    context.xq_card(0)
    return context


def _input_power(context, antenna: WireAntenna) -> float:
    params = context.get_input_parameters(0)
    v = np.asarray(params.get_voltage())
    i = np.asarray(params.get_current())
    return float(0.5 * np.sum((v * np.conj(i)).real))


def _cut(context, index: int, n_theta: int, n_phi: int, theta0: float, phi0: float, dtheta: float, dphi: float):
    context.rp_card(0, n_theta, n_phi, 0, 0, 0, 0, theta0, phi0, dtheta, dphi, 0, 0)
    pattern = context.get_radiation_pattern(index)
    return (
        np.asarray(pattern.get_gain(), dtype=float).reshape(n_theta, n_phi)
        if n_phi > 1
        else np.asarray(pattern.get_gain(), dtype=float)
    )


def _fields(context, points: np.ndarray, first_index: int) -> tuple[np.ndarray, np.ndarray]:
    """Peak |E|² and |H|² at each point (one single-point NE/NH card each)."""
    e2 = np.empty(len(points))
    h2 = np.empty(len(points))
    index = first_index
    for k, (x, y, z) in enumerate(points):
        context.ne_card(0, 1, 1, 1, float(x), float(y), float(z), 0.0, 0.0, 0.0)
        nf = context.get_near_field_pattern(index)
        e2[k] = sum(abs(complex(np.asarray(c)[0])) ** 2 for c in (nf.get_field_x(), nf.get_field_y(), nf.get_field_z()))
        index += 1
        context.nh_card(0, 1, 1, 1, float(x), float(y), float(z), 0.0, 0.0, 0.0)
        nf = context.get_near_field_pattern(index)
        h2[k] = sum(abs(complex(np.asarray(c)[0])) ** 2 for c in (nf.get_field_x(), nf.get_field_y(), nf.get_field_z()))
        index += 1
    return e2, h2


def solve_points(antenna: WireAntenna, points: np.ndarray) -> tuple[float, np.ndarray, np.ndarray]:
    """Input power [W] and S_E, S_H [W/m²] at *points*, solved afresh (no cache)."""
    context = _context(antenna)
    power = _input_power(context, antenna)
    e2, h2 = _fields(context, np.asarray(points, dtype=float), 0)
    return power, e2 / (2.0 * Z0_OHM), 0.5 * Z0_OHM * h2


def _solve_uncached(antenna: WireAntenna, points: np.ndarray) -> Solution:
    context = _context(antenna)
    power = _input_power(context, antenna)
    # Vertical cut through boresight: theta 0..180 at phi = 0 (front) and phi = 180 (back), by 0.25 deg.
    front = _cut(context, 0, 721, 1, 0.0, 0.0, 0.25, 0.0)
    back = _cut(context, 1, 721, 1, 0.0, 180.0, 0.25, 0.0)
    theta = np.linspace(0.0, 180.0, 721)
    # angle below the horizon: front theta - 90 (-90..90); over the back 270 - theta (90..270)
    v_deg = np.concatenate([theta - 90.0, (270.0 - theta[::-1])[1:-1]])
    v = np.concatenate([np.ravel(front), np.ravel(back)[::-1][1:-1]])
    # Horizontal (conical) cut at the peak's elevation, as a datasheet's horizontal pattern:
    # phi = -180..180 by 0.5 deg.
    peak_theta = float(theta[int(np.argmax(front))])
    h_deg = np.linspace(-180.0, 180.0, 721)
    h = _cut(context, 2, 1, 721, peak_theta, -180.0, 0.0, 0.5)
    e2, h2 = _fields(context, points, 0)
    return Solution(antenna, power, h_deg, np.ravel(h), v_deg, v, points, e2 / (2.0 * Z0_OHM), 0.5 * Z0_OHM * h2)


def _points_key(points: np.ndarray) -> str:
    return hashlib.sha256(np.ascontiguousarray(np.round(points, 9)).tobytes()).hexdigest()[:12]


def solve(antenna: WireAntenna, points: np.ndarray | None = None) -> Solution:
    """The solution at the comparison points, from the cache when it holds this geometry."""
    pts = comparison_points(antenna) if points is None else np.asarray(points, dtype=float)
    path = CACHE / f"{antenna.name}-{antenna.key()}-{_points_key(pts)}-v{CACHE_VERSION}.npz"
    if path.exists():
        data = np.load(path)
        return Solution(
            antenna,
            float(data["input_power_w"]),
            data["h_cut_deg"],
            data["h_cut_dbi"],
            data["v_cut_deg"],
            data["v_cut_dbi"],
            data["points_m"],
            data["s_e"],
            data["s_h"],
        )
    solution = _solve_uncached(antenna, pts)
    CACHE.mkdir(exist_ok=True)
    for stale in CACHE.glob(f"{antenna.name}-*.npz"):
        stale.unlink()
    tmp = path.with_suffix(".part.npz")
    np.savez_compressed(
        tmp,
        input_power_w=solution.input_power_w,
        h_cut_deg=solution.h_cut_deg,
        h_cut_dbi=solution.h_cut_dbi,
        v_cut_deg=solution.v_cut_deg,
        v_cut_dbi=solution.v_cut_dbi,
        points_m=solution.points_m,
        s_e=solution.s_e,
        s_h=solution.s_h,
    )
    tmp.replace(path)
    return solution


# --------------------------------------------------------------------------------------
# Where the fields are compared


def far_field_distance(antenna: WireAntenna) -> float:
    """2L²/λ of the radiating length, at least 10 λ [m]: where the far-field checks start."""
    lam = wavelength(antenna.frequency_mhz)
    return max(2.0 * antenna.length_m**2 / lam, 10.0 * lam)


def comparison_points(antenna: WireAntenna) -> np.ndarray:
    """About 1,700 points (site frame, boresight +x) where model and solver are compared.

    The boresight from λ/2 to 3 × the far-field distance; horizontal rings all round at
    seven distances; the vertical plane through boresight, in front and behind; vertical
    lines in front of and behind the antenna; and 300 random points (seeded).
    """
    lam = wavelength(antenna.frequency_mhz)
    r_ff = far_field_distance(antenna)
    half = 0.5 * antenna.length_m
    pts = []
    for r in np.geomspace(0.5 * lam, 3.0 * r_ff, 80):  # boresight
        pts.append((r, 0.0, 0.0))
    azimuths = np.radians(np.arange(-180.0, 180.0, 5.0))
    rings = sorted({1.5 * lam, 3.0 * lam, 0.1 * r_ff, 0.2 * r_ff, 0.5 * r_ff, r_ff, 2.0 * r_ff})
    for r in rings:
        for a in azimuths:
            pts.append((r * math.cos(a), r * math.sin(a), 0.0))
    heights = np.linspace(-2.0 * half - 2.0 * lam, 2.0 * half + 2.0 * lam, 21)
    for x in np.geomspace(0.5 * lam, 1.5 * r_ff, 18):  # vertical plane through boresight
        for z in heights:
            pts.append((x, 0.0, z))
    for x in np.geomspace(0.5 * lam, 0.5 * r_ff, 8):  # behind
        for z in heights:
            pts.append((-x, 0.0, z))
    for x in (2.0 * lam, 0.2 * r_ff, -2.0 * lam):  # vertical lines, finer
        for z in np.linspace(-3.0 * half - 2.0 * lam, 3.0 * half + 2.0 * lam, 41):
            pts.append((x, 0.3 * lam, z))
    rng = np.random.default_rng(20261202)
    for _ in range(300):
        r = math.exp(rng.uniform(math.log(0.5 * lam), math.log(2.0 * r_ff)))
        v = rng.normal(size=3)
        v /= np.linalg.norm(v)
        pts.append(tuple(r * v))
    return np.asarray(pts, dtype=float)
