"""Every emitter of a site at once: the ``auto`` model of each, packed for the compiled kernel.

:class:`FusedKernel` takes the site's prepared emitters (:func:`exposure.models.prepare`) and
the reflection factor once, and gives each emitter's power density at any points in one
compiled pass (:mod:`exposure.models.compiled`): the same numbers as
:func:`exposure.models.power_density` with ``model="auto"`` (within 10⁻⁶ relative, tested),
several times faster. The numpy functions stay the reference; this is their fast twin.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np

from exposure.antenna import Antenna
from exposure.models import aperture, fresnel
from exposure.models.density import CHUNK_POINTS, model_for, reflection_factor
from exposure.models.prepared import Prepared, minimum_distance_m, prepare
from exposure.patterns import DishPattern, OmniPattern, SectorPattern, TabulatedPattern

_MODEL_CODES = {"spherical": 0, "synthetic": 1, "endfire": 2, "aperture": 3}


def _primitive_constants(row: np.ndarray, kv: float, sla: float) -> None:
    """The vertical primitive's constants below the cap, once per emitter (as the kernel computed
    them per point: the same floating-point operations)."""
    from exposure.models import compiled as c

    row[c.S_SQRT_KV] = math.sqrt(kv)
    row[c.S_KNEE] = math.sqrt(sla / kv) if kv > 0.0 else math.inf
    row[c.S_FLOOR] = math.exp(-sla)


def _pattern_row(pattern, row: np.ndarray, tables: list[np.ndarray], offset: int) -> int:
    """Write the pattern's parameters into *row*; append its tables. Returns the new table length."""
    from exposure.models import compiled as c

    if isinstance(pattern, SectorPattern):
        row[c.PATTERN] = c.PATTERN_SECTOR
        row[c.S_KH], row[c.S_KV], row[c.S_CAP] = pattern._kh, pattern._kv, pattern._cap
        row[c.S_H_CAP], row[c.S_SLA], row[c.S_TILT] = pattern._h_cap, pattern._sla, pattern._tilt
        row[c.S_H_HALF], row[c.S_H_KNEE], row[c.S_V_HALF] = pattern._h_half, pattern._h_knee, pattern._v_half
        _primitive_constants(row, pattern._kv, pattern._sla)
    elif isinstance(pattern, OmniPattern):
        row[c.PATTERN] = c.PATTERN_OMNI
        row[c.S_KV], row[c.S_SLA], row[c.S_TILT] = pattern._kv, pattern._sla, pattern._tilt
        _primitive_constants(row, pattern._kv, pattern._sla)
    elif isinstance(pattern, DishPattern):
        row[c.PATTERN] = c.PATTERN_DISH
        dl, gmax = pattern.diameter_over_wavelength, pattern.max_gain_dbi
        g1 = 2.0 + 15.0 * math.log10(dl)
        row[c.D_DL], row[c.D_GMAX], row[c.D_G1] = dl, gmax, g1
        row[c.D_PHI_M] = 20.0 / dl * math.sqrt(max(gmax - g1, 0.0))
        large = dl > 100.0
        row[c.D_PHI_R] = 15.85 * dl**-0.6 if large else 100.0 / dl
        row[c.D_LARGE] = float(large)
        row[c.D_BACK] = -10.0 if large else 10.0 - 10.0 * math.log10(dl)
        row[c.D_SIDE] = 32.0 if large else 52.0 - 10.0 * math.log10(dl)
    elif isinstance(pattern, TabulatedPattern) and pattern.rule == "envelope":
        row[c.PATTERN] = c.PATTERN_TABULATED
        for grid, values, (off, n, x0, step) in (
            (pattern._env_h_grid, pattern._env_h, (c.T_H_OFF, c.T_H_N, c.T_H_X0, c.T_H_STEP)),
            (pattern._env_v_grid, pattern._env_v, (c.T_V_OFF, c.T_V_N, c.T_V_X0, c.T_V_STEP)),
        ):
            row[off], row[n], row[x0] = offset, len(grid), grid[0]
            row[step] = (grid[-1] - grid[0]) / (len(grid) - 1)
            tables.append(np.asarray(values, dtype=float))
            offset += len(values)
        least = min(float(np.min(pattern._env_h)), float(np.min(pattern._env_v)), 0.0)
        row[c.GAIN_MAX] = math.exp(-least * c.NEPER_PER_DB)
        row[c.T_C_OFF], row[c.T_LEVELS], row[c.T_N_ALPHA] = offset, pattern._env_levels, pattern._n_alpha
        row[c.T_LEVEL_STEP], row[c.T_ALPHA_STEP] = pattern._ENV_LEVEL_DB, pattern._ALPHA_STEP_DEG
        tables.append(np.asarray(pattern._env_cumulative, dtype=float))
        offset += len(pattern._env_cumulative)
    else:  # pattern_for builds only the above for the models
        raise TypeError(f"no compiled form of {type(pattern).__name__}")
    return offset


def _emitter_row(prepared: Prepared, factor: float, tables: list[np.ndarray], offset: int) -> tuple[np.ndarray, int]:
    from exposure.models import compiled as c

    antenna = prepared.antenna
    model = model_for(prepared, "auto")
    row = np.zeros(c.PARAMS)
    row[c.ORIGIN : c.ORIGIN + 3] = prepared.origin
    row[c.AXES : c.AXES + 9] = np.asarray(prepared.axes, dtype=float).ravel()
    row[c.MODEL] = _MODEL_CODES[model]
    row[c.SCALE] = antenna.avg_eirp_w / (4.0 * math.pi)
    row[c.R_MIN] = minimum_distance_m(antenna)
    row[c.REFLECTION] = factor
    row[c.GAIN_MAX] = 1.0
    lam = antenna.wavelength_m
    pattern = prepared.pattern
    if model == "synthetic":
        length = fresnel.effective_length_m(float(antenna.length_m or 0.0), lam, pattern.v_beamwidth_deg)
        row[c.LENGTH] = length
        row[c.LOG_R_FF] = math.log(fresnel.far_field_distance_m(length, lam))
    elif model == "endfire":
        row[c.LENGTH] = float(antenna.length_m or 0.0)  # model_for made sure of it
    elif model == "aperture":
        d = float(antenna.diameter_m or 0.0)  # model_for made sure of it
        row[c.SCALE] = antenna.avg_net_power_w * antenna.gain_linear / (4.0 * math.pi)
        row[c.AP_R_NF] = float(aperture.near_field_extent_m(d, lam))
        row[c.AP_R_FF] = float(aperture.far_field_start_m(d, lam))
        row[c.AP_S_NF] = float(
            aperture.near_field_power_density(antenna.avg_net_power_w, d, antenna.aperture_efficiency)
        )
        row[c.AP_DIAMETER] = d
    if antenna.kind != "dish":  # the induction margin of the auto model (models.element)
        row[c.INDUCTION] = (lam / math.pi) ** 2  # (2/k)^2
        row[c.STRUCT_HALF] = 0.5 * (antenna.length_m or 0.0)
        row[c.STRUCT_ALONG_FORWARD] = float(antenna.kind == "directional")
    return row, _pattern_row(pattern, row, tables, offset)


class FusedKernel:
    r"""Each emitter's ``auto`` power density at any points, all emitters in one compiled pass.

    Parameters
    ----------
    antennas : sequence of Antenna or Prepared
        The site's emitters.
    reflection : {"none", "typical", "full"} or float
        Ground-reflection factor on power density (:func:`exposure.models.reflection_factor`).

    Notes
    -----
    Equal to ``np.stack([power_density(a, points, reflection=..., evaluation=...) for a in
    antennas])`` within 10⁻⁶ relative (``tests/models/test_compiled.py``); the reference's
    single-precision exponential is reproduced.

    References
    ----------
    As :func:`exposure.models.power_density` (docs/references.md §§ 3, 7–9).
    """

    def __init__(self, antennas: Sequence[Antenna | Prepared], reflection: str | float = "none") -> None:
        factor = reflection_factor(reflection)
        tables: list[np.ndarray] = []
        rows = []
        offset = 0
        for antenna in antennas:
            row, offset = _emitter_row(prepare(antenna), factor, tables, offset)
            rows.append(row)
        self.params = np.array(rows, dtype=float).reshape(len(rows), -1)
        self.tables = np.concatenate(tables) if tables else np.zeros(1)

    def __len__(self) -> int:
        return self.params.shape[0]

    def density(self, points, evaluation: str = "peak") -> np.ndarray:
        r"""Power density of every emitter at *points* [W/m²].

        Parameters
        ----------
        points : array_like, shape (..., 3)
            Site-frame points [m].
        evaluation : {"peak", "spatial-average"}
            As for :func:`exposure.models.power_density`.

        Returns
        -------
        ndarray, shape (emitters, ...)

        References
        ----------
        As :func:`exposure.models.power_density`.
        """
        from exposure.models.lanes import densities

        pts = np.asarray(points, dtype=float)
        shape = pts.shape[:-1]
        flat = pts.reshape(-1, 3)
        x, y, z = (np.ascontiguousarray(flat[:, k]) for k in range(3))
        out = np.empty((len(self), flat.shape[0]))
        if out.size:
            densities(self.params, self.tables, x, y, z, evaluation == "peak", out)
        return out.reshape((len(self), *shape))

    def field(self, index: int, evaluation: str = "peak") -> Callable[[np.ndarray], np.ndarray]:
        r"""Emitter *index*'s power density as a function of points, for the distance searches.

        Parameters
        ----------
        index : int
            The emitter's position in the site's list.
        evaluation : {"peak", "spatial-average"}
            As for :func:`exposure.models.power_density`.

        Returns
        -------
        callable
            ``field(points)``: points of shape (n, 3) [m] -> the emitter's density at each,
            shape (n,) [W/m²]; the numbers of :meth:`density` (within 10⁻⁶ relative of the
            numpy reference), one thread, no per-call allocation beyond the result.

        References
        ----------
        As :func:`exposure.models.power_density`.
        """
        from exposure.models.lanes import emitter_densities

        row, tables, peak = self.params[index], self.tables, evaluation == "peak"

        def field(points: np.ndarray) -> np.ndarray:
            pts = np.asarray(points, dtype=float).reshape(-1, 3)
            out = np.empty(pts.shape[0])
            emitter_densities(row, tables, pts[:, 0].copy(), pts[:, 1].copy(), pts[:, 2].copy(), peak, out)
            return out

        return field


__all__ = ["CHUNK_POINTS", "FusedKernel", "box_bounds"]


def box_bounds(kernel: FusedKernel, boxes) -> np.ndarray:
    r"""Upper bound of every emitter's power density over each box [W/m²].

    Parameters
    ----------
    kernel : FusedKernel
        The emitters (and the reflection factor).
    boxes : array_like, shape (n, 6)
        Site-frame boxes ``x0, x1, y0, y1, z0, z1`` [m].

    Returns
    -------
    ndarray, shape (emitters, n)
        Never below :meth:`FusedKernel.density` (either evaluation) at any point of the box.

    References
    ----------
    :mod:`exposure.models.bounds` (the bound and why it holds).
    """
    from exposure.models.bounds import box_bounds as compiled_bounds

    b = np.ascontiguousarray(boxes, dtype=float).reshape(-1, 6)
    out = np.empty((len(kernel), b.shape[0]))
    if out.size:
        compiled_bounds(kernel.params, b, out)
    return out
