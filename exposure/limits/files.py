"""Reading limit-table files (schema ``exposure-limits/1``): the built-in tables of ``limits/``
and a local code's file, validated strictly, every problem one line.
"""

from __future__ import annotations

import functools
import tomllib
from importlib import resources
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    FiniteFloat,
    ValidationError,
    model_validator,
)

from exposure.errors import InputError, UnknownKeyError
from exposure.inputs import field_path
from exposure.limits.tables import Band, LimitTable, PowerLaw, Status
from exposure.vocabulary import DEFAULT_STANDARD, STANDARDS, TIERS

SCHEMA = "exposure-limits/1"


# Quantities of a band: (key in the file, name in TierLimit/Band).
_QUANTITY_KEYS = (
    ("power_density_w_m2", "power_density"),
    ("e_v_m", "e_field"),
    ("h_a_m", "h_field"),
    ("averaging_min", "averaging"),
)


def load_standard(key: str) -> LimitTable:
    r"""A built-in limit table by key.

    Parameters
    ----------
    key : str
        One of :data:`STANDARDS` (``fcc``, ``icnirp-2020``, ``icnirp-1998``,
        ``canada-sc6``); case is ignored.

    Returns
    -------
    LimitTable
        Loaded once per process and cached.

    Raises
    ------
    exposure.errors.UnknownKeyError
        If the key is not a built-in standard; the message lists the known keys.

    Examples
    --------
    The general-public MPE of 47 CFR § 1.1310 Table 1 at 1900 MHz (1 mW/cm²):

    >>> load_standard("fcc").power_density_limit_w_m2(1900.0, "general_public")
    10.0

    References
    ----------
    47 CFR § 1.1310(e)(1), Table 1; ICNIRP 2020 Tables 5 and 6; ICNIRP 1998 Tables 6 and 7; Health
    Canada Safety Code 6 (2015) — each file names its source, edition, table and status
    (docs/references.md §§ 1, 4–6, 11).
    """
    normal = str(key).strip().lower()
    if normal not in STANDARDS:
        raise UnknownKeyError(f"unknown standard {key!r}; choose one of: {', '.join(STANDARDS)}")
    return load_builtin(normal)


def load_limits_file(path: str | Path) -> LimitTable:
    r"""A user's own limit table (for example a local code), validated strictly.

    Parameters
    ----------
    path : str or Path
        A TOML file in the ``exposure-limits/1`` schema, the same as the built-in files
        under ``limits/``.

    Returns
    -------
    LimitTable

    Raises
    ------
    exposure.errors.InputError
        With one problem per bad field, each naming the field's path (e.g.
        ``tiers.occupational.bands[2].e_v_m.coef``) and the reason; a TOML syntax error
        names the line.

    References
    ----------
    As :func:`load_standard`: each file names its source, edition, table and status.
    """
    from exposure.inputs import TABLE_MAX_BYTES, read_input

    path = Path(path)
    return _parse(read_input(path, max_bytes=TABLE_MAX_BYTES, what="limits file"), path)


def resolve(standard: str | None = None, limits_file: str | Path | None = None) -> LimitTable:
    r"""The limit table a command asked for.

    Parameters
    ----------
    standard : str, optional
        Built-in key; ``fcc`` when neither argument is given.
    limits_file : str or Path, optional
        A user's table; wins over ``standard`` when given.

    Returns
    -------
    LimitTable

    References
    ----------
    As :func:`load_standard`: each file names its source, edition, table and status.
    """
    if limits_file is not None:
        return load_limits_file(limits_file)
    return load_standard(standard if standard is not None else DEFAULT_STANDARD)


@functools.cache
def load_builtin(key: str) -> LimitTable:
    r"""A built-in table by its file key (the tables of ``limits/`` and ``limits/local/``), cached.

    Parameters
    ----------
    key : str
        The file's name without ``.toml``.

    Returns
    -------
    LimitTable

    References
    ----------
    As :func:`load_standard`: each file names its source, edition, table and status.
    """
    path = _builtin_path(key)
    table = _parse(path.read_bytes(), path)
    if table.key != key:
        raise InputError(f"key: is {table.key!r}, expected {key!r} (the file's name)", source=str(path))
    return table


def _builtin_path(key: str) -> Path:
    """Where the built-in file of *key* is: in the wheel, or in a source checkout; a second
    criterion's table (a whole-body table's ``local_table``) lives in ``limits/local/``."""
    for name in (f"{key}.toml", f"local/{key}.toml"):
        packaged = resources.files("exposure").joinpath("_limits", *name.split("/"))  # wheel: exposure/_limits/
        if packaged.is_file():
            return Path(str(packaged))
        checkout = Path(__file__).resolve().parents[2] / "limits" / name  # editable: <repo>/limits/
        if checkout.is_file():
            return checkout
    raise FileNotFoundError(f"built-in limit table {key}.toml is missing from the installation")


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, frozen=True)


NonEmpty = Annotated[str, Field(min_length=1)]


class _EntryModel(_Strict):
    printed: NonEmpty
    printed_unit: NonEmpty | None = None
    coef: Annotated[FiniteFloat, Field(gt=0)] | None = None
    exponent: FiniteFloat | None = None
    f_unit: Literal["MHz", "GHz"] | None = None
    plane_wave_equivalent: bool = False
    note: NonEmpty | None = None

    @model_validator(mode="after")
    def _value_or_nothing(self) -> _EntryModel:
        if self.coef is None:
            extra = [k for k in ("exponent", "f_unit") if getattr(self, k) is not None]
            if self.plane_wave_equivalent:
                extra.append("plane_wave_equivalent")
            if extra:
                raise ValueError(
                    f"{', '.join(extra)} given without coef; an entry without a value has only "
                    "printed (and optionally printed_unit, note)"
                )
        else:
            missing = [k for k in ("exponent", "f_unit", "printed_unit") if getattr(self, k) is None]
            if missing:
                raise ValueError(
                    f"coef given without {', '.join(missing)}; an entry with a value needs "
                    "coef, exponent, f_unit and printed_unit"
                )
        return self


class _BandModel(_Strict):
    f_min_mhz: Annotated[FiniteFloat, Field(gt=0)]
    f_max_mhz: Annotated[FiniteFloat, Field(gt=0)]
    e_v_m: _EntryModel
    h_a_m: _EntryModel
    power_density_w_m2: _EntryModel
    averaging_min: _EntryModel


class _TierModel(_Strict):
    label: NonEmpty
    bands: Annotated[list[_BandModel], Field(min_length=1)]


class _TiersModel(_Strict):
    general_public: _TierModel
    occupational: _TierModel


class _TableModel(_Strict):
    schema_: Literal["exposure-limits/1"] = Field(alias="schema")
    key: Annotated[str, Field(pattern=r"^[a-z0-9][a-z0-9._-]*$")]
    title: NonEmpty
    source: NonEmpty
    edition: NonEmpty
    table: NonEmpty
    status: Status
    status_note: NonEmpty
    frequency_unit: Literal["MHz"]
    criterion: Literal["single", "whole-body", "local"] = "single"
    local_table: Annotated[str, Field(pattern=r"^[a-z0-9][a-z0-9._-]*$")] | None = None
    tiers: _TiersModel

    @model_validator(mode="after")
    def _local_goes_with_whole_body(self):
        if self.local_table is not None and self.criterion != "whole-body":
            raise ValueError('local_table is for a whole-body table (criterion = "whole-body")')
        return self


def _parse(data: bytes, path: Path) -> LimitTable:
    """Validate the bytes of a limits file and build the table; InputError on any problem."""
    source = str(path)
    try:
        raw = tomllib.loads(data.decode("utf-8"))
    except UnicodeDecodeError as exc:
        raise InputError(f"not UTF-8 text (byte {exc.start})", source=source) from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"TOML syntax error: {exc}", source=source) from None
    try:
        model = _TableModel.model_validate(raw)
    except ValidationError as exc:
        raise InputError([_describe(e) for e in exc.errors()], source=source) from None
    problems = _cross_checks(model)
    if problems:
        raise InputError(problems, source=source)
    return _build(model, path)


def _describe(error: Any) -> str:
    """One line for a pydantic error: the field's path, then the reason."""
    where = field_path(error["loc"])
    kind = error["type"]
    if kind == "extra_forbidden":
        reason = f"unknown key (not part of schema {SCHEMA})"
    elif kind == "missing":
        reason = "required key is missing"
    else:
        reason = error["msg"].removeprefix("Value error, ")
        given = error.get("input")
        if isinstance(given, str):  # describe, never quote: the file may be anything
            reason += f" (got text of {len(given)} characters)"
        elif isinstance(given, (int, float, bool)) and kind != "value_error":
            reason += f" (got {given!r})"
    return f"{where}: {reason}"


def _cross_checks(model: _TableModel) -> list[str]:
    """Checks across fields: bands ascending, contiguous, non-empty; tiers cover one range."""
    problems: list[str] = []
    ranges: dict[str, tuple[float, float]] = {}
    for tier in TIERS:
        bands = getattr(model.tiers, tier).bands
        where = f"tiers.{tier}.bands"
        for i, band in enumerate(bands):
            if not band.f_min_mhz < band.f_max_mhz:
                problems.append(
                    f"{where}[{i}].f_max_mhz: must be greater than f_min_mhz ({band.f_max_mhz:g} <= {band.f_min_mhz:g})"
                )
            if i > 0:
                previous = bands[i - 1].f_max_mhz
                if band.f_min_mhz < previous:
                    problems.append(
                        f"{where}[{i}].f_min_mhz: {band.f_min_mhz:g} is below the previous band's "
                        f"f_max_mhz {previous:g}; bands must be sorted by frequency and must not overlap"
                    )
                elif band.f_min_mhz > previous:
                    problems.append(
                        f"{where}[{i}].f_min_mhz: {band.f_min_mhz:g} leaves a gap after the previous "
                        f"band's f_max_mhz {previous:g}; bands must be contiguous"
                    )
            if band.power_density_w_m2.coef is None and band.e_v_m.coef is None:
                problems.append(
                    f"{where}[{i}]: gives neither power_density_w_m2 nor e_v_m; a band needs at "
                    "least one of them to compare exposure with"
                )
        ranges[tier] = (bands[0].f_min_mhz, bands[-1].f_max_mhz)
    (gp_min, gp_max), (occ_min, occ_max) = ranges["general_public"], ranges["occupational"]
    if (gp_min, gp_max) != (occ_min, occ_max):
        problems.append(
            f"tiers.occupational.bands: cover {occ_min:g}–{occ_max:g} MHz but general_public "
            f"covers {gp_min:g}–{gp_max:g} MHz; both tiers must cover the same range"
        )
    return problems


def _build(model: _TableModel, path: Path) -> LimitTable:
    labels: dict[str, str] = {}
    bands: dict[str, tuple[Band, ...]] = {}
    for tier in TIERS:
        tier_model = getattr(model.tiers, tier)
        labels[tier] = tier_model.label
        bands[tier] = tuple(
            Band(
                f_min_mhz=b.f_min_mhz,
                f_max_mhz=b.f_max_mhz,
                **{name: _law(getattr(b, key)) for key, name in _QUANTITY_KEYS},
            )
            for b in tier_model.bands
        )
    first = bands[TIERS[0]]
    return LimitTable(
        key=model.key,
        title=model.title,
        source=model.source,
        edition=model.edition,
        table=model.table,
        status=model.status,
        status_note=model.status_note,
        path=path,
        f_min_mhz=first[0].f_min_mhz,
        f_max_mhz=first[-1].f_max_mhz,
        labels=labels,
        bands=bands,
        criterion=model.criterion,
        local_table=model.local_table,
    )


def _law(entry: _EntryModel) -> PowerLaw:
    return PowerLaw(
        printed=entry.printed,
        printed_unit=entry.printed_unit or "",
        coef=entry.coef,
        exponent=entry.exponent if entry.exponent is not None else 0.0,
        f_unit=entry.f_unit or "MHz",
        plane_wave_equivalent=entry.plane_wave_equivalent,
        note=entry.note or "",
    )
