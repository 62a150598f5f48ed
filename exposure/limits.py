r"""Published exposure limit tables: loading, validation and lookup by frequency.

The tables are data, one TOML file per standard and edition (schema
``exposure-limits/1``), transcribed as printed with the conversion to SI written beside
each value. This module validates a file strictly, turns it into a :class:`LimitTable`
and answers "what are the limits at this frequency?" for both tiers.

Conventions
-----------
* Frequencies are in MHz. A band is the half-open interval (f_min, f_max]; the first band
  of a tier also includes its f_min, so a table covers [f_min, f_max] closed.
* Each quantity is a power law, ``value = coef · (f / f_unit)^exponent`` in SI output
  units (W/m², V/m, A/m, min), where ``f_unit`` is 1 MHz or 1 GHz.
* **At a frequency exactly on a shared band edge the stricter (lower) value of the two
  bands is used**, quantity by quantity, and the power density used for ratios is the
  lower of the two bands' comparison values. Where the source is continuous the two
  differ only by the source's rounding; where it is not, this is the conservative choice.
  For the averaging time the shorter one is taken.
* Where a table gives E and H but no power density (ICNIRP 2020 below 30 MHz), the power
  density used for ratios is the stricter plane-wave equivalent, :math:`\min(E^2/Z_0, Z_0H^2)`,
  marked as derived: E and H are judged separately.
* A table may name a second criterion that must also be met (``criterion = "whole-body"``
  with ``local_table``): ICNIRP 2020's local reference levels (Table 6, spatial peak,
  6 min) beside its whole-body ones (Table 5).

References
----------
.. [1] 47 CFR § 1.1310(e)(1), Table 1, Limits for maximum permissible exposure (MPE).
.. [2] ICNIRP, "Guidelines for limiting exposure to electromagnetic fields (100 kHz to
   300 GHz)," Health Phys. 118(5):483–524, 2020, Table 5.
.. [3] ICNIRP, "Guidelines for limiting exposure to time-varying electric, magnetic, and
   electromagnetic fields (up to 300 GHz)," Health Phys. 74(4):494–522, 1998, Tables 6, 7.
.. [4] Health Canada, Safety Code 6, "Limits of Human Exposure to Radiofrequency
   Electromagnetic Energy in the Frequency Range from 3 kHz to 300 GHz," 2015.
"""

from __future__ import annotations

import functools
import math
import tomllib
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path
from typing import Annotated, Any, Literal, get_args

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    FiniteFloat,
    ValidationError,
    model_validator,
)

from exposure.errors import InputError, OutOfRangeError, UnknownKeyError
from exposure.units import FREE_SPACE_IMPEDANCE

Tier = Literal["general_public", "occupational"]
TIERS: tuple[Tier, ...] = get_args(Tier)
"""Exposure tiers, in the order outputs list them."""

Status = Literal["confirmed", "from memory", "partly from memory"]

STANDARDS: tuple[str, ...] = ("fcc", "icnirp-2020", "icnirp-1998", "canada-sc6")
"""Keys of the built-in limit tables (file ``limits/<key>.toml``)."""

DEFAULT_STANDARD = "fcc"
"""Limit table used when neither a standard nor a limits file is given."""

SCHEMA = "exposure-limits/1"

_F_UNIT_MHZ = {"MHz": 1.0, "GHz": 1000.0}  # the frequency unit a power law takes, in MHz

# Quantities of a band: (key in the file, name in TierLimit/Band).
_QUANTITY_KEYS = (
    ("power_density_w_m2", "power_density"),
    ("e_v_m", "e_field"),
    ("h_a_m", "h_field"),
    ("averaging_min", "averaging"),
)

_SIGNIFICANT_DIGITS = 12  # removes binary noise of coefficients such as 1/30, far below print


# --------------------------------------------------------------------------------------
# What callers get


@dataclass(frozen=True)
class Quantity:
    """One limit value at one frequency, with the expression the source prints.

    Attributes
    ----------
    value : float or None
        The limit in SI units (W/m², V/m, A/m or min); ``None`` where the table gives none.
    printed : str
        The expression as the source prints it (e.g. ``"f/1500"``, ``"(100)*"``, ``"–"``).
    printed_unit : str
        The source's unit for ``printed`` (e.g. ``"mW/cm²"``); empty where no value.
    plane_wave_equivalent : bool
        True where the source gives the value as a plane-wave-equivalent power density.
    note : str
        A remark from the table file (e.g. why a value is missing); usually empty.
    """

    value: float | None
    printed: str
    printed_unit: str
    plane_wave_equivalent: bool
    note: str = ""


@dataclass(frozen=True)
class TierLimit:
    """The limits of one tier at one frequency.

    Attributes
    ----------
    tier : str
        ``"general_public"`` or ``"occupational"``.
    power_density, e_field, h_field : Quantity
        Power density [W/m²], electric field [V/m] and magnetic field [A/m] limits.
    averaging_min : float or None
        Averaging time [min]; ``None`` where the table file gives none.
    band : tuple of float
        ``(f_min_mhz, f_max_mhz)`` of the band used. On a shared edge, the band whose
        comparison power density is lower (the lower band on a tie).
    label : str
        The tier's name as the source prints it.
    averaging : Quantity or None
        The averaging time with its printed expression (same value as ``averaging_min``).
    """

    tier: str
    power_density: Quantity
    e_field: Quantity
    h_field: Quantity
    averaging_min: float | None
    band: tuple[float, float]
    label: str
    averaging: Quantity | None = None
    _comparison: tuple[float, bool] | None = field(default=None, repr=False, compare=False)

    def comparison_power_density_w_m2(self) -> tuple[float, bool]:
        r"""Power density used for exposure ratios, and whether it was derived.

        Returns
        -------
        tuple of (float, bool)
            The power density limit [W/m²], and True when the table gives no power
            density here and the value is the plane-wave equivalent of the E-field limit.

        Notes
        -----
        .. math:: S = \min(E^2 / Z_0,\ Z_0 H^2)

        with :math:`Z_0` = :data:`exposure.units.FREE_SPACE_IMPEDANCE` (OET Bulletin 65): E and
        H judged separately, through the far-field relation (ICNIRP 2020 below 30 MHz: neither
        may be exceeded; the near field there needs E and H measured).
        On a shared band edge it is the lower of the two bands' values.
        """
        if self._comparison is not None:
            return self._comparison
        return _comparison(self.power_density, self.e_field, self.h_field)


@dataclass(frozen=True)
class PowerLaw:
    """One table entry as a power law of frequency, as read from a limits file.

    Attributes
    ----------
    printed, printed_unit : str
        The expression and unit as the source prints them.
    coef : float or None
        Coefficient in SI output units; ``None`` where the table gives no value.
    exponent : float
        Exponent of ``f / f_unit``.
    f_unit : {"MHz", "GHz"}
        The frequency unit the expression takes.
    plane_wave_equivalent : bool
        The source marks the value as plane-wave equivalent.
    note : str
        Remark from the file.
    """

    printed: str
    printed_unit: str
    coef: float | None
    exponent: float
    f_unit: str
    plane_wave_equivalent: bool
    note: str

    def value(self, frequency_mhz: float) -> float | None:
        """Value at a frequency [MHz] in SI units, or None where the table gives none.

        Rounded to 12 significant digits, which removes the binary noise of coefficients
        such as 10/300 that a TOML file cannot write exactly.
        """
        if self.coef is None:
            return None
        raw = self.coef * (frequency_mhz / _F_UNIT_MHZ[self.f_unit]) ** self.exponent
        return float(f"{raw:.{_SIGNIFICANT_DIGITS}g}")

    def quantity(self, frequency_mhz: float) -> Quantity:
        """The :class:`Quantity` at a frequency [MHz]."""
        return Quantity(
            self.value(frequency_mhz),
            self.printed,
            self.printed_unit,
            self.plane_wave_equivalent,
            self.note,
        )


@dataclass(frozen=True)
class Band:
    """One row of a tier's table: a frequency band and its four power laws.

    The band is (f_min_mhz, f_max_mhz]; the first band of a tier includes its f_min.
    """

    f_min_mhz: float
    f_max_mhz: float
    power_density: PowerLaw
    e_field: PowerLaw
    h_field: PowerLaw
    averaging: PowerLaw

    def limit(self, frequency_mhz: float, tier: str, label: str) -> TierLimit:
        """The band's limits evaluated at a frequency [MHz] (no range check)."""
        averaging = self.averaging.quantity(frequency_mhz)
        return TierLimit(
            tier=tier,
            power_density=self.power_density.quantity(frequency_mhz),
            e_field=self.e_field.quantity(frequency_mhz),
            h_field=self.h_field.quantity(frequency_mhz),
            averaging_min=averaging.value,
            band=(self.f_min_mhz, self.f_max_mhz),
            label=label,
            averaging=averaging,
        )


@dataclass(frozen=True)
class LimitTable:
    """A published limit table: its reference and both tiers' bands.

    Attributes
    ----------
    key, title, source, edition, table : str
        Identification of the table (see :meth:`citation`).
    status : {"confirmed", "from memory", "partly from memory"}
        How sure the values copied from the source are; ``status_note`` says which parts are from memory.
    path : Path
        The file the table was read from.
    f_min_mhz, f_max_mhz : float
        The frequency range the table covers [MHz], closed at both ends.
    labels : dict
        Tier key -> the tier's name as printed.
    bands : dict
        Tier key -> tuple of :class:`Band`, ascending and contiguous.
    """

    key: str
    title: str
    source: str
    edition: str
    table: str
    status: str
    status_note: str
    path: Path
    f_min_mhz: float
    f_max_mhz: float
    labels: dict[str, str] = field(repr=False, compare=False, hash=False)
    bands: dict[str, tuple[Band, ...]] = field(repr=False, compare=False, hash=False)
    criterion: str = "single"
    local_table: str | None = None

    def local(self) -> LimitTable | None:
        """The table of the local (spatial-peak) criterion that must also be met, or None.

        ICNIRP 2020 requires both its whole-body reference levels (Table 5, averaged over
        the body and 30 min) and its local ones (Table 6, spatial peak, 6 min); the
        whole-body file names the local one by ``local_table``.
        """
        return None if self.local_table is None else _load_builtin(self.local_table)

    def citation(self) -> str:
        """Reference line for reports, e.g. ``47 CFR § 1.1310(e)(1), Table 1 (rules of 2019)``.

        Tables not fully confirmed end with ``[from memory]`` or ``[partly from memory]``.
        """
        text = f"{self.source}, {self.table} ({self.edition})"
        return text if self.status == "confirmed" else f"{text} [{self.status}]"

    def at(self, frequency_mhz: float) -> dict[str, TierLimit]:
        """Limits of both tiers at a frequency.

        Parameters
        ----------
        frequency_mhz : float
            Frequency [MHz], within [f_min_mhz, f_max_mhz].

        Returns
        -------
        dict
            Tier key (``general_public``, ``occupational``) -> :class:`TierLimit`.

        Raises
        ------
        exposure.errors.OutOfRangeError
            If the frequency is outside the table (or not a finite number).

        Notes
        -----
        On a frequency exactly on a shared band edge each quantity takes the lower of
        the two bands' values (the stricter one), and the comparison power density the
        lower of the two bands' comparison values.
        """
        frequency = self._check_frequency(frequency_mhz)
        return {tier: self._tier_limit(tier, frequency) for tier in TIERS}

    def power_density_limit_w_m2(self, frequency_mhz: float, tier: str) -> float:
        """Power density limit used for exposure ratios at a frequency [W/m²].

        Parameters
        ----------
        frequency_mhz : float
            Frequency [MHz].
        tier : {"general_public", "occupational"}
            Exposure tier.

        Returns
        -------
        float
            The table's power density, or E²/Z0 where it gives only E (see
            :meth:`TierLimit.comparison_power_density_w_m2`).
        """
        if tier not in TIERS:
            raise UnknownKeyError(f"unknown tier {tier!r}; choose one of: {', '.join(TIERS)}")
        frequency = self._check_frequency(frequency_mhz)
        return self._tier_limit(tier, frequency).comparison_power_density_w_m2()[0]

    def _check_frequency(self, frequency_mhz: float) -> float:
        frequency = float(frequency_mhz)
        if not (math.isfinite(frequency) and self.f_min_mhz <= frequency <= self.f_max_mhz):
            raise OutOfRangeError(
                f"frequency {frequency:g} MHz is outside {self.f_min_mhz:g}–{self.f_max_mhz:g} "
                f"MHz of {self.source}, {self.table}; choose another --standard"
            )
        return frequency

    def _tier_limit(self, tier: str, frequency: float) -> TierLimit:
        label = self.labels[tier]
        found = [
            band.limit(frequency, tier, label)
            for band in self.bands[tier]
            if band.f_min_mhz <= frequency <= band.f_max_mhz
        ]
        if len(found) == 1:
            return found[0]
        lower, upper = found  # exactly on a shared edge: two contiguous bands
        return _stricter(lower, upper)


# --------------------------------------------------------------------------------------
# Loading


def load_standard(key: str) -> LimitTable:
    """A built-in limit table by key.

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
    """
    normal = str(key).strip().lower()
    if normal not in STANDARDS:
        raise UnknownKeyError(f"unknown standard {key!r}; choose one of: {', '.join(STANDARDS)}")
    return _load_builtin(normal)


def load_limits_file(path: str | Path) -> LimitTable:
    """A user's own limit table (for example a local code), validated strictly.

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
    """
    from exposure.inputs import TABLE_MAX_BYTES, read_input

    path = Path(path)
    return _parse(read_input(path, max_bytes=TABLE_MAX_BYTES, what="limits file"), path)


def resolve(standard: str | None = None, limits_file: str | Path | None = None) -> LimitTable:
    """The limit table a command asked for.

    Parameters
    ----------
    standard : str, optional
        Built-in key; ``fcc`` when neither argument is given.
    limits_file : str or Path, optional
        A user's table; wins over ``standard`` when given.

    Returns
    -------
    LimitTable
    """
    if limits_file is not None:
        return load_limits_file(limits_file)
    return load_standard(standard if standard is not None else DEFAULT_STANDARD)


@functools.cache
def _load_builtin(key: str) -> LimitTable:
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
        checkout = Path(__file__).resolve().parent.parent / "limits" / name  # editable: <repo>/limits/
        if checkout.is_file():
            return checkout
    raise FileNotFoundError(f"built-in limit table {key}.toml is missing from the installation")


# --------------------------------------------------------------------------------------
# Schema (pydantic) and the checks across fields


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
            raise ValueError("local_table is for a whole-body table (criterion = \"whole-body\")")
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
    where = _field_path(error["loc"])
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


def _field_path(loc: tuple[Any, ...]) -> str:
    """``('tiers', 'occupational', 'bands', 2, 'e_v_m')`` -> ``tiers.occupational.bands[2].e_v_m``."""
    text = ""
    for part in loc:
        if isinstance(part, int):
            text += f"[{part}]"
        else:
            text += f".{part}" if text else str(part)
    return text or "(top level)"


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
                    f"{where}[{i}].f_max_mhz: must be greater than f_min_mhz "
                    f"({band.f_max_mhz:g} <= {band.f_min_mhz:g})"
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


# --------------------------------------------------------------------------------------
# Band edges and the comparison value


def _comparison(power_density: Quantity, e_field: Quantity, h_field: Quantity | None = None) -> tuple[float, bool]:
    """The table's power density, else the stricter plane-wave equivalent of its field limits,
    min(E²/Z0, Z0·H²) (derived): E and H judged separately, each through the far-field
    relation of the models' power density (ICNIRP 2020: neither may be exceeded)."""
    if power_density.value is not None:
        return power_density.value, False
    candidates = []
    if e_field.value is not None:
        candidates.append(e_field.value**2 / FREE_SPACE_IMPEDANCE)
    if h_field is not None and h_field.value is not None:
        candidates.append(FREE_SPACE_IMPEDANCE * h_field.value**2)
    if candidates:
        return min(candidates), True
    raise InputError("the table gives neither a power density nor a field limit here")


def _lower(a: Quantity, b: Quantity) -> Quantity:
    """The stricter of two quantities: the lower value; a value beats none; a tie keeps *a*."""
    if b.value is None:
        return a
    if a.value is None or b.value < a.value:
        return b
    return a


def _stricter(lower: TierLimit, upper: TierLimit) -> TierLimit:
    """Merge the limits of the two bands that share an edge (see the module's Notes)."""
    low_cmp, up_cmp = lower.comparison_power_density_w_m2(), upper.comparison_power_density_w_m2()
    comparison = up_cmp if up_cmp[0] < low_cmp[0] else low_cmp
    averaging = _lower(lower.averaging, upper.averaging)  # type: ignore[arg-type]
    return TierLimit(
        tier=lower.tier,
        power_density=_lower(lower.power_density, upper.power_density),
        e_field=_lower(lower.e_field, upper.e_field),
        h_field=_lower(lower.h_field, upper.h_field),
        averaging_min=averaging.value,
        band=upper.band if comparison is up_cmp else lower.band,
        label=lower.label,
        averaging=averaging,
        _comparison=comparison,
    )
