"""One emitter on its own: exemption from routine evaluation (47 CFR § 1.1307(b)(3);
:mod:`~exposure.screening.exemptions`) and the main-beam distances of ``exposure screen``
(:mod:`~exposure.screening.beam`)."""

from exposure.screening.beam import SCREEN_ORDER, ScreenRequest, screen_emitter
from exposure.screening.exemptions import (
    CITATION,
    Exemption,
    mpe_erp_threshold_w,
    mpe_exemption,
    one_milliwatt_exemption,
    sar_exemption,
    sar_threshold_mw,
)

__all__ = [
    "CITATION",
    "SCREEN_ORDER",
    "Exemption",
    "ScreenRequest",
    "mpe_erp_threshold_w",
    "mpe_exemption",
    "one_milliwatt_exemption",
    "sar_exemption",
    "sar_threshold_mw",
    "screen_emitter",
]
