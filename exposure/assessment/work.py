"""Work positions: the exposure of a worker standing there, and which emitters must be powered
down (largest contributor first) before work there.
"""

from __future__ import annotations

import numpy as np

from exposure.assessment.evaluate import SiteLimits, body_column, reduce_over_height
from exposure.assessment.results import (
    WorkPositionResult,
)


def work_position(site, position, limits: SiteLimits, offsets) -> WorkPositionResult:
    r"""A worker's exposure at a work position, and who must power down before work there.

    Parameters
    ----------
    site : Site
    position : WorkPosition
    limits : SiteLimits
    offsets : ndarray
        Heights sampled above the standing level [m].

    Returns
    -------
    WorkPositionResult
        The totals per tier; each emitter's contribution to the occupational total; the
        emitters to power down, largest contribution first, until the rest is within the
        occupational limit, and their operators.

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7).
    Power-down and lockout before entering an exclusion zone: common practice (IEEE C95.7;
    docs/references.md § 10).
    """
    evaluation = site.evaluation
    ratio, totals = body_column(site, position.x_m, position.y_m, position.z_m, limits)
    occupational = ratio["occupational"]
    local = ratio.get("occupational_local")  # the local criterion's per-emitter ratios, if any

    def total(keep) -> float:
        value = float(reduce_over_height(occupational[keep].sum(axis=0), evaluation))
        return value if local is None else max(value, float(local[keep].sum(axis=0).max(initial=0.0)))

    contributions = reduce_over_height(occupational, evaluation, axis=1)
    if local is not None:
        contributions = np.maximum(contributions, local.max(axis=1))
    order = np.argsort(-contributions, kind="stable")
    remaining = np.ones(len(site.antennas), dtype=bool)
    power_down: list[int] = []
    for i in order:
        if total(remaining) <= 1.0:
            break
        remaining[i] = False
        power_down.append(int(i))
    ids = [a.id for a in site.antennas]
    operators = list(dict.fromkeys(site.emitters[i].operator for i in power_down))
    return WorkPositionResult(
        name=position.name,
        point_m=(position.x_m, position.y_m, position.z_m),
        ratio=totals,
        contributions={ids[i]: float(contributions[i]) for i in order},
        power_down=tuple(ids[i] for i in power_down),
        power_down_operators=tuple(operators),
    )
