"""Reading the text files users give rcpick (netlists, stock CSV, project and board files).

UTF-8 is expected; a UTF-8 byte-order mark and UTF-16 (which starts with one)
are read too. Anything else is refused with one line naming the file, the
byte offset of the first byte that is not UTF-8 (counted from the start of
the file, a byte-order mark included) and the line and column it falls on,
never a traceback.
"""

from __future__ import annotations

import codecs
import re
from pathlib import Path

from rcpick.errors import BadValue

#: Largest text file read, bytes: a netlist, a stock list or a board file is far smaller.
MAX_BYTES = 64 * 2**20

_LINE_END = re.compile(rb"\r\n|\r|\n")


def read_text(path: str | Path) -> str:
    """The text of ``path``, decoded as described in the module docstring."""
    path = Path(path)
    try:
        size = path.stat().st_size
        if size > MAX_BYTES:
            raise BadValue(f"{path}: {size:,} bytes is more than the {MAX_BYTES // 2**20} MiB rcpick reads")
        data = path.read_bytes()
    except IsADirectoryError:
        raise BadValue(f"{path}: is a folder, not a file") from None
    except FileNotFoundError:
        raise BadValue(f"{path}: no such file") from None
    except OSError as error:
        raise BadValue(f"{path}: cannot read ({error.strerror})") from None
    return decode(data, str(path))


def _place(data: bytes, start: int) -> str:
    """'line L, column C' of byte ``start`` of UTF-8 ``data`` (columns count characters, from 1)."""
    before = _LINE_END.split(data[:start])
    return f"line {len(before)}, column {len(before[-1].decode('utf-8', 'replace')) + 1}"


def decode(data: bytes, name: str) -> str:
    """Bytes of a text file as text (UTF-8, UTF-8 with a BOM, or UTF-16 with its BOM)."""
    skipped = 0
    if data.startswith(codecs.BOM_UTF8):
        skipped = len(codecs.BOM_UTF8)
    elif data.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
        try:
            return data.decode("utf-16")
        except UnicodeDecodeError as error:
            raise BadValue(f"{name}: not valid UTF-16 at byte {error.start}") from None
    body = data[skipped:]
    try:
        return body.decode("utf-8")
    except UnicodeDecodeError as error:
        raise BadValue(
            f"{name}: not UTF-8 text: byte {error.start + skipped} is 0x{body[error.start]:02x} "
            f"({_place(body, error.start)}); save the file as UTF-8"
        ) from None
