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
    return atomic_write_bytes(path, json_bytes(payload))


def remove_leftovers(path: str | Path) -> None:
    """Remove the temporary files a killed process (``kill -9``) left for *path*."""
    path = Path(path)
    if path.parent.is_dir():
        for leftover in path.parent.glob(f".{path.name}.*.part"):
            leftover.unlink(missing_ok=True)


def write_pair(document: str | Path, write_document: Callable[[Path], Any], mark: str | Path, mark_data: bytes) -> None:
    """Write a document and the mark that vouches for it (a report and its JSON) as one unit.

    ``write_document(path)`` writes the document atomically (:func:`atomic_write_bytes`, or a
    renderer that ends in it). The old mark and then the old document are removed first, the
    new document is renamed into place and the new mark last, so that at no moment does a mark
    stand beside a document of another input, and a document never stands without its mark
    but for an instant; temporary files that earlier killed runs left are removed first. If
    the write is interrupted (an exception, Ctrl-C, or SIGTERM turned into
    ``KeyboardInterrupt``) before the mark is in place, the new document is removed again:
    both or neither. Only ``kill -9`` in the instant between the two renames can leave a
    document without its mark (never beside another's mark); the next run replaces both.
    """
    document, mark = Path(document), Path(mark)
    for target in (document, mark):
        remove_leftovers(target)
    mark.unlink(missing_ok=True)
    document.unlink(missing_ok=True)  # the old input's: without its mark it vouches for nothing
    try:
        write_document(document)
        atomic_write_bytes(mark, mark_data)
    except BaseException:
        document.unlink(missing_ok=True)
        raise


def json_bytes(payload: Any) -> bytes:
    """*payload* as indented UTF-8 JSON with a final newline (what :func:`atomic_write_json` writes)."""
    return (json.dumps(payload, indent=2, ensure_ascii=False, allow_nan=False) + "\n").encode("utf-8")


def _umask() -> int:
    """The process's file-creation mask (read by setting it and putting it back)."""
    mask = os.umask(0)
    os.umask(mask)
    return mask
