"""Reading a table file (CSV) into rows of text, with file/row/column positions.

This is the only place that knows about bytes and encodings; validation of the
values lives in :mod:`shipgui.core.readers`.  Rows are numbered as a spreadsheet
shows them: the header is row 1, the first data row is row 2.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from pathlib import Path

from .errors import InputError

__all__ = ["Table", "read_table", "MAX_FILE_BYTES", "MAX_ROWS"]

MAX_FILE_BYTES = 64 * 1024 * 1024  # far above any real day; stops a runaway file early
MAX_ROWS = 200_000


@dataclass(frozen=True)
class Table:
    """A header (lower-cased, stripped) and data rows as (row number, values)."""

    path: str
    columns: tuple[str, ...]
    rows: tuple[tuple[int, tuple[str, ...]], ...]

    def has(self, column: str) -> bool:
        return column in self.columns

    def index(self, column: str) -> int:
        return self.columns.index(column)


def _decode(path: Path, data: bytes) -> str:
    if b"\x00" in data[:65536]:
        raise InputError("this is not a text (CSV) file; save it as CSV UTF-8 and try again",
                         file=path)
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise InputError("the file is not UTF-8 text (a character cannot be read); "
                         "save it as CSV UTF-8", file=path, row=line) from None


def _delimiter(header_line: str) -> str:
    # A semicolon is the usual delimiter where the comma is the decimal mark.
    return ";" if header_line.count(";") > header_line.count(",") else ","


def read_table(path: str | Path, *, delimiter: str | None = None) -> Table:
    """Read a CSV file (UTF-8 with or without BOM; comma or semicolon)."""
    path = Path(path)
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise InputError(f"the file is {size // (1024 * 1024)} MB; files over "
                             f"{MAX_FILE_BYTES // (1024 * 1024)} MB are not read", file=path)
        data = path.read_bytes()
    except InputError:
        raise
    except IsADirectoryError:
        raise InputError("this is a folder, not a file", file=path) from None
    except FileNotFoundError:
        raise InputError("the file does not exist", file=path) from None
    except OSError as exc:
        raise InputError(f"the file cannot be read ({exc.strerror or exc})", file=path) from None
    text = _decode(path, data)
    first = text.split("\n", 1)[0]
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter or _delimiter(first))
    try:
        records = list(_rows(reader, path))
    except csv.Error as exc:
        raise InputError(f"the CSV cannot be read ({exc})", file=path,
                         row=reader.line_num) from None
    if not records:
        raise InputError("the file is empty; it needs a header row", file=path)
    (_, header), body = records[0], records[1:]
    columns = tuple(h.strip().lower() for h in header)
    seen = set()
    for name in columns:
        if name and name in seen:
            raise InputError(f"the column '{name}' appears twice in the header",
                             file=path, row=1, column=name)
        seen.add(name)
    width = len(columns)
    rows = tuple((num, tuple(v.strip() for v in values[:width]) + ("",) * (width - len(values)))
                 for num, values in body if any(v.strip() for v in values))
    return Table(str(path), columns, rows)


def _rows(reader, path: Path):
    for number, values in enumerate(reader, start=1):
        if number > MAX_ROWS + 1:
            raise InputError(f"more than {MAX_ROWS} rows; this is not a one-day file",
                             file=path, row=number)
        yield number, values
