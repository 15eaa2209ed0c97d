"""Opening, saving, exporting and attaching files from the main window."""

from __future__ import annotations

import csv
import importlib.util
from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from PySide6.QtCore import QMimeData, QObject
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import QFileDialog, QMenu, QMessageBox, QStyle

from shipgui.core import InputError, Plan, Problem, Settings, read_sites, read_travel
from shipgui.core.demo import DEMO_SETTINGS, demo_files
from shipgui.core.document import DayDocument
from shipgui.core.export.plan_json import plan_to_json
from shipgui.core.export.routes_table import write_routes
from shipgui.core.io.files import write_bytes_atomic
from shipgui.core.io.plan_file import PLAN_SUFFIX
from shipgui.core.io.readers import read_inputs

from .models.commands import AttachSites, AttachTravel
from .panels.problems import ProblemsDialog

if TYPE_CHECKING:
    from .main_window import MainWindow

__all__ = ["FileActions", "find_pdf_writer", "OPEN_FILTER", "csv_kind", "companion_files"]

OPEN_FILTER = ("Days (*.shipgui *.csv);;Plan documents (*.shipgui);;Jobs, sites or travel "
               "(*.csv);;All files (*)")
PLAN_FILTER = "Plan documents (*.shipgui)"
ROUTES_FILTERS = {"CSV for spreadsheets (*.csv)": ".csv", "Excel workbook (*.xlsx)": ".xlsx"}
DROPPABLE = {".csv", ".shipgui", ".json"}


def find_pdf_writer() -> Callable | None:
    """The report package's PDF writer, or None when it is not installed."""
    try:
        if importlib.util.find_spec("shipgui.report") is None:
            return None
        from shipgui.report import write_plan_pdf
    except Exception:  # noqa: BLE001 - a missing or broken report package hides the action
        return None
    return write_plan_pdf


class FileActions(QObject):
    """File menu actions for one window; dialogs are QFileDialog / QMessageBox statics."""

    def __init__(self, window: MainWindow) -> None:
        super().__init__(window)
        self.window = window
        self.settings = window.settings
        self.problem_dialog: ProblemsDialog | None = None
        self.pdf_writer = find_pdf_writer()
        sp = QStyle.StandardPixmap
        style = window.style()

        def action(text, slot, shortcut=None, icon=None) -> QAction:
            a = QAction(text, window)
            if shortcut is not None:
                a.setShortcut(QKeySequence(shortcut))
            if icon is not None:
                a.setIcon(style.standardIcon(icon))
            a.triggered.connect(slot)
            return a

        self.open_action = action("Open…", self.open_dialog, QKeySequence.StandardKey.Open,
                                  sp.SP_DialogOpenButton)
        self.demo_action = action("Open demo day", self.open_demo)
        self.save_action = action("Save", self.save, QKeySequence.StandardKey.Save,
                                  sp.SP_DialogSaveButton)
        self.save_as_action = action("Save as…", self.save_as, QKeySequence.StandardKey.SaveAs)
        self.export_json_action = action("Export plan JSON…", self.export_json)
        self.export_pdf_action = (action("Export PDF…", self.export_pdf)
                                  if self.pdf_writer is not None else None)
        self.export_routes_action = action("Export routes (CSV/XLSX)…", self.export_routes)
        self.quit_action = action("Quit", window.close, QKeySequence.StandardKey.Quit)
        self.recent_menu = QMenu("Open recent", window)
        self.recent_menu.aboutToShow.connect(self._fill_recent)

    def export_actions(self) -> list[QAction]:
        return [a for a in (self.export_json_action, self.export_pdf_action,
                            self.export_routes_action) if a is not None]

    def fill_file_menu(self, menu: QMenu) -> None:
        for a in (self.open_action, self.recent_menu, self.demo_action, None, self.save_action,
                  self.save_as_action, None, *self.export_actions(), None, self.quit_action):
            if a is None:
                menu.addSeparator()
            elif isinstance(a, QMenu):
                menu.addMenu(a)
            else:
                menu.addAction(a)

    def update_actions(self) -> None:
        current = self.window.plan is not None and self.window.plan_is_current
        for a in self.export_actions():
            a.setEnabled(current)

    def _fill_recent(self) -> None:
        self.recent_menu.clear()
        files = self.settings.recent_files()
        if not files:
            self.recent_menu.addAction("No recent files").setEnabled(False)
        for path in files:
            self.recent_menu.addAction(Path(path).name, lambda p=path: self.open_paths([p]))

    def _directory(self) -> str:
        return self.settings.get("files/last_directory") or str(Path.home())

    def _remember(self, path: str | Path) -> None:
        self.settings.set("files/last_directory", str(Path(path).resolve().parent))

    # ------------------------------------------------------------ opening
    def open_dialog(self) -> None:
        paths, _ = QFileDialog.getOpenFileNames(self.window, "Open a day", self._directory(),
                                                OPEN_FILTER)
        if paths:
            self.open_paths(paths)

    def open_demo(self) -> None:
        if not self.maybe_save():
            return
        files = demo_files()
        self._open_csv(files["jobs"], files["sites"], files["travel"], DEMO_SETTINGS)

    def open_paths(self, paths: list[str | Path]) -> bool:
        """Open a plan document or a jobs CSV; sites / travel CSVs alone are attached."""
        paths = [Path(p) for p in paths]
        plans = [p for p in paths if p.suffix.lower() in (".shipgui", ".json")]
        kinds = {p: csv_kind(p) for p in paths if p.suffix.lower() == ".csv"}
        unknown = [p for p, kind in kinds.items() if kind is None]
        if unknown:
            self.show_problems("This file could not be opened.", [Problem(
                "not a jobs, sites or travel file: the header needs a 'job' column (jobs), "
                "a 'site' column (sites) or 'from', 'to', 'minutes' (travel)", str(unknown[0]),
                1)])
            return False
        if plans:
            return self._open_plan(plans[0])
        by_kind = {kind: p for p, kind in kinds.items()}
        if "jobs" in by_kind:
            found = companion_files(by_kind["jobs"])
            return self._open_csv(by_kind["jobs"], by_kind.get("sites", found.get("sites")),
                                  by_kind.get("travel", found.get("travel")), None)
        ok = True
        for kind in ("sites", "travel"):
            if kind in by_kind:
                ok = self.attach_file(kind, by_kind[kind]) and ok
        return ok

    def _open_plan(self, path: Path) -> bool:
        if not self.maybe_save():
            return False
        try:
            document = DayDocument.open(path)
        except InputError as exc:
            self.show_problems(f"{path.name} could not be opened; nothing was changed.",
                               list(exc.problems))
            return False
        self._finish_open(document, path)
        return True

    def _open_csv(self, jobs, sites, travel, settings) -> bool:
        if settings is None:
            if not self.maybe_save():
                return False
            settings = Settings()
        try:
            document = DayDocument.from_inputs(read_inputs(jobs, sites, travel, settings=settings))
        except InputError as exc:
            self.show_problems(f"{Path(jobs).name} could not be opened; nothing was changed.",
                               list(exc.problems))
            return False
        self._finish_open(document, Path(jobs))
        return True

    def _finish_open(self, document, path: Path) -> None:
        self.window.load_document(document)
        if path.suffix.lower() == ".shipgui":
            self.settings.add_recent_file(path)
        self._remember(path)
        attached = [k for k in ("sites", "travel") if k in document.sources]
        note = f" with {' and '.join(attached)} files" if attached else ""
        self.window.statusBar().showMessage(f"Opened {path.name}{note}", 6000)

    def show_problems(self, heading: str, problems: list[Problem]) -> ProblemsDialog:
        """Show problems in a window that does not block (the day stays as it was)."""
        if self.problem_dialog is not None:
            self.problem_dialog.close()
        self.problem_dialog = ProblemsDialog(heading, problems, self.window)
        self.problem_dialog.show()
        return self.problem_dialog

    # ------------------------------------------------------------ companions
    def attach_companion(self, kind: str) -> None:
        path, _ = QFileDialog.getOpenFileName(self.window, f"Attach a {kind} file",
                                              self._directory(), "CSV files (*.csv)")
        if path:
            self.attach_file(kind, Path(path))

    def attach_file(self, kind: str, path: Path) -> bool:
        read = read_sites if kind == "sites" else read_travel
        try:
            value = read(path)
        except InputError as exc:
            self.show_problems(f"The {kind} file {path.name} could not be attached.",
                               list(exc.problems))
            return False
        command = AttachSites if kind == "sites" else AttachTravel
        self.window.undo_stack.push(command(self.window.document, value, str(path)))
        self._remember(path)
        return True

    def remove_companion(self, kind: str) -> None:
        command = AttachSites if kind == "sites" else AttachTravel
        self.window.undo_stack.push(command(self.window.document,
                                            [] if kind == "sites" else {}, None))

    # ------------------------------------------------------------ saving
    def save(self) -> bool:
        path = self.window.document.path
        if path is None:
            return self.save_as()
        return self._save_to(path)

    def save_as(self) -> bool:
        doc = self.window.document
        suggestion = Path(self._directory()) / (Path(doc.title).stem + PLAN_SUFFIX)
        path, _ = QFileDialog.getSaveFileName(self.window, "Save the day", str(suggestion),
                                              PLAN_FILTER)
        if not path:
            return False
        path = Path(path)
        if path.suffix.lower() != PLAN_SUFFIX:
            path = path.with_name(path.name + PLAN_SUFFIX)
        return self._save_to(path)

    def _save_to(self, path: Path) -> bool:
        doc = self.window.document
        try:
            doc.save(path)
        except OSError as exc:
            QMessageBox.warning(self.window, "Not saved", str(exc))
            return False
        doc.path = path
        self.window.undo_stack.setClean()
        self.window.autosaver.discard()  # also when the stack was clean already (recovered)
        self.window.update_title()
        self.settings.add_recent_file(path)
        self._remember(path)
        self.window.statusBar().showMessage(f"Saved {path.name}", 5000)
        return True

    def maybe_save(self) -> bool:
        """Ask about unsaved changes; False means the user chose to stay."""
        if self.window.undo_stack.isClean():
            return True
        buttons = QMessageBox.StandardButton
        answer = QMessageBox.question(
            self.window, "Unsaved changes",
            f"{self.window.document.title} has changes that are not saved. Save them?",
            buttons.Save | buttons.Discard | buttons.Cancel, buttons.Save)
        if answer == buttons.Save:
            return self.save()
        return answer == buttons.Discard

    # ------------------------------------------------------------ export
    def _export_path(self, title: str, suffix: str, pattern: str) -> Path | None:
        stem = Path(self.window.document.title).stem
        path, _ = QFileDialog.getSaveFileName(self.window, title,
                                              str(Path(self._directory()) / f"{stem}{suffix}"),
                                              pattern)
        if not path:
            return None
        path = Path(path)
        return path if path.suffix.lower() == suffix else path.with_name(path.name + suffix)

    def _current_plan(self) -> Plan | None:
        """The plan on screen, only when it matches the inputs (never a stale one)."""
        plan = self.window.plan
        return plan if plan is not None and self.window.plan_is_current else None

    def _write_export(self, path: Path, write: Callable[[Path], None],
                      errors: tuple[type[BaseException], ...] = (OSError,),
                      reason: str = "{exc}") -> bool:
        """Write one export; a failure is shown to the user, never raised."""
        try:
            write(path)
        except errors as exc:
            QMessageBox.warning(self.window, "Not exported", reason.format(exc=exc))
            return False
        self.window.statusBar().showMessage(f"Exported {path.name}", 5000)
        return True

    def export_json(self) -> bool:
        plan = self._current_plan()
        if plan is None:
            return False
        path = self._export_path("Export the plan as JSON", ".json", "JSON (*.json)")
        if path is None:
            return False
        names = self.window.document.driver_names
        return self._write_export(path, lambda p: write_bytes_atomic(
            p, plan_to_json(plan, driver_names=names).encode("utf-8")))

    def export_routes(self) -> bool:
        """One row per job with vehicle and sequence, for a spreadsheet."""
        plan = self._current_plan()
        if plan is None:
            return False
        stem = Path(self.window.document.title).stem
        path, chosen = QFileDialog.getSaveFileName(
            self.window, "Export routes for a spreadsheet",
            str(Path(self._directory()) / f"{stem}-routes.csv"), ";;".join(ROUTES_FILTERS))
        if not path:
            return False
        path = Path(path)
        if path.suffix.lower() not in (".csv", ".xlsx"):
            path = path.with_name(path.name + ROUTES_FILTERS.get(chosen, ".csv"))
        names = dict(self.window.document.driver_names)
        return self._write_export(path, lambda p: write_routes(plan, p, names))

    def export_pdf(self) -> bool:
        plan = self._current_plan()
        if self.pdf_writer is None or plan is None:
            return False
        path = self._export_path("Export route sheets as PDF", ".pdf", "PDF (*.pdf)")
        if path is None:
            return False
        names = dict(self.window.document.driver_names)
        # Any failure of the writer is shown to the user, not raised.
        return self._write_export(path, lambda p: self.pdf_writer(plan, p, driver_names=names),
                                  errors=(Exception,),
                                  reason="The PDF could not be written: {exc}")

    # ------------------------------------------------------------ drag and drop
    @staticmethod
    def droppable(mime: QMimeData) -> list[Path]:
        if not mime.hasUrls():
            return []
        paths = [Path(u.toLocalFile()) for u in mime.urls() if u.isLocalFile()]
        return [p for p in paths if p.suffix.lower() in DROPPABLE]


def csv_kind(path: str | Path) -> str | None:
    """"jobs", "sites" or "travel" from the header of a CSV file, else None."""
    try:
        with open(path, encoding="utf-8-sig", newline="") as f:
            header = next(csv.reader(f), [])
    except (OSError, UnicodeDecodeError, csv.Error):
        return None
    names = {h.strip().casefold() for h in header}
    if "job" in names:
        return "jobs"
    if {"from", "to", "minutes"} <= names:
        return "travel"
    if "site" in names:
        return "sites"
    return None


def companion_files(jobs: str | Path) -> dict[str, Path]:
    """Sites and travel files lying next to a jobs file as sites.csv / travel.csv."""
    folder = Path(jobs).resolve().parent
    found = {}
    for kind in ("sites", "travel"):
        candidate = folder / f"{kind}.csv"
        if candidate.is_file() and csv_kind(candidate) == kind:
            found[kind] = candidate
    return found
