"""Writing output files atomically: a temporary file beside the target, then a rename.

A failure or an interruption part-way leaves the old file (or none), never half a file.
"""

from __future__ import annotations

import json
import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import Any


def atomic_write(path: str | Path, write: Callable[[Any], None], mode: str = "wb") -> Path:
    """Call ``write(fileobj)`` on a temporary file in *path*'s folder, then rename it.

    The temporary file is removed if *write* raises (including KeyboardInterrupt).
    """
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(fd, mode) as handle:
            write(handle)
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(tmp, 0o666 & ~_umask())  # mkstemp makes 0600; outputs get the usual mode
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def atomic_write_bytes(path: str | Path, data: bytes) -> Path:
    """Write *data* to *path* atomically."""
    return atomic_write(path, lambda handle: handle.write(data))


def atomic_write_json(path: str | Path, payload: Any) -> Path:
    """Write *payload* as indented UTF-8 JSON to *path* atomically."""
    text = json.dumps(payload, indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    return atomic_write_bytes(path, text.encode("utf-8"))


def _umask() -> int:
    """The process's file-creation mask (read by setting it and putting it back)."""
    mask = os.umask(0)
    os.umask(mask)
    return mask
