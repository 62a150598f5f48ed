"""Print the full-wave validation table of the README: ``python -m tests.fullwave.validation``.

For each reference antenna (:mod:`tests.fullwave.antennas`, described by the datasheet
values read off its own cuts) and each region — the element zone, the radiating near field
and the far field (:mod:`tests.fullwave.compare`) — the tool's auto model (peak evaluation,
no reflection) over the full-wave power density, in dB: minimum, median and maximum; then
the main-beam compliance distance as a multiple of the full-wave distance (least and most
over boundaries from 0.5 m to 15 m), for the panels and collinears. Needs PyNEC (the test
extra); solving every antenna afresh takes about 10 s.
"""

from __future__ import annotations

import numpy as np

from tests.fullwave import compare
from tests.fullwave.antennas import reference_antennas, wavelength


def _stats(values: np.ndarray) -> str:
    if values.size == 0:
        return "–"
    return f"{values.min():+.1f} / {np.median(values):+.1f} / {values.max():+.1f}"


def rows() -> list[list[str]]:
    out = []
    for antenna in reference_antennas():
        c = compare.compare(antenna)
        ratio = c.ratio_db
        distance = "–"
        if antenna.kind in ("panel", "omni") and antenna.length_m > wavelength(antenna.frequency_mhz):
            multiples = [m for _, m in compare.distance_ratios(antenna)]
            distance = f"{min(multiples):.2f}–{max(multiples):.2f}"
        out.append(
            [
                antenna.name,
                antenna.kind,
                f"{np.count_nonzero(~c.element)}",
                _stats(ratio[c.element]),
                _stats(ratio[c.near]),
                _stats(ratio[c.near & c.beam]),
                _stats(ratio[c.far]),
                _stats(ratio[c.far & c.beam]),
                distance,
            ]
        )
    return out


HEADER = [
    "antenna",
    "record kind",
    "points outside the element zone",
    "element zone",
    "radiating near field",
    "near field, main beam",
    "far field",
    "far field, main beam",
    "main-beam distance / full-wave",
]


def main() -> None:
    print("| " + " | ".join(HEADER) + " |")
    print("|" + "---|" * len(HEADER))
    for row in rows():
        print("| " + " | ".join(row) + " |")
    print("\ndB columns: tool / full-wave, min / median / max (auto model, peak evaluation, no reflection).")


if __name__ == "__main__":
    main()
