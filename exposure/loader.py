"""Reading site records from TOML or JSON into a validated, ready-to-evaluate site.

Every problem becomes one line naming the file, the field path and the reason, raised
together as :class:`exposure.errors.InputError`; nothing is half-loaded.
"""

from __future__ import annotations

import difflib
import hashlib
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pydantic import BaseModel, ValidationError

from exposure.antenna import EMITTER_KINDS, Antenna
from exposure.errors import InputError
from exposure.inputs import RECORD_MAX_BYTES, decode_text, parse_json, printable, read_input
from exposure.records import (
    SCHEMA_VERSION,
    ArrayEmitter,
    DirectionalEmitter,
    DishEmitter,
    OmniEmitter,
    PanelEmitter,
    SiteInfo,
    SiteRecord,
    Surface,
    WorkPosition,
)

MAX_FILE_BYTES = RECORD_MAX_BYTES
SUFFIXES = (".toml", ".json")
_EMITTER_MODELS: dict[str, type[BaseModel]] = {
    "panel": PanelEmitter,
    "omni": OmniEmitter,
    "dish": DishEmitter,
    "array": ArrayEmitter,
    "directional": DirectionalEmitter,
}


@dataclass(frozen=True)
class LoadedSite:
    """A validated site record with everything resolved that the assessment needs."""

    path: Path
    sha256: str
    record: SiteRecord
    table: Any  # exposure.limits.LimitTable
    antennas: tuple[Antenna, ...]
    warnings: tuple[str, ...] = field(default=())

    @property
    def id(self) -> str:
        return self.record.site.id


def read_document(path: str | Path) -> tuple[dict, bytes]:
    """Parse a TOML or JSON file into a dict; return it with the raw bytes.

    Raises
    ------
    InputError
        Missing, empty, binary, oversized or unparsable files, with the line of a syntax
        error.
    """
    path = Path(path)
    src = str(path)
    if path.suffix.lower() not in SUFFIXES:
        raise InputError(f"unknown file type {printable(path.suffix) or '(none)'!r}; use .toml or .json", src)
    raw = read_input(path, max_bytes=MAX_FILE_BYTES, what="site record")
    text = decode_text(raw, src, "site record")
    if path.suffix.lower() == ".toml":
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise InputError(f"TOML syntax error: {exc}", src) from None
        except RecursionError:
            raise InputError("TOML nested too deeply to be a site record", src) from None
        except ValueError as exc:  # e.g. an integer longer than Python's digit limit
            raise InputError(f"TOML value out of range: {str(exc).split(';')[0]}", src) from None
    else:
        data = parse_json(text, src)
        if not isinstance(data, dict):
            raise InputError("the top level must be an object of site, surfaces and emitters", src)
    return data, raw


def validate_record(data: dict, source: str) -> SiteRecord:
    """Validate a parsed document as a site record, or raise one line per problem."""
    version = data.get("schema_version")
    if version is None:
        raise InputError(f"schema_version: required key missing (this version reads {SCHEMA_VERSION})", source)
    if type(version) is not int or version != SCHEMA_VERSION:
        raise InputError(
            f"schema_version: {version!r} is not supported (this version reads {SCHEMA_VERSION})", source
        )
    try:
        return SiteRecord.model_validate(data)
    except ValidationError as exc:
        raise InputError(format_validation_errors(exc, data), source) from None


def load_site(
    path: str | Path, *, standard: str | None = None, limits_file: str | Path | None = None
) -> LoadedSite:
    """Read, validate and resolve one site record.

    Parameters
    ----------
    path : path-like
        A ``.toml`` or ``.json`` site record.
    standard : str, optional
        Overrides ``site.standard``.
    limits_file : path-like, optional
        A local code's limit table; overrides ``site.limits_file`` and ``standard``.

    Raises
    ------
    InputError
        Every problem, one line each, naming the file and the field path.
    """
    from exposure.limits import resolve

    path = Path(path)
    src = str(path)
    data, raw = read_document(path)
    record = validate_record(data, src)

    if limits_file is None and standard is None and record.site.limits_file:
        limits_file = path.parent / record.site.limits_file
    try:
        table = resolve(standard or record.site.standard, limits_file)
    except InputError as exc:
        if not record.site.limits_file or standard is not None:
            raise
        raise InputError([f"site.limits_file: {line}" for line in exc.lines()], src) from None

    problems = []
    for i, emitter in enumerate(record.emitters):
        try:
            table.at(emitter.frequency_mhz)
        except InputError as exc:
            problems.extend(f"emitters[{i}].frequency_mhz: {p}" for p in exc.problems)
    antennas = []
    for i, emitter in enumerate(record.emitters):
        pattern = None
        if emitter.pattern_file:
            pattern_path = path.parent / emitter.pattern_file
            try:
                pattern = _read_pattern(pattern_path)
            except InputError as exc:
                problems.extend(f"emitters[{i}].pattern_file: {line}" for line in exc.lines())
                continue
        antennas.append(emitter.to_antenna(pattern))
    if problems:
        raise InputError(problems, src)

    return LoadedSite(
        path=path,
        sha256=hashlib.sha256(raw).hexdigest(),
        record=record,
        table=table,
        antennas=tuple(antennas),
        warnings=tuple(record.warnings()),
    )


def _read_pattern(path: Path):
    from exposure.patterns import read_pattern_csv

    return read_pattern_csv(path)


# --- turning pydantic's errors into lines a person can act on ---------------------------


def format_validation_errors(exc: ValidationError, data: dict | None = None) -> list[str]:
    """One line per problem: ``field.path: reason``."""
    lines = []
    for err in exc.errors(include_url=False):
        loc = _clean_loc(err["loc"])
        lines.append(f"{_loc_text(loc) or '(top level)'}: {_reason(err, loc, data or {})}")
    return list(dict.fromkeys(lines))  # unions can repeat a line; keep the first


def _clean_loc(loc: tuple) -> tuple:
    """Drop the discriminator tag pydantic puts after ``emitters[i]``."""
    loc = tuple(loc)
    if len(loc) >= 3 and loc[0] == "emitters" and isinstance(loc[1], int) and loc[2] in _EMITTER_MODELS:
        loc = loc[:2] + loc[3:]
    return loc


def _loc_text(loc: tuple) -> str:
    text = ""
    for part in loc:
        text += f"[{part}]" if isinstance(part, int) else (f".{part}" if text else str(part))
    return text


def _model_at(loc: tuple, kind: Any) -> type[BaseModel] | None:
    if not loc:
        return SiteRecord
    head = loc[0]
    if head == "site" and len(loc) == 1:
        return SiteInfo
    if len(loc) == 2 and isinstance(loc[1], int):
        if head == "surfaces":
            return Surface
        if head == "work_positions":
            return WorkPosition
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
