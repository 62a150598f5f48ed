"""The exports read back by general-purpose libraries: GeoJSON by shapely, jsonschema and pyproj
(RFC 7946; areas on an equal-area projection), DXF by ezdxf (layers, zone areas, audit).

Each check names its outside reference. The sample roof (invented, geo-referenced at sea) is
assessed once on a 0.5 m grid.
"""

from __future__ import annotations

import io
import json
import os
import subprocess
import sys

import jsonschema
import numpy as np
import pytest
import shapely
from shapely.geometry import shape

from exposure.assessment import assess
from exposure.export import export_files
from exposure.export.dxf import LAYERS
from exposure.site import load_site
from tests.helpers import EXPORT_FILES, REPO

ROOF = REPO / "sample_sites" / "rooftop-larkspur.toml"
GRID_M = 0.5

# RFC 7946 §§ 3.1–3.3, the members this file uses (written here from the RFC's text).
POSITION = {"type": "array", "minItems": 2, "maxItems": 3, "items": {"type": "number"}}
GEOMETRY = {
    "type": "object",
    "required": ["type", "coordinates"],
    "properties": {
        "type": {"enum": ["Point", "MultiPoint", "LineString", "MultiLineString", "Polygon", "MultiPolygon"]},
    },
    "not": {"required": ["crs"]},  # RFC 7946 § 4: no crs member
}
FEATURE_COLLECTION = {
    "type": "object",
    "required": ["type", "features"],
    "properties": {
        "type": {"const": "FeatureCollection"},
        "features": {
            "type": "array",
            "items": {
                "type": "object",
                "required": ["type", "geometry", "properties"],
                "properties": {
                    "type": {"const": "Feature"},
                    "geometry": GEOMETRY,
                    "properties": {"type": "object", "required": ["kind"]},
                },
            },
        },
    },
    "not": {"required": ["crs"]},
}


@pytest.fixture(scope="module")
def roof():
    result = assess(load_site(ROOF), grid_m=GRID_M, sections=True)
    files, notes = export_files(result)
    return result, files, notes


def positions(coordinates: list):
    """Every position of a GeoJSON coordinates member, however deeply nested."""
    if not isinstance(coordinates[0], list):
        yield coordinates
        return
    for part in coordinates:
        yield from positions(part)


def test_every_file_is_written(roof):
    result, files, notes = roof
    expected = set(EXPORT_FILES)
    expected |= {f"section-{s.emitter_id}.{fmt}" for s in result.sections for fmt in ("png", "svg")}
    assert set(files) == expected and notes == []


def test_geojson_is_rfc7946(roof):
    """jsonschema against RFC 7946's structure; shapely reads and validates every geometry; WGS 84
    ranges (RFC 7946 § 4); exterior rings counterclockwise, holes clockwise (§ 3.1.6)."""
    _, files, _ = roof
    collection = json.loads(files["zones.geojson"])
    jsonschema.validate(collection, FEATURE_COLLECTION)
    kinds = {f["properties"]["kind"] for f in collection["features"]}
    assert kinds == {"zone", "barrier", "sign", "work_position", "emitter"}
    for feature in collection["features"]:
        geometry = shape(feature["geometry"])
        assert geometry.is_valid and not geometry.is_empty, feature["properties"]
        for lon, lat in positions(feature["geometry"]["coordinates"]):
            assert -180 <= lon <= 180 and -90 <= lat <= 90
        if isinstance(geometry, shapely.Polygon):
            assert geometry.exterior.is_ccw
            assert not any(ring.is_ccw for ring in geometry.interiors)


def test_geojson_zone_areas_round_trip(roof):
    """Each zone's area from its WGS 84 polygon, on a Lambert azimuthal equal-area projection centred
    on the site (pyproj), equals the assessment's area within 1 %."""
    from pyproj import Transformer

    result, files, _ = roof
    origin = result.origin
    laea = Transformer.from_crs(
        "EPSG:4326",
        f"+proj=laea +lat_0={origin.latitude_deg} +lon_0={origin.longitude_deg} +ellps=WGS84",
        always_xy=True,
    )
    zones = [f for f in json.loads(files["zones.geojson"])["features"] if f["properties"]["kind"] == "zone"]
    assert len(zones) == len(result.zones) > 0
    for feature, zone in zip(zones, result.zones, strict=True):
        projected = shapely.transform(
            shape(feature["geometry"]), lambda xy: np.column_stack(laea.transform(xy[:, 0], xy[:, 1]))
        )
        assert projected.area == pytest.approx(zone.area_m2, rel=0.01), feature["properties"]


def read_dxf(data: bytes):
    import ezdxf

    return ezdxf.read(io.StringIO(data.decode("utf-8")))


def ring_area(entity) -> float:
    points = np.array([(p[0], p[1]) for p in entity.get_points("xy")])
    return abs(shapely.Polygon(points).area)


def test_dxf_reads_back_with_every_layer_and_the_zone_areas(roof):
    """ezdxf reads the file, its audit finds no error, every layer is present, and each zone's
    outline less its holes (a DXF group per zone) has the assessment's area."""
    result, files, _ = roof
    doc = read_dxf(files["site.dxf"])
    assert not doc.audit().has_errors
    assert set(LAYERS) <= {layer.dxf.name for layer in doc.layers}
    groups = [g for name, g in doc.groups if name.startswith("ZONE-")]
    assert len(groups) == len(result.zones)
    for (_, group), zone in zip(
        sorted(((n, g) for n, g in doc.groups if n.startswith("ZONE-")), key=lambda item: int(item[0].split("-")[1])),
        result.zones,
        strict=True,
    ):
        rings = list(group)
        area = ring_area(rings[0]) - sum(ring_area(r) for r in rings[1:])
        assert area == pytest.approx(zone.area_m2, rel=1e-3)
        assert rings[0].dxf.layer == f"EXP-ZONE-{zone.category}"
    title = " ".join(e.dxf.text for e in doc.modelspace().query("TEXT[layer=='EXP-TITLE']"))
    assert result.source_sha256 in title and "Prediction, not a measurement" in title


def test_barriers_lie_on_open_floor(roof):
    """A barrier line never runs along its surface's edge (shapely): it is where a zone's outline
    crosses open floor."""
    from exposure.assessment.zones import EDGE_TOLERANCE_M
    from exposure.export.drawing import drawing_of

    result, _, _ = roof
    drawing = drawing_of(result)
    assert drawing.barriers
    for barrier in drawing.barriers:
        edge = drawing.surfaces[barrier.zone.surface].boundary
        assert barrier.line.difference(edge.buffer(EDGE_TOLERANCE_M * 0.99)).length == pytest.approx(barrier.length_m)


def test_exports_are_deterministic_across_processes(tmp_path):
    """Two runs in processes with different string hashing give identical bytes, every file."""
    outputs = []
    for seed in ("1", "2"):
        out = tmp_path / f"run{seed}"
        env = {**os.environ, "PYTHONHASHSEED": seed}
        subprocess.run(
            [sys.executable, "-m", "exposure", "export", str(ROOF), "-o", str(out), "--grid-m", "1", "-q"],
            check=True,
            capture_output=True,
            env=env,
        )
        outputs.append({p.name: p.read_bytes() for p in sorted(out.iterdir())})
    assert outputs[0].keys() == outputs[1].keys() and len(outputs[0]) >= 13
    different = [name for name in outputs[0] if outputs[0][name] != outputs[1][name]]
    assert not different
