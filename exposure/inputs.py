"""Reading every input file the same guarded way: site records, pattern files, limit tables.

:func:`read_input` is the one reader. It refuses what is not a regular file (a folder, a
FIFO, a device, a socket), a dangling or looping link, a file over its size cap (read with a
bound, so a file that lies about its size — ``/proc``, a growing file — cannot exhaust
memory), unreadable files, binary content and text that is not UTF-8, each with one line that
describes the problem and never quotes the file's content (a record can point its
``pattern_file`` or ``limits_file`` anywhere, and messages reach terminals and batch
summaries). :func:`parse_json` refuses duplicate keys, which JSON parsers otherwise resolve
silently in favour of the last.
"""

from __future__ import annotations

import errno
import json
import os
import stat
from pathlib import Path
from typing import Any

from exposure.errors import InputError

__all__ = ["RECORD_MAX_BYTES", "TABLE_MAX_BYTES", "read_input", "read_text", "decode_text", "parse_json", "printable"]

RECORD_MAX_BYTES = 20 * 1024 * 1024
"""Largest site record, pattern file or survey [bytes]: far above any real one (500 emitters
with 200 surfaces of 500 vertices is about 2 MB)."""

TABLE_MAX_BYTES = 1024 * 1024
"""Largest limit table [bytes] (the built-in ones are under 10 kB)."""


def read_input(path: str | Path, *, max_bytes: int = RECORD_MAX_BYTES, what: str = "file") -> bytes:
    """The bytes of an input file, or :class:`InputError` naming the file and the reason.

    Parameters
    ----------
    path : path-like
        The file.
    max_bytes : int
        Refuse files larger than this [bytes].
    what : str
        What the file is, for the messages ("site record", "pattern file", ...).
    """
    path = Path(path)
    src = str(path)
    try:
        info = os.stat(path)
    except FileNotFoundError:
        if os.path.islink(path):
            raise InputError(f"the {what} is a link to a file that does not exist", src) from None
        raise InputError(f"cannot read the {what}: no such file", src) from None
    except OSError as exc:
        raise InputError(f"cannot read the {what}: {_os_reason(exc)}", src) from None
    if stat.S_ISDIR(info.st_mode):
        raise InputError(f"a folder, not a {what}", src)
    if not stat.S_ISREG(info.st_mode):
        raise InputError(f"not a regular file (a pipe, device or socket); the {what} must be a plain file", src)
    if info.st_size > max_bytes:
        raise InputError(f"the {what} is {_size(info.st_size)}; at most {_size(max_bytes)} is read", src)
    try:
        with open(path, "rb") as handle:
            data = handle.read(max_bytes + 1)
    except OSError as exc:
        raise InputError(f"cannot read the {what}: {_os_reason(exc)}", src) from None
    if len(data) > max_bytes:
        raise InputError(f"the {what} is larger than {_size(max_bytes)}, the most that is read", src)
    return data


def read_text(path: str | Path, *, max_bytes: int = RECORD_MAX_BYTES, what: str = "file") -> str:
    """:func:`read_input` decoded as UTF-8 text (:func:`decode_text`)."""
    return decode_text(read_input(path, max_bytes=max_bytes, what=what), str(path), what)


def decode_text(data: bytes, source: str, what: str = "file") -> str:
    """Input bytes as UTF-8 text (a byte-order mark dropped), refusing empty, binary or
    non-UTF-8 content with one line naming *source*."""
    if not data.strip():
        raise InputError(f"empty {what}", source)
    if b"\x00" in data:
        raise InputError(f"not a text file (binary content); the {what} must be UTF-8 text", source)
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError(f"not UTF-8 text (byte {exc.start})", source) from None


class DuplicateKeyError(ValueError):
    """A key given twice in one JSON object."""


def _no_duplicates(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key, value in pairs:
        if key in out:
            raise DuplicateKeyError(key)
        out[key] = value
    return out


def parse_json(text: str, source: str) -> Any:
    """Parse JSON, refusing duplicate keys and nesting too deep to be a record."""
    try:
        return json.loads(text, object_pairs_hook=_no_duplicates)
    except DuplicateKeyError as exc:
        raise InputError(
            f"JSON: key {printable(str(exc.args[0]))!r} appears twice in one object (the second would silently "
            "replace the first)",
            source,
        ) from None
    except json.JSONDecodeError as exc:
        raise InputError(f"JSON syntax error at line {exc.lineno}, column {exc.colno}: {exc.msg}", source) from None
    except RecursionError:
        raise InputError("JSON nested too deeply to be a site record", source) from None
    except ValueError as exc:  # e.g. integers longer than Python's digit limit
        raise InputError(f"JSON value out of range: {str(exc).split(';')[0]}", source) from None


def printable(text: str) -> str:
    """*text* with control characters (C0, DEL, C1) shown as escapes, safe on a terminal."""
    if text.isprintable():
        return text
    return "".join(c if c.isprintable() or c == " " else c.encode("unicode_escape").decode("ascii") for c in text)


def _os_reason(exc: OSError) -> str:
    if exc.errno == errno.ELOOP:
        return "a loop of symbolic links"
    if exc.errno in (errno.EACCES, errno.EPERM):
        return "permission denied"
    if exc.errno == errno.ENAMETOOLONG:
        return "file name too long"
    return exc.strerror or type(exc).__name__


def _size(n: int) -> str:
    return f"{n / 2**20:.1f} MiB" if n >= 2**20 else f"{n / 1024:.0f} kiB" if n >= 1024 else f"{n} bytes"


def field_path(loc: tuple[Any, ...]) -> str:
    """Where in a document a problem is, as people write it: ``('tiers', 'occupational', 'bands', 2,
    'e_v_m')`` -> ``tiers.occupational.bands[2].e_v_m``; ``(top level)`` for the document itself.
    The one spelling of a field's place in every message about a record or a limit table."""
    text = ""
    for part in loc:
        text += f"[{part}]" if isinstance(part, int) else (f".{part}" if text else str(part))
    return text or "(top level)"
