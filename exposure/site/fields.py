"""The building blocks of the site record: strict base model, constrained value types and the
plausibility ranges (stated in the JSON schema).
"""

from __future__ import annotations

import unicodedata
from typing import Annotated

from annotated_types import Len
from pydantic import (
    AfterValidator,
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
)

# Plausibility bounds (MAX_GAIN_DBI, MIN_GAIN_DBI in exposure.antenna): a gain outside them is
# refused outright; the softer test against the beamwidths is in `gain_problem`.

GAIN_REFUSE_MARGIN_DB = 6.0
GAIN_WARN_MARGIN_DB = 1.5


Positive = Annotated[float, Field(gt=0)]


NonNegative = Annotated[float, Field(ge=0)]


Coordinate = Annotated[float, Field(ge=-1e5, le=1e5)]


Beamwidth = Annotated[float, Field(gt=0, le=360)]


def _vertical_beamwidth(value: float) -> float:
    if value > 180.0:
        raise ValueError(f"a vertical half-power beamwidth is at most 180 deg (zenith to nadir), got {value:g}")
    return value


def _at_least_a_microwatt(value: float) -> float:
    if value < 1e-6:
        raise ValueError(f"{value:g} W is below 1 µW (-30 dBm), the smallest power a record takes")
    return value


VBeamwidth = Annotated[
    float,
    Field(gt=0, le=360, description="Vertical half-power beamwidth [deg], at most 180."),
    AfterValidator(_vertical_beamwidth),
]


Power = Annotated[float, Field(gt=0, le=1e7), AfterValidator(_at_least_a_microwatt)]


Tilt = Annotated[float, Field(ge=-90, le=90)]


Azimuth = Annotated[float, Field(ge=-360, le=360)]


_BIDI_CONTROLS = frozenset("\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")


def _no_control_characters(text: str, allowed: str = "") -> str:
    """Refuse control characters (terminal escapes, bidirectional overrides): a name reaches
    terminals, PDFs and file systems, and must read there as it was typed."""
    for c in text:
        if c in allowed:
            continue
        if unicodedata.category(c) == "Cc" or c in _BIDI_CONTROLS:
            raise ValueError(f"control character U+{ord(c):04X} is not allowed in text")
    return text


def _text_with_lines(text: str) -> str:
    return _no_control_characters(text, allowed="\n\t")


Name = Annotated[
    str, StringConstraints(strip_whitespace=True, min_length=1, max_length=200), AfterValidator(_no_control_characters)
]


FileName = Annotated[str, StringConstraints(min_length=1, max_length=1000), AfterValidator(_no_control_characters)]


NOTES_MAX_CHARS = 2000
"""Longest ``site.notes``: a paragraph of the worksheet, which must fit one page."""


Identifier = Annotated[str, StringConstraints(pattern=r"^[a-z0-9_-]+$", min_length=1, max_length=80)]


EmitterId = Annotated[str, StringConstraints(pattern=r"^[A-Za-z0-9_.-]+$", min_length=1, max_length=40)]


Point2 = Annotated[list[Coordinate], Len(2, 2)]


ApertureLength = Annotated[float, Field(ge=0.01, le=20)]
"""A radiating length [m]: from a 1 cm patch to a 20 m broadcast array."""


class Strict(BaseModel):
    """Base of every record model: no unknown keys, no NaN or infinity, no coercion."""

    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False, frozen=True)
