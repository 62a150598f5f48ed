"""Numbers and units as people read them, one way everywhere: the CLI's tables, the findings
and next steps built from the JSON, and the PDF all format through these functions (so the
same number never reads "14721 %" in one place and "14,721 %" in another).
"""

from __future__ import annotations

import math

__all__ = ["number", "percent", "distance", "area", "point", "angle", "scale_factor", "POWER_DENSITY_UNIT"]

POWER_DENSITY_UNIT = "W/m²"


def number(value: float | None, digits: int = 3) -> str:
    """A quantity to *digits* significant figures, thousands separated; '-' for None."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "-"
    if value == 0:
        return "0"
    if abs(value) >= 10**digits:
        return f"{value:,.0f}"
    text = f"{value:.{digits}g}"
    if "e" in text:  # tiny values: plain decimals, never exponents, in a worksheet
        text = f"{value:.{digits + 2 - int(math.floor(math.log10(abs(value))))}f}".rstrip("0").rstrip(".")
    return text


def percent(ratio: float | None) -> str:
    """An exposure ratio as a percentage of the limit: ``1.53`` -> ``'153 %'``."""
    if ratio is None or (isinstance(ratio, float) and math.isnan(ratio)):
        return "-"
    value = 100.0 * ratio
    if 0 < value < 0.01:
        return "< 0.01 %"
    return f"{number(value)} %"


def distance(metres: float | None) -> str:
    """A boundary distance [m]: '0' where the limit is never exceeded, else decimetres."""
    if metres is None or (isinstance(metres, float) and math.isnan(metres)):
        return "-"
    if metres == 0:
        return "0"
    if metres < 1:
        return f"{metres:.2f}"
    return f"{metres:,.1f}"


def area(square_metres: float | None) -> str:
    """An area [m²] to 0.1 m²."""
    if square_metres is None:
        return "-"
    if square_metres == 0:
        return "0"
    return f"{square_metres:,.1f}"


def point(xyz) -> str:
    """A site-frame point as ``(x, y, z)`` in metres to 0.1 m."""
    return "(" + ", ".join(f"{float(c):.1f}" for c in xyz) + ")"


def angle(degrees: float | None) -> str:
    """An angle [deg] or '-' where the emitter has none (omni)."""
    if degrees is None:
        return "-"
    return f"{degrees:g}"


def scale_factor(scale: float | None) -> str:
    """A power scale factor: ``0.42`` -> ``'× 0.42'``; '-' where none applies."""
    if scale is None or not math.isfinite(scale):
        return "-"
    return f"× {number(scale, 2)}"
