"""A limit table in memory, and the lookup by frequency and tier.

The conventions (band edges, the stricter value on a shared edge, power density derived
from E and H) are stated in :mod:`exposure.limits`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

from exposure.errors import InputError, OutOfRangeError, UnknownKeyError
from exposure.units import FREE_SPACE_IMPEDANCE
from exposure.vocabulary import TIERS

Status = Literal["confirmed", "from memory", "partly from memory"]


_F_UNIT_MHZ = {"MHz": 1.0, "GHz": 1000.0}  # the frequency unit a power law takes, in MHz


_SIGNIFICANT_DIGITS = 12  # removes binary noise of coefficients such as 1/30, far below print


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
        from exposure.limits.files import load_builtin  # the files build tables: imported when used

        return None if self.local_table is None else load_builtin(self.local_table)

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
