"""The Python interface (exposure.api): a path, a dict or a record object give the same result;
lookups say what exists; results read well in a terminal and a notebook; their tables go to
pandas with the JSON's keys as columns. (The package's own contract; no outside source.)"""

from __future__ import annotations

import tomllib

import pytest

import exposure
from exposure.errors import UnknownKeyError
from exposure.site.load import validate_record
from tests.helpers import SAMPLE_SITES


def _without_input(result) -> dict:
    data = result.to_json()
    data.pop("input")  # the file's name and bytes, which a dict does not have
    return data


@pytest.fixture(scope="module")
def larkspur():
    return exposure.assess(SAMPLE_SITES[1], grid_m=1.0)


@pytest.mark.parametrize("path", SAMPLE_SITES, ids=lambda p: p.stem)
def test_a_dict_or_a_record_object_equals_the_file(path):
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    from_file = exposure.assess(path, grid_m=1.0)
    from_dict = exposure.assess(data, base=path.parent, grid_m=1.0)
    from_record = exposure.assess(validate_record(data, path.name), base=path.parent, grid_m=1.0)
    assert _without_input(from_dict) == _without_input(from_file)
    assert _without_input(from_record) == _without_input(from_file)
    assert from_dict.to_json()["input"]["file"] == "<in-memory record>"


def test_lookups_name_what_exists(larkspur):
    assert larkspur.surface("Staff terrace").access == "public"
    with pytest.raises(KeyError, match="'Staff terrace'") as caught:
        larkspur.surface("Staff terace")
    assert isinstance(caught.value, UnknownKeyError) and "'Staff terace'" in str(caught.value)
    with pytest.raises(KeyError, match="'A1'"):
        larkspur.emitter("Z9")


def test_short_repr_and_a_notebook_table(larkspur):
    text = repr(larkspur)
    assert len(text) < 500 and larkspur.site_id in text and larkspur.verdict in text
    assert all(len(repr(item)) < 500 for item in (*larkspur.surfaces, *larkspur.emitters))
    html = larkspur._repr_html_()
    assert "<table>" in html and "Staff terrace" in html and larkspur.verdict in html


def _flat_keys(item: dict, prefix: str = "") -> set[str]:
    keys = set()
    for key, value in item.items():
        if isinstance(value, dict) and value:
            keys |= _flat_keys(value, f"{prefix}{key}.")
        else:
            keys.add(f"{prefix}{key}")
    return keys


@pytest.mark.parametrize("part", ["emitters", "surfaces", "work_positions", "zones", "signs", "flags", "assumptions"])
def test_to_frame_columns_are_the_json_keys(larkspur, part):
    frame = larkspur.to_frame(part)
    rows = larkspur.to_json()[part]
    assert len(frame) == len(rows) > 0
    assert set(frame.columns) == set().union(*(_flat_keys(r) for r in rows))


def test_to_frame_refuses_an_unknown_part(larkspur):
    with pytest.raises(KeyError, match="the tables are"):
        larkspur.to_frame("nope")
