"""Turning pydantic's validation errors into one line a person can act on per problem:
``field.path: reason``, with the nearest known key for a typo.
"""

from __future__ import annotations

import difflib
from typing import Any

from pydantic import BaseModel, ValidationError

from exposure.inputs import field_path
from exposure.site.emitters import (
    ArrayEmitter,
    DirectionalEmitter,
    DishEmitter,
    OmniEmitter,
    PanelEmitter,
)
from exposure.site.record import AccessPoint, OperatorContact, Origin, SiteInfo, SiteRecord, Surface, WorkPosition
from exposure.vocabulary import EMITTER_KINDS

_EMITTER_MODELS: dict[str, type[BaseModel]] = {
    "panel": PanelEmitter,
    "omni": OmniEmitter,
    "dish": DishEmitter,
    "array": ArrayEmitter,
    "directional": DirectionalEmitter,
}


def format_validation_errors(exc: ValidationError, data: dict | None = None) -> list[str]:
    """One line per problem: ``field.path: reason``."""
    lines = []
    for err in exc.errors(include_url=False):
        loc = _clean_loc(err["loc"])
        lines.append(f"{field_path(loc)}: {_reason(dict(err), loc, data or {})}")
    return list(dict.fromkeys(lines))  # unions can repeat a line; keep the first


def _clean_loc(loc: tuple) -> tuple:
    """Drop the discriminator tag pydantic puts after ``emitters[i]``."""
    loc = tuple(loc)
    if len(loc) >= 3 and loc[0] == "emitters" and isinstance(loc[1], int) and loc[2] in _EMITTER_MODELS:
        loc = loc[:2] + loc[3:]
    return loc


def _model_at(loc: tuple, kind: Any) -> type[BaseModel] | None:
    if not loc:
        return SiteRecord
    head = loc[0]
    if head == "site" and len(loc) == 1:
        return SiteInfo
    if loc == ("site", "origin"):
        return Origin
    if len(loc) == 2 and isinstance(loc[1], int):
        if head == "surfaces":
            return Surface
        if head == "work_positions":
            return WorkPosition
        if head == "access_points":
            return AccessPoint
        if head == "operators":
            return OperatorContact
        if head == "emitters":
            return _EMITTER_MODELS.get(kind) if isinstance(kind, str) else None
    return None


def _reason(err: dict, loc: tuple, data: dict) -> str:
    kind = err["type"]
    value = err.get("input")
    if kind == "extra_forbidden":
        key = loc[-1] if loc else "?"
        model = _model_at(loc[:-1], _emitter_kind(data, loc))
        hint = ""
        if model is not None:
            close = difflib.get_close_matches(str(key), list(model.model_fields), n=1, cutoff=0.6)
            hint = f"; did you mean {close[0]!r}?" if close else f"; allowed: {', '.join(model.model_fields)}"
        return f"unknown key (a typo would silently drop a value, so it is refused){hint}"
    if kind == "missing":
        return "required key missing"
    if kind == "union_tag_invalid":
        return f"kind {err['ctx']['tag']!r} is not one of {err['ctx']['expected_tags']}"
    if kind == "union_tag_not_found":
        return "kind is required: one of " + ", ".join(repr(k) for k in EMITTER_KINDS)
    if kind in ("finite_number",):
        return f"must be a finite number, got {value!r}"
    if kind in ("float_type", "int_type", "float_parsing", "int_parsing", "int_from_float"):
        what = "a whole number" if kind.startswith("int") else "a number"
        return f"must be {what}, got {_type_name(value)} {value!r}"
    if kind == "string_pattern_mismatch":
        pattern = err["ctx"]["pattern"]
        if pattern == "^[a-z0-9_-]+$":
            return f"{value!r} may hold only lower-case letters, digits, '_' and '-' (it names output files)"
        return f"{value!r} does not match {pattern}"
    if kind == "literal_error":
        return f"{value!r} is not one of {err['ctx']['expected']}"
    if kind == "value_error":
        return str(err["ctx"]["error"])
    message = err["msg"].replace("Input should be", "must be").replace("List should", "must")
    message = message.replace("Value should", "must")
    if isinstance(value, (int, float, str)) and not isinstance(value, bool):
        message += f", got {value!r}"
    return message


def _emitter_kind(data: dict, loc: tuple) -> Any:
    """The ``kind`` of the emitter a location points into, read from the raw document."""
    if len(loc) >= 2 and loc[0] == "emitters" and isinstance(loc[1], int):
        emitters = data.get("emitters")
        if isinstance(emitters, list) and loc[1] < len(emitters) and isinstance(emitters[loc[1]], dict):
            return emitters[loc[1]].get("kind")
    return None


def _type_name(value: Any) -> str:
    return {str: "text", bool: "true/false", list: "a list", dict: "a table"}.get(type(value), type(value).__name__)
