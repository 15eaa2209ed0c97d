"""Reading a table file (CSV or XLSX) into rows of text, with file/row/column positions.

This is the only place that knows about bytes, encodings and spreadsheets;
validation of the values lives in :mod:`shipgui.core.io.readers`.  Rows are
numbered as a spreadsheet shows them: the header is row 1, the first data row
is row 2 (in a workbook, the sheet's own row numbers).

Every way a file can fail to be read (too big, not text, a damaged workbook, a
runaway field) becomes an :class:`~shipgui.core.errors.InputError` naming the
file, never a traceback and never a hang.
"""

from __future__ import annotations

import csv
import io
import stat
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError, Problem
from ._xlsx import read_xlsx_rows

__all__ = ["Table", "read_table", "parse_delimiter", "named_positions", "MAX_FILE_BYTES",
           "MAX_ROWS", "MAX_COLUMNS", "SPREADSHEET_SUFFIXES", "MINUTES_COLUMNS"]

MAX_FILE_BYTES = 64 * 1024 * 1024  # far above any real day; stops a runaway file early
MAX_ROWS = 200_000
# Named columns a day file may have; a jobs file uses about a dozen.
MAX_COLUMNS = 500
MAX_SHEET_COLUMNS = 16_384  # the widest sheet a spreadsheet program can hold (A to XFD)
# Columns whose spreadsheet durations mean minutes (the others read as HH:MM):
# a job's duration and a travel time.  No other kind of file uses these names.
MINUTES_COLUMNS = frozenset({"duration", "minutes"})
SPREADSHEET_SUFFIXES = (".xlsx", ".xlsm", ".xltx", ".xltm")

# Leading bytes of files people save by mistake under a .csv name, so the
# message can say what the file really is.
_NOT_CSV = "this is not a text (CSV) file but "
_MAGIC = (
    (b"\x89PNG\r\n\x1a\n", _NOT_CSV + "a PNG picture"),
    (b"\xff\xd8\xff", _NOT_CSV + "a JPEG picture"),
    (b"GIF8", _NOT_CSV + "a GIF picture"),
    (b"%PDF-", _NOT_CSV + "a PDF document"),
    (b"\x1f\x8b", _NOT_CSV + "a gzip archive"),
    (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1", _NOT_CSV + "an old Excel (.xls) workbook; save "
                                          "it as .xlsx or CSV UTF-8"),
    (b"\xff\xfe", "the file is UTF-16 text (\"Unicode text\"); save it as CSV UTF-8"),
    (b"\xfe\xff", "the file is UTF-16 text (\"Unicode text\"); save it as CSV UTF-8"),
)
_ZIP = b"PK\x03\x04"


@dataclass(frozen=True)
class Table:
    """The named columns of the header (lower-cased, stripped) and data rows as
    (row number, values of those columns).  Columns without a name are left out,
    so a stray cell far right or a header ending in thousands of commas costs
    nothing per row."""

    path: str
    columns: tuple[str, ...]
    rows: tuple[tuple[int, tuple[str, ...]], ...]
    problems: tuple[Problem, ...] = ()  # cells that could not be read (their rows are skipped)

    def has(self, column: str) -> bool:
        return column in self.columns


def named_positions(header: list[str]) -> list[int]:
    """Positions of the header cells that hold a column name."""
    return [k for k, name in enumerate(header) if name.strip()]


def parse_delimiter(text: str) -> str:
    """A delimiter as a user may name it (``;``, ``semicolon``, ``tab`` ...).

    Raises ``ValueError`` with a readable reason (for the command line).
    """
    names = {"comma": ",", "semicolon": ";", "tab": "\t", "\\t": "\t", "pipe": "|"}
    value = names.get(text.strip().lower(), text)
    if len(value) != 1 or value in "\"'\r\n" or value.isalnum():
        raise ValueError(f"'{text}' is not a delimiter; use ',' or ';' (or 'tab')")
    return value


def read_table(path: str | Path, *, delimiter: str | None = None, sheet: str | None = None,
               minutes_columns: Iterable[str] = MINUTES_COLUMNS) -> Table:
    """Read a CSV file or one sheet of an XLSX workbook.

    CSV: UTF-8 with or without BOM, comma or semicolon (detected on the header
    unless ``delimiter`` is given), quoted fields, any line ends.  XLSX: the
    first sheet or the one named ``sheet``; formulas count as their saved
    values.  ``minutes_columns`` names the columns whose spreadsheet durations
    are written as minutes (the others get ``HH:MM``).
    """
    path = Path(path)
    head = _open_check(path)
    if head.startswith(_ZIP) or path.suffix.lower() in SPREADSHEET_SUFFIXES:
        problems: list[Problem] = []
        records = read_xlsx_rows(path, head, sheet=sheet, max_rows=MAX_ROWS,
                                 minutes_columns=frozenset(minutes_columns), problems=problems)
        table = _table(path, records)
        return Table(table.path, table.columns, table.rows, tuple(problems))
    if sheet is not None:
        raise InputError(f"this is a CSV file, which has no sheets (sheet '{sheet}' was "
                         "asked for)", file=path)
    return _table(path, _csv_rows(path, delimiter))


def _open_check(path: Path) -> bytes:
    """Refuse what cannot be a day file before reading it; return its first bytes."""
    try:
        info = path.stat()
        if stat.S_ISDIR(info.st_mode):
            raise InputError("this is a folder, not a file", file=path)
        if not stat.S_ISREG(info.st_mode):  # a pipe or a device would never end
            raise InputError("this is not an ordinary file", file=path)
        if info.st_size > MAX_FILE_BYTES:
            raise InputError(f"the file is {info.st_size // (1024 * 1024)} MB; files over "
                             f"{MAX_FILE_BYTES // (1024 * 1024)} MB are not read", file=path)
        with open(path, "rb") as f:
            return f.read(16)
    except InputError:
        raise
    except FileNotFoundError:
        raise InputError("the file does not exist", file=path) from None
    except OSError as exc:
        raise InputError(f"the file cannot be read ({exc.strerror or exc})", file=path) from None


def _read_bytes(path: Path) -> bytes:
    try:
        with open(path, "rb") as f:
            # Read one byte past the limit: a file that grew after stat() is still refused.
            data = f.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise InputError(f"the file cannot be read ({exc.strerror or exc})", file=path) from None
    if len(data) > MAX_FILE_BYTES:
        raise InputError(f"the file is over {MAX_FILE_BYTES // (1024 * 1024)} MB; it is not read",
                         file=path)
    return data


def _decode(path: Path, data: bytes) -> str:
    for magic, message in _MAGIC:
        if data.startswith(magic):
            raise InputError(message, file=path)
    if b"\x00" in data[:65536]:
        raise InputError("this is not a text (CSV) file; save it as CSV UTF-8 and try again",
                         file=path)
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        if _looks_binary(data[:4096]):
            raise InputError("this is not a text (CSV) file (it holds binary data); save it "
                             "as CSV UTF-8 and try again", file=path) from None
        line = data[: exc.start].count(b"\n") + 1
        raise InputError("the file is not UTF-8 text (a character cannot be read; was it "
                         "saved as 'CSV' in a local encoding?); save it as CSV UTF-8",
                         file=path, row=line) from None


def _looks_binary(head: bytes) -> bool:
    # Text in any 8-bit encoding has few bytes below 0x20 besides tab and line ends.
    control = sum(1 for byte in head if byte < 0x20 and byte not in (9, 10, 13))
    return control > len(head) // 20


def _delimiter(header_line: str) -> str:
    # A semicolon is the usual delimiter where the comma is the decimal mark.
    return ";" if header_line.count(";") > header_line.count(",") else ","


def _csv_rows(path: Path, delimiter: str | None) -> Iterator[tuple[int, list[str]]]:
    text = _decode(path, _read_bytes(path))
    first = text.split("\n", 1)[0]
    reader = csv.reader(io.StringIO(text, newline=""),
                        delimiter=delimiter or _delimiter(first))
    row = 0
    try:
        for values in reader:
            # A quoted field may span lines: the row is where the record starts,
            # which is the spreadsheet's row when no field spans lines.
            row += 1
            if row > MAX_ROWS + 1:
                raise InputError(f"more than {MAX_ROWS} rows; this is not a one-day file",
                                 file=path, row=row)
            yield row, values
    except csv.Error as exc:
        raise _csv_error(path, exc, row + 1) from None


def _csv_error(path: Path, exc: csv.Error, row: int) -> InputError:
    text = str(exc)
    if "field larger than field limit" in text:
        return InputError("a value is far too long (over "
                          f"{csv.field_size_limit()} characters); most likely a quote "
                          "(\") is not closed", file=path, row=row)
    if "NUL" in text:
        return InputError("the row holds a NUL byte (a hidden character); this is not a "
                          "clean text file", file=path, row=row)
    return InputError(f"the CSV cannot be read ({text})", file=path, row=row)


def _table(path: Path, records: Iterable[tuple[int, list[str]]]) -> Table:
    records = iter(records)
    first = next(records, None)
    if first is None:
        raise InputError("the file is empty; it needs a header row", file=path)
    header_row, header = first
    keep = _check_header(path, header_row, header)
    columns = tuple(header[k].strip().lower() for k in keep)
    rows = []
    for number, values in records:
        width = len(values)
        picked = tuple(values[k].strip() if k < width else "" for k in keep)
        if any(picked):
            rows.append((number, picked))
    return Table(str(path), columns, tuple(rows))


def _check_header(path: Path, row: int, header: list[str]) -> list[int]:
    """Positions of the named columns; refuses absurd widths and repeated names."""
    keep = named_positions(header)
    if keep and keep[-1] >= MAX_SHEET_COLUMNS:
        raise InputError(f"the header row reaches column {keep[-1] + 1}, wider than any "
                         "spreadsheet; this is not a day file", file=path, row=row)
    if len(keep) > MAX_COLUMNS:
        raise InputError(f"the header names {len(keep)} columns; over {MAX_COLUMNS} is not a "
                         "day file", file=path, row=row)
    seen = set()
    for k in keep:
        name = header[k].strip().lower()
        if name in seen:
            raise InputError(f"the column '{name}' appears twice in the header",
                             file=path, row=row, column=name)
        seen.add(name)
    return keep

