"""Shared fixtures: small invented site records written to a temporary folder."""

from __future__ import annotations

import copy
import json
from pathlib import Path

import pytest

from tests.helpers import BASE_RECORD


@pytest.fixture
def record() -> dict:
    """A fresh deep copy of a small valid record to mutate."""
    return copy.deepcopy(BASE_RECORD)


@pytest.fixture
def write_record(tmp_path):
    """Write a record dict as JSON (the same structure as TOML) and return its path."""

    def write(data: dict, name: str = "site.json") -> Path:
        path = tmp_path / name
        path.write_text(json.dumps(data), encoding="utf-8")
        return path

    return write
