"""Reading site records from TOML or JSON into a validated, ready-to-evaluate site.

Every problem becomes one line naming the file, the field path and the reason, raised
together as :class:`exposure.errors.InputError`; nothing is half-loaded.
"""

from __future__ import annotations

import hashlib
import tomllib
from dataclasses import replace
from pathlib import Path

from pydantic import ValidationError

from exposure.antenna import PatternCuts
from exposure.errors import InputError
from exposure.inputs import (
    RECORD_MAX_BYTES,
    decode_text,
    parse_json,
    printable,
    read_input,
)
from exposure.site.emitters import EmitterBase
from exposure.site.messages import format_validation_errors
from exposure.site.model import AccessPoint, Document, Emitter, GeoOrigin, Site, Surface, WorkPosition
from exposure.site.pattern_file import read_pattern_csv
from exposure.site.record import SCHEMA_VERSION, SiteRecord

MAX_FILE_BYTES = RECORD_MAX_BYTES


SUFFIXES = (".toml", ".json")


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
        raise InputError(f"schema_version: {version!r} is not supported (this version reads {SCHEMA_VERSION})", source)
    try:
        return SiteRecord.model_validate(data)
    except ValidationError as exc:
        raise InputError(format_validation_errors(exc, data), source) from None


def load_record_data(
    data: dict,
    *,
    source: str = "<in-memory record>",
    base: str | Path | None = None,
    standard: str | None = None,
    limits_file: str | Path | None = None,
) -> Site:
    """Validate and resolve a site record given as a parsed document (the dict a TOML or JSON
    file holds), as :func:`load_site` does a file's.

    Parameters
    ----------
    data : dict
        The record.
    source : str
        The name its messages and results carry (default ``<in-memory record>``).
    base : path-like, optional
        The folder its relative paths (``pattern_file``, ``limits_file``) are read from;
        default the working folder.
    standard, limits_file : optional
        As for :func:`load_site`.

    Returns
    -------
    Site
        Its ``sha256`` is that of the record's canonical JSON (keys sorted).

    Raises
    ------
    InputError
        Every problem, one line each, naming the source and the field path.
    """
    import json

    record = validate_record(data, source)
    raw = json.dumps(data, sort_keys=True, ensure_ascii=False, default=str).encode("utf-8")
    path = Path(base if base is not None else ".") / source
    return site_from_record(record, path, raw, standard=standard, limits_file=limits_file)


def load_site(path: str | Path, *, standard: str | None = None, limits_file: str | Path | None = None) -> Site:
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
    path = Path(path)
    data, raw = read_document(path)
    record = validate_record(data, str(path))
    return site_from_record(record, path, raw, standard=standard, limits_file=limits_file)


def site_from_record(
    record: SiteRecord,
    path: Path,
    raw: bytes,
    *,
    standard: str | None = None,
    limits_file: str | Path | None = None,
) -> Site:
    """The :class:`Site` of a validated record: its limit table resolved, its pattern files read
    (relative to ``path``'s folder) and its emitters made plain.

    Parameters
    ----------
    record : SiteRecord
        From :func:`validate_record`.
    path : Path
        The record's file (or a name for an in-memory record, in the folder its relative paths
        are read from).
    raw : bytes
        The record's bytes, whose SHA-256 the site carries.
    standard, limits_file : optional
        As for :func:`load_site`.

    Returns
    -------
    Site
    """
    from exposure.limits import resolve

    src = str(path)

    if limits_file is None and standard is None and record.site.limits_file:
        limits_file = path.parent / record.site.limits_file
    try:
        table = resolve(standard or record.site.standard, limits_file)
    except InputError as exc:
        if not record.site.limits_file or standard is not None:
            raise
        raise InputError([f"site.limits_file: {line}" for line in exc.lines()], src) from None

    problems: list[str] = []
    for i, emitter in enumerate(record.emitters):
        try:
            table.at(emitter.frequency_mhz)
        except InputError as exc:
            problems.extend(f"emitters[{i}].frequency_mhz: {p}" for p in exc.problems)
    emitters = []
    for i, emitter in enumerate(record.emitters):
        pattern = None
        if emitter.pattern_file:
            try:
                pattern = read_pattern_csv(path.parent / emitter.pattern_file)
            except InputError as exc:
                problems.extend(f"emitters[{i}].pattern_file: {line}" for line in exc.lines())
                continue
        emitters.append(_emitter(emitter, pattern, record.site.plan_north_deg))
    if problems:
        raise InputError(problems, src)

    info = record.site
    return Site(
        id=info.id,
        name=info.name,
        path=path,
        sha256=hashlib.sha256(raw).hexdigest(),
        table=table,
        emitters=tuple(emitters),
        surfaces=tuple(
            Surface(s.name, s.access, s.elevation_m, _points(s.outline), tuple(_points(h) for h in s.holes))
            for s in record.surfaces
        ),
        work_positions=tuple(WorkPosition(w.name, w.x_m, w.y_m, w.z_m) for w in record.work_positions),
        access_points=tuple(AccessPoint(a.name, a.surface, a.x_m, a.y_m) for a in record.access_points),
        ground_reflection=info.ground_reflection,
        body_height_m=info.body_height_m,
        evaluation=info.evaluation,
        grid_m=info.grid_m,
        notes=info.notes,
        warnings=tuple(record.warnings()),
        layout_warnings=tuple(record.layout_warnings()),
        plan_north_deg=info.plan_north_deg,
        origin=None if info.origin is None else GeoOrigin(**info.origin.model_dump()),
        document=Document(info.address, info.client, info.prepared_by, info.revision, info.date),
        contacts={o.name: o.contact for o in record.operators},
    )


def _emitter(record: EmitterBase, pattern: PatternCuts | None, plan_north_deg: float) -> Emitter:
    """The plain emitter of a validated record entry: full-output figures, and the antenna at
    time-averaged power with its azimuth in the plan's frame (true azimuth less the azimuth of
    the plan's +y axis)."""
    antenna = record.to_antenna(pattern)
    if plan_north_deg and hasattr(record, "azimuth_deg"):
        antenna = replace(antenna, azimuth_deg=(record.azimuth_deg - plan_north_deg) % 360.0)
    return Emitter(
        antenna=antenna,
        operator=record.operator,
        net_power_w=record.net_power_w,
        eirp_w=record.eirp_full_w,
        transmitter_power_w=record.transmitter_power_w,
        ports=record.ports,
        duty_factor=record.duty_factor,
        power_reduction=record.power_reduction,
        azimuth_deg=getattr(record, "azimuth_deg", None),
        mech_tilt_deg=getattr(record, "mech_tilt_deg", None),
        elec_tilt_deg=getattr(record, "elec_tilt_deg", None),
        pattern_file=record.pattern_file,
    )


def _points(ring: list[list[float]]) -> tuple[tuple[float, float], ...]:
    return tuple((float(p[0]), float(p[1])) for p in ring)
