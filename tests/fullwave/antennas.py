"""Reference wire antennas for the full-wave comparison, in free space.

Each builder returns a :class:`WireAntenna`: thin perfectly conducting wires and their
centre-fed voltage sources, in the *site frame* with the antenna's centre at the origin
and its boresight along +x (azimuth 90°), the aperture axis along +z. The geometries are
textbook ones (common practice), sized in wavelengths:

* ``dipole``: a half-wave dipole (0.48 λ);
* ``collinear``: N half-wave dipoles stacked on one axis, fed in phase (an omni collinear);
* ``panel``: a column of half-wave dipoles a quarter wavelength in front of a reflector of
  parallel wires (spaced λ/10) with side walls, fed in phase — optionally with a phase
  progression (electrical downtilt) or an amplitude taper;
* ``yagi``: a Yagi–Uda (reflector, driven element, directors) on a boom along +x, elements
  vertical.

Nothing here is the code under test: these are inputs to the method-of-moments solver
(nec2++, through PyNEC), which computes the fields that the models are judged against.
"""

from __future__ import annotations

import hashlib
import json
import math
from dataclasses import asdict, dataclass, field

C_M_PER_S = 299_792_458.0


def wavelength(frequency_mhz: float) -> float:
    return C_M_PER_S / (frequency_mhz * 1e6)


@dataclass(frozen=True)
class Wire:
    """A straight wire from ``a`` to ``b`` [m], ``segments`` segments, radius [m]."""

    a: tuple[float, float, float]
    b: tuple[float, float, float]
    segments: int
    radius_m: float


@dataclass(frozen=True)
class Feed:
    """A voltage source at the middle segment of wire number ``wire`` (0-based) [V, peak]."""

    wire: int
    voltage: tuple[float, float]  # real, imaginary


@dataclass(frozen=True)
class WireAntenna:
    """A reference antenna: what the solver needs, and how a record would describe it.

    ``kind`` and ``length_m`` are what its datasheet would say (the record's kind, and the
    radiating length: the column of driven elements, or a Yagi's boom); ``centre_m`` is the
    record's position in this frame (the origin, by construction).
    """

    name: str
    kind: str
    frequency_mhz: float
    length_m: float
    wires: tuple[Wire, ...]
    feeds: tuple[Feed, ...]
    description: str = ""
    extent_m: tuple[float, float, float] = field(default=(0.0, 0.0, 0.0))  # half-sizes x, y, z of the metal

    def key(self) -> str:
        """A hash of the geometry and excitation: the solver cache's key."""
        text = json.dumps(
            {
                "f": self.frequency_mhz,
                "wires": [asdict(w) for w in self.wires],
                "feeds": [asdict(f) for f in self.feeds],
            },
            sort_keys=True,
        )
        return hashlib.sha256(text.encode()).hexdigest()[:16]


def _segments(length: float, lam: float, per_wavelength: int = 12) -> int:
    n = max(3, math.ceil(length / lam * per_wavelength))
    return n if n % 2 else n + 1  # odd: a centre segment for the feed


def _dipole_wire(x: float, y: float, z: float, lam: float, length_lam: float = 0.48) -> Wire:
    half = 0.5 * length_lam * lam
    return Wire((x, y, z - half), (x, y, z + half), _segments(2 * half, lam, 24), lam / 200.0)


def _extent(wires) -> tuple[float, float, float]:
    xs = [abs(c) for w in wires for c in (w.a[0], w.b[0])]
    ys = [abs(c) for w in wires for c in (w.a[1], w.b[1])]
    zs = [abs(c) for w in wires for c in (w.a[2], w.b[2])]
    return (max(xs), max(ys), max(zs))


def dipole(frequency_mhz: float = 900.0) -> WireAntenna:
    lam = wavelength(frequency_mhz)
    wires = (_dipole_wire(0.0, 0.0, 0.0, lam),)
    return WireAntenna(
        f"dipole-{frequency_mhz:g}",
        "omni",
        frequency_mhz,
        0.48 * lam,
        wires,
        (Feed(0, (1.0, 0.0)),),
        "half-wave dipole",
        _extent(wires),
    )


def collinear(frequency_mhz: float = 900.0, count: int = 6, spacing_lam: float = 0.8) -> WireAntenna:
    lam = wavelength(frequency_mhz)
    d = spacing_lam * lam
    zs = [(i - 0.5 * (count - 1)) * d for i in range(count)]
    wires = tuple(_dipole_wire(0.0, 0.0, z, lam) for z in zs)
    feeds = tuple(Feed(i, (1.0, 0.0)) for i in range(count))
    return WireAntenna(
        f"collinear{count}-{frequency_mhz:g}",
        "omni",
        frequency_mhz,
        count * d,
        wires,
        feeds,
        f"{count} half-wave dipoles stacked {spacing_lam:g} λ apart, fed in phase",
        _extent(wires),
    )


def panel(
    frequency_mhz: float = 900.0,
    count: int = 6,
    spacing_lam: float = 0.8,
    width_lam: float = 0.8,
    tilt_deg: float = 0.0,
    taper: tuple[float, ...] | None = None,
    label: str = "",
) -> WireAntenna:
    """Dipoles λ/4 in front of a parallel-wire reflector (λ/10 pitch) with side walls.

    The column's centre is the origin; the reflector stands at x = −λ/4. A downtilt comes
    from a phase progression (the upper elements lead), a taper from the feed amplitudes.
    """
    lam = wavelength(frequency_mhz)
    d = spacing_lam * lam
    zs = [(i - 0.5 * (count - 1)) * d for i in range(count)]
    k = 2.0 * math.pi / lam
    wires = [_dipole_wire(0.0, 0.0, z, lam) for z in zs]
    feeds = []
    amplitudes = taper or (1.0,) * count
    for i, z in enumerate(zs):
        phase = k * z * math.sin(math.radians(tilt_deg))
        feeds.append(Feed(i, (amplitudes[i] * math.cos(phase), amplitudes[i] * math.sin(phase))))
    half_height = 0.5 * count * d + 0.1 * lam
    n_seg = _segments(2 * half_height, lam)
    radius = lam / 300.0
    x_back = -0.25 * lam
    pitch = 0.1 * lam
    n_wires = int(round(width_lam / 0.1)) + 1
    for j in range(n_wires):
        y = (j - 0.5 * (n_wires - 1)) * pitch
        wires.append(Wire((x_back, y, -half_height), (x_back, y, half_height), n_seg, radius))
    y_side = 0.5 * (n_wires - 1) * pitch
    for x_side in (x_back + 0.1 * lam, x_back + 0.2 * lam):
        for y in (-y_side, y_side):
            wires.append(Wire((x_side, y, -half_height), (x_side, y, half_height), n_seg, radius))
    parts = [f"{count} dipoles {spacing_lam:g} λ apart, λ/4 before a {width_lam:g} λ wire reflector with side walls"]
    if tilt_deg:
        parts.append(f"{tilt_deg:g}° downtilt by phase")
    if taper:
        parts.append("taper " + "/".join(f"{a:g}" for a in taper))
    name = f"panel{count}{label}-{frequency_mhz:g}"
    return WireAntenna(
        name, "panel", frequency_mhz, count * d, tuple(wires), tuple(feeds), "; ".join(parts), _extent(wires)
    )


YAGI_LAYOUTS = {
    # (position along the boom, element length) in wavelengths: reflector, driven, directors
    6: [(0.0, 0.49), (0.2, 0.47), (0.45, 0.43), (0.75, 0.42), (1.05, 0.42), (1.35, 0.41)],
    4: [(0.0, 0.49), (0.2, 0.47), (0.45, 0.43), (0.75, 0.42)],
}


def yagi(frequency_mhz: float = 900.0, elements: int = 6) -> WireAntenna:
    """Yagi–Uda with vertical elements on a boom along +x; the boom's midpoint at the origin."""
    lam = wavelength(frequency_mhz)
    layout = YAGI_LAYOUTS[elements]
    boom = layout[-1][0] * lam
    wires = tuple(
        Wire(
            ((x * lam) - 0.5 * boom, 0.0, -0.5 * length * lam),
            ((x * lam) - 0.5 * boom, 0.0, 0.5 * length * lam),
            _segments(length * lam, lam, 24),
            lam / 200.0,
        )
        for x, length in layout
    )
    return WireAntenna(
        f"yagi{elements}-{frequency_mhz:g}",
        "directional",
        frequency_mhz,
        boom,
        wires,
        (Feed(1, (1.0, 0.0)),),
        f"{elements}-element Yagi–Uda, {layout[-1][0]:g} λ boom",
        _extent(wires),
    )


def reference_antennas() -> list[WireAntenna]:
    """Every reference antenna of the comparison, in a fixed order."""
    return [
        dipole(900.0),
        collinear(900.0),
        panel(900.0),
        panel(900.0, tilt_deg=6.0, label="t6"),
        panel(900.0, taper=(0.4, 0.75, 1.0, 1.0, 0.75, 0.4), label="tp"),
        yagi(900.0),
        panel(2600.0, count=8, spacing_lam=0.75, width_lam=0.7),
        collinear(1800.0, count=8, spacing_lam=0.75),
        yagi(2400.0, elements=4),
    ]
