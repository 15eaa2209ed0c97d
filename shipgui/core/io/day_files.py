"""Files dropped on the app or picked in its Open dialog: which is the jobs file,
which the sites and travel files, and the companions lying next to them.

Nothing is guessed before the real readers run: every file is read by the same
code as on the command line (so it is refused with the same message), and its
kind is then told by its header.  A workbook may hold the three tables on sheets
named like them ("Jobs", "Sites", "Travel").
"""

from __future__ import annotations

import re
import zipfile
from collections.abc import Iterable
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

from ..errors import InputError, ProblemCollector
from ..model import DayInputs, Job, Settings, Site, TravelPairs
from .readers import jobs_from_table, sites_from_table, table_kind, travel_from_table
from .tables import SPREADSHEET_SUFFIXES, read_table

__all__ = ["DayFiles", "read_day_files", "read_kind", "companion_files", "sheet_for",
           "KINDS"]

KINDS = ("jobs", "sites", "travel")
_FROM_TABLE = {"jobs": jobs_from_table, "sites": sites_from_table, "travel": travel_from_table}


@dataclass
class DayFiles:
    """The tables found, by kind, with the file (and sheet) each came from."""

    jobs: list[Job] | None = None
    plan_date: date | None = None
    sites: list[Site] | None = None
    travel: TravelPairs | None = None
    paths: dict[str, Path] = field(default_factory=dict)
    sheets: dict[str, str] = field(default_factory=dict)

    def inputs(self, settings: Settings) -> DayInputs:
        """The day's inputs (a jobs table must have been found)."""
        if self.jobs is None:
            raise ValueError("no jobs file among the files")
        return DayInputs(tuple(self.jobs), tuple(self.sites or ()), dict(self.travel or {}),
                         settings, self.plan_date, {k: str(p) for k, p in self.paths.items()})

    def keep(self, kind: str, path: Path, sheet: str | None, value) -> None:
        if kind in self.paths:
            return  # two files of one kind: the first given counts
        self.paths[kind] = path
        if sheet:
            self.sheets[kind] = sheet
        if kind == "jobs":
            self.jobs, self.plan_date = value
        else:
            setattr(self, kind, value)


def sheet_for(path: str | Path, kind: str | None) -> str | None:
    """The sheet of a workbook named like ``kind`` ("Jobs" for jobs; case and spaces
    ignored), else None (the first sheet).  None for a file that is no workbook."""
    names = _sheet_names(Path(path))
    wanted = (kind or "jobs").casefold()
    return next((n for n in names if n.strip().casefold() == wanted), None)


def _sheet_names(path: Path) -> list[str]:
    """The sheet names of a workbook, read from its directory only; [] if it is no
    workbook (the real reader then says what is wrong)."""
    if path.suffix.lower() not in SPREADSHEET_SUFFIXES:
        return []
    try:
        with zipfile.ZipFile(path) as archive:
            info = archive.getinfo("xl/workbook.xml")
            if info.file_size > 1 << 20:
                return []
            xml = archive.read(info).decode("utf-8", "replace")
    except (OSError, KeyError, zipfile.BadZipFile, ValueError, EOFError,
            NotImplementedError):
        return []
    return [_unescape(m) for m in re.findall(r'<(?:\w+:)?sheet\b[^>]*?\bname="([^"]*)"', xml)]


def _unescape(text: str) -> str:
    for entity, char in (("&lt;", "<"), ("&gt;", ">"), ("&quot;", '"'), ("&apos;", "'"),
                         ("&amp;", "&")):
        text = text.replace(entity, char)
    return text


def read_kind(path: str | Path, kind: str | None = None,
              sheet: str | None = None) -> tuple[str, object]:
    """Read one table file: (kind, value).  With ``kind`` the file must be of that
    kind (its reader names the missing columns otherwise); without, the header
    tells, and a header of no kind is read as a jobs file, as on the command line."""
    table = read_table(path, sheet=sheet if sheet is not None else sheet_for(path, kind))
    found = kind or table_kind(table) or "jobs"
    return found, _FROM_TABLE[found](table)


def companion_files(jobs: str | Path) -> dict[str, tuple[Path, str | None]]:
    """Sites and travel tables that go with a jobs file: sheets named "Sites" and
    "Travel" in the same workbook, else sites.csv / travel.csv (or .xlsx) beside it."""
    jobs = Path(jobs)
    found: dict[str, tuple[Path, str | None]] = {}
    for kind in ("sites", "travel"):
        sheet = sheet_for(jobs, kind)
        if sheet is not None:
            found[kind] = (jobs, sheet)
            continue
        for suffix in (".csv", ".xlsx"):
            candidate = jobs.resolve().parent / f"{kind}{suffix}"
            if candidate.is_file() and candidate.resolve() != jobs.resolve():
                found[kind] = (candidate, None)
                break
    return found


def read_day_files(paths: Iterable[str | Path], *, companions: bool = True) -> DayFiles:
    """Read table files of any kinds; with ``companions``, add the sites and travel
    tables that go with the jobs file (:func:`companion_files`) where none was given.

    Raises :class:`~shipgui.core.errors.InputErrors` listing the problems of every file given.  A
    companion whose header is of another kind, or that cannot be read at all, is
    left out (it was not asked for); one that is of its kind but holds bad values
    is reported like the others.
    """
    files = DayFiles()
    issues = ProblemCollector()
    for path in (Path(p) for p in paths):
        try:
            kind, value = read_kind(path)
        except InputError as exc:
            issues.absorb(exc)
            continue
        files.keep(kind, path, sheet_for(path, kind), value)
    issues.raise_if_any()
    if companions and files.jobs is not None:
        for kind, (path, sheet) in companion_files(files.paths["jobs"]).items():
            if kind not in files.paths:
                _add_companion(files, kind, path, sheet, issues)
    issues.raise_if_any()
    return files


def _add_companion(files: DayFiles, kind: str, path: Path, sheet: str | None,
                   issues: ProblemCollector) -> None:
    try:
        table = read_table(path, sheet=sheet)
    except InputError:
        return
    if table_kind(table) != kind:
        return
    try:
        files.keep(kind, path, sheet, _FROM_TABLE[kind](table))
    except InputError as exc:
        issues.absorb(exc)
