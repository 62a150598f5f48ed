"""A plan drawn rotated (``plan_north_deg``) is the same site as one typed in true-north
coordinates: the same verdict, the same maxima, the same zones turned with the plan, and the same
zones on the Earth. The physical law checked: a rotation of the whole scene (surfaces, emitters
and their pointing) changes no field value.

The site is invented: one panel over a public terrace and an occupational roof.
"""

from __future__ import annotations

import copy
import json
import math

import pytest
import shapely

from exposure.assessment import assess
from exposure.export import export_files
from exposure.site import load_site

THETA = 30.0  # the plan's +y axis, degrees east of true north
GRID_M = 0.25
SITE = {
    "schema_version": 1,
    "site": {
        "id": "rotation-check",
        "name": "Rotation check (invented)",
        "grid_m": GRID_M,
        "origin": {"latitude_deg": 47.25, "longitude_deg": -32.5, "height_m": 40.0},
    },
    "surfaces": [
        {"name": "Terrace", "access": "public", "elevation_m": 0.0, "outline": [[0, 0], [16, 0], [16, 8], [0, 8]]},
        {"name": "Roof", "access": "occupational", "elevation_m": 0.0, "outline": [[0, 8], [16, 8], [16, 20], [0, 20]]},
    ],
    "emitters": [
        {
            "id": "P1",
            "operator": "Operator A (invented)",
            "kind": "panel",
            "frequency_mhz": 1900,
            "power_w": 60,
            "ports": 2,
            "gain_dbi": 17.0,
            "x_m": 8.0,
            "y_m": 14.0,
            "z_m": 2.5,
            "azimuth_deg": 200.0,
            "elec_tilt_deg": 4,
            "h_beamwidth_deg": 65,
            "v_beamwidth_deg": 7,
            "length_m": 1.4,
        }
    ],
    "work_positions": [{"name": "Unit", "x_m": 8.0, "y_m": 11.0, "z_m": 0.0}],
}


def to_plan(east: float, north: float) -> list[float]:
    """True-north coordinates as the plan turned by THETA draws them (the inverse rotation)."""
    t = math.radians(THETA)
    return [east * math.cos(t) - north * math.sin(t), east * math.sin(t) + north * math.cos(t)]


def rotated(record: dict) -> dict:
    out = copy.deepcopy(record)
    out["site"]["plan_north_deg"] = THETA
    for surface in out["surfaces"]:
        surface["outline"] = [to_plan(*p) for p in surface["outline"]]
    for thing in out["emitters"] + out["work_positions"]:
        thing["x_m"], thing["y_m"] = to_plan(thing["x_m"], thing["y_m"])
    return out  # azimuths stay true azimuths


@pytest.fixture(scope="module")
def both(tmp_path_factory):
    folder = tmp_path_factory.mktemp("rotation")
    results = []
    for name, record in (("north", SITE), ("plan", rotated(SITE))):
        path = folder / f"{name}.json"
        path.write_text(json.dumps(record), encoding="utf-8")
        results.append(assess(load_site(path)))
    return results


def test_the_field_is_the_same_at_the_same_place(tmp_path):
    """probe at the same physical points, typed in each frame: equal to rounding."""
    from exposure.assessment import probe

    north_path, plan_path = tmp_path / "north.json", tmp_path / "plan.json"
    north_path.write_text(json.dumps(SITE), encoding="utf-8")
    plan_path.write_text(json.dumps(rotated(SITE)), encoding="utf-8")
    north, plan = load_site(north_path), load_site(plan_path)
    for east, north_m, z in ((8.0, 10.0, 1.5), (3.0, 4.0, 0.5), (12.5, 18.0, 2.0), (8.0, 1.0, 1.7)):
        a = probe(north, (east, north_m, z), standing=False)["total_ratio"]
        b = probe(plan, (*to_plan(east, north_m), z), standing=False)["total_ratio"]
        assert b == pytest.approx(a, rel=1e-9)


def test_same_verdict_maxima_and_work_position(both):
    """The surface maxima agree to the grid's sampling (the two grids sample different points;
    the hot spots along the boresight are the same points)."""
    north, plan = both
    assert north.verdict == plan.verdict
    for a, b in zip(north.surfaces, plan.surfaces, strict=True):
        for tier in ("general_public", "occupational"):
            assert b.max_ratio[tier] == pytest.approx(a.max_ratio[tier], rel=0.05), (a.name, tier)
    assert plan.work_positions[0].ratio["occupational"] == pytest.approx(
        north.work_positions[0].ratio["occupational"], rel=1e-9
    )
    assert plan.emitters[0].main_beam_boundary_m == pytest.approx(north.emitters[0].main_beam_boundary_m, rel=1e-9)
    assert plan.emitters[0].azimuth_deg == north.emitters[0].azimuth_deg == 200.0


def test_the_zones_turn_with_the_plan(both):
    """Each zone of the rotated plan, turned back to true north, covers the true-north zone: the
    two differ by less than a band of about a grid cell along the outline (grids of the two frames
    do not coincide)."""
    north, plan = both
    assert [(z.surface, z.category) for z in north.zones] == [(z.surface, z.category) for z in plan.zones]
    t = math.radians(THETA)
    for a, b in zip(north.zones, plan.zones, strict=True):
        back = shapely.affinity.rotate(b.polygon, -THETA, origin=(0, 0), use_radians=False)  # counterclockwise by -θ
        assert back.area == pytest.approx(b.polygon.area)
        tolerance = 1.5 * GRID_M * a.polygon.length
        assert a.polygon.symmetric_difference(back).area < tolerance, (a.surface, a.category)
        assert t  # the rotation used is the record's


def test_the_zones_land_on_the_same_ground(both):
    """In WGS 84 (the GeoJSON), turned into metres east and north of the origin by PROJ, the two
    sites' zones coincide to the same band of about a grid cell along their outline."""
    import numpy as np
    from shapely.geometry import shape

    from exposure.site.geo import GeoFrame

    frame = GeoFrame(both[0].origin)
    shapes = []
    for result in both:
        files, _ = export_files(result, ("geojson",))
        features = json.loads(files["zones.geojson"])["features"]
        zones = [shape(f["geometry"]) for f in features if f["properties"]["kind"] == "zone"]
        shapes.append(
            [shapely.transform(z, lambda ll: np.column_stack(frame.from_wgs84(ll[:, 0], ll[:, 1])[:2])) for z in zones]
        )
    assert len(shapes[0]) == len(shapes[1]) > 0
    for a, b in zip(*shapes, strict=True):
        assert a.symmetric_difference(b).area < 1.5 * GRID_M * a.length
