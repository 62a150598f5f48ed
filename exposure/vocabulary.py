"""Every choice list of the tool, once: the words a record, a command or a result may use.

Each is a ``Literal`` type (for pydantic and type checkers) and the tuple of its words in
the order outputs list them. Modules import them from here; nothing spells a list again.
The words themselves are fixed by ``shared/INTERFACE.md``.
"""

from __future__ import annotations

from typing import Literal, get_args

Standard = Literal["fcc", "icnirp-2020", "icnirp-1998", "canada-sc6"]
STANDARDS: tuple[Standard, ...] = get_args(Standard)
"""Keys of the built-in limit tables (file ``limits/<key>.toml``)."""
DEFAULT_STANDARD: Standard = "fcc"
"""Limit table used when neither a standard nor a limits file is given."""

Tier = Literal["general_public", "occupational"]
TIERS: tuple[str, ...] = get_args(Tier)
"""Exposure tiers, in the order outputs list them."""

Criterion = Literal["single", "whole-body", "local"]
CRITERIA: tuple[Criterion, ...] = get_args(Criterion)
"""What a limit table's values limit: the only criterion, or the whole-body one, or the
local (spatial-peak) one beside a whole-body table."""

EmitterKind = Literal["panel", "omni", "dish", "array", "directional"]
EMITTER_KINDS: tuple[EmitterKind, ...] = get_args(EmitterKind)
SECTOR_KINDS: tuple[EmitterKind, ...] = ("panel", "array", "directional")
"""Kinds with a horizontal beamwidth."""

Model = Literal["auto", "spherical", "cylindrical", "synthetic", "aperture", "endfire"]
MODELS: tuple[Model, ...] = get_args(Model)
"""Field models; ``auto`` picks one per emitter (:func:`exposure.models.model_for`)."""

Reflection = Literal["none", "typical", "full"]
REFLECTIONS: tuple[Reflection, ...] = get_args(Reflection)

Evaluation = Literal["peak", "spatial-average"]
EVALUATIONS: tuple[Evaluation, ...] = get_args(Evaluation)
"""Over a person's height: the peak, or the spatial average."""

Access = Literal["public", "occupational", "none"]
ACCESS: tuple[Access, ...] = get_args(Access)
ACCESS_TIER: dict[str, Tier] = {"public": "general_public", "occupational": "occupational"}
"""The limit tier that governs a surface of each access class ('none' is not judged)."""

Severity = Literal["info", "measure", "mitigate"]
SEVERITIES: tuple[str, ...] = get_args(Severity)
"""Severities of findings, mildest first; the verdict is the worst."""
Verdict = Literal["compliant", "verify-by-measurement", "mitigation-required"]
VERDICTS: tuple[Verdict, ...] = get_args(Verdict)
VERDICT_OF_SEVERITY: dict[str, Verdict] = dict(zip(SEVERITIES, VERDICTS, strict=True))

Direction = Literal["front", "back", "side", "above", "below"]
DIRECTIONS: tuple[Direction, ...] = get_args(Direction)
"""The box boundary's directions around an emitter."""

ExportFormat = Literal["geojson", "dxf", "csv", "png", "svg"]
EXPORT_FORMATS: tuple[ExportFormat, ...] = get_args(ExportFormat)
"""What ``exposure export`` writes, in the order it writes them."""


EMITTER_KEYS: tuple[str, ...] = (
    "id",
    "operator",
    "kind",
    "frequency_mhz",
    "power_w",
    "power_dbm",
    "ports",
    "line_loss_db",
    "gain_dbi",
    "gain_dbd",
    "eirp_w",
    "x_m",
    "y_m",
    "z_m",
    "azimuth_deg",
    "mech_tilt_deg",
    "elec_tilt_deg",
    "h_beamwidth_deg",
    "v_beamwidth_deg",
    "front_to_back_db",
    "sidelobe_floor_db",
    "length_m",
    "duty_factor",
    "power_reduction_factor",
    "diameter_m",
    "aperture_efficiency",
    "elevation_deg",
    "h_scan_deg",
    "v_scan_deg",
    "pattern_file",
)
"""A site record's emitter keys, each also an option of ``exposure screen``, under the same name."""
