"""Opening, saving, exporting and attaching files from the main window."""

from __future__ import annotations

import importlib.util
from collections.abc import Callable
from contextlib import contextmanager
from pathlib import Path

from PySide6.QtCore import QMimeData, QObject, Signal
from PySide6.QtGui import QAction, QKeySequence, QUndoStack
from PySide6.QtWidgets import QFileDialog, QMenu, QMessageBox, QStyle, QWidget

from shipgui.core import InputError, Plan, Problem
from shipgui.core.demo import DEMO_SETTINGS, demo_files
from shipgui.core.document import DayDocument
from shipgui.core.drivers import names_by_vehicle
from shipgui.core.export.plan_json import plan_to_json
from shipgui.core.export.routes_table import write_routes
from shipgui.core.io.day_files import read_day_files, read_kind
from shipgui.core.io.files import write_bytes_atomic
from shipgui.core.io.plan_file import PLAN_SUFFIX
from shipgui.core.io.readers import read_inputs

from .actions import make_action
from .models.commands import AttachSites, AttachTravel
from .panels.problems import ProblemsDialog, problems_of
from .services.exports import ExportController
from .services.settings import DEFAULT, FOLDER, NONE, AppSettings
from .wording import os_error_text

__all__ = ["FileActions", "find_pdf_writer", "OPEN_FILTER", "ORIGIN_TEXT"]

_TABLES = "*.csv *.txt *.xlsx *.xlsm *.xltx *.xltm"
OPEN_FILTER = (f"Days (*.shipgui {_TABLES});;Plan documents (*.shipgui);;Jobs, sites or "
               f"travel tables ({_TABLES});;All files (*)")
TABLE_FILTER = f"Tables: CSV or Excel workbook ({_TABLES});;All files (*)"
PLAN_FILTER = "Plan documents (*.shipgui)"
PLAN_SUFFIXES = (PLAN_SUFFIX, ".json")  # .json: an exported plan gets a word of advice
ROUTES_FILTERS = {"CSV for spreadsheets (*.csv)": ".csv", "Excel workbook (*.xlsx)": ".xlsx"}

# Where the day settings on screen come from, as the inputs panel says it.
PLAN, DEFAULT_SET, EDITED = "plan", "default-set", "edited"
ORIGIN_TEXT = {
    FOLDER: "day settings as last used for a day in this folder",
    DEFAULT: "day settings from your default (no day planned in this folder yet)",
    NONE: "no day settings remembered for this folder: set depot, day and turnaround",
    PLAN: "day settings saved in the plan file",
    DEFAULT_SET: "these day settings are your default for new folders",
    EDITED: "day settings changed here; the next jobs file from this folder starts with them",
}


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
    """File menu actions for one window; dialogs are QFileDialog / QMessageBox statics.

    Works on the window's document, undo stack and settings; ``current_plan()``
    gives the plan on screen when it matches the inputs (else None).  What the
    window must do in turn comes out as signals: ``opened`` (show this day),
    ``saved`` (the day is safe in this file), ``message`` (status-bar text) and
    ``settings_origin`` (where the day settings on screen come from).
    """

    opened = Signal(object, object)  # DayDocument, Path it came from
    saved = Signal(object)  # Path
    message = Signal(str, int)  # text, milliseconds
    settings_origin = Signal(str)
    quit_requested = Signal()

    def __init__(self, document: DayDocument, undo_stack: QUndoStack, settings: AppSettings,
                 current_plan: Callable[[], Plan | None], parent: QWidget) -> None:
        super().__init__(parent)
        self.document = document
        self.undo_stack = undo_stack
        self.settings = settings
        self.current_plan = current_plan
        self.dialog_parent = parent
        self.problem_dialog: ProblemsDialog | None = None
        self.pdf_writer = find_pdf_writer()
        self.exports = ExportController(self)
        self.exports.busy_changed.connect(lambda _busy: self.update_actions())
        self.exports.finished.connect(
            lambda path: self.message.emit(f"Exported {path.name}", 5000))
        self.exports.failed.connect(self._export_failed)
        self.exports.cancelled.connect(
            lambda what: self.message.emit(f"Export of {what} cancelled; nothing was written.",
                                           5000))
        sp = QStyle.StandardPixmap
        self.open_action = make_action(self, "Open…", self.open_dialog,
                                       shortcut=QKeySequence.StandardKey.Open,
                                       icon=sp.SP_DialogOpenButton)
        self.demo_action = make_action(self, "Open demo day", self.open_demo)
        self.save_action = make_action(self, "Save", self.save,
                                       shortcut=QKeySequence.StandardKey.Save,
                                       icon=sp.SP_DialogSaveButton)
        self.save_as_action = make_action(self, "Save as…", self.save_as,
                                          shortcut=QKeySequence.StandardKey.SaveAs)
        self.export_json_action = make_action(self, "Export plan JSON…", self.export_json)
        self.export_pdf_action = (make_action(self, "Export PDF…", self.export_pdf)
                                  if self.pdf_writer is not None else None)
        self.export_routes_action = make_action(self, "Export routes (CSV/XLSX)…",
                                                self.export_routes)
        self.quit_action = make_action(self, "Quit", self.quit_requested.emit,
                                       shortcut=QKeySequence.StandardKey.Quit)
        self.recent_menu = QMenu("Open recent", parent)
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
        """Exports only for a current plan, one at a time."""
        plan = self.current_plan()
        ok = plan is not None and not self.exports.busy
        for a in self.export_actions():
            a.setEnabled(ok)

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
        paths, _ = QFileDialog.getOpenFileNames(self.dialog_parent, "Open a day",
                                                self._directory(), OPEN_FILTER)
        if paths:
            self.open_paths(paths)

    def open_demo(self) -> None:
        if not self.maybe_save():
            return
        files = demo_files()
        with self._guard("The demo day"):
            inputs = read_inputs(files["jobs"], files["sites"], files["travel"],
                                 settings=DEMO_SETTINGS)
            self._finish_open(DayDocument.from_inputs(inputs), Path(files["jobs"]), None)

    def open_paths(self, paths: list[str | Path]) -> bool:
        """Open a plan document, or a day's table files (CSV or XLSX; jobs, sites and
        travel in any mix, companions found beside the jobs file); sites or travel
        files alone are attached.  Never raises: every failure is shown."""
        paths = [Path(p) for p in paths]
        name = paths[0].name if len(paths) == 1 else f"These {len(paths)} files"
        with self._guard(name) as outcome:
            outcome.append(self._open_paths(paths, name))
        return bool(outcome and outcome[0])

    def _open_paths(self, paths: list[Path], name: str) -> bool:
        plans = [p for p in paths if p.suffix.lower() in PLAN_SUFFIXES]
        if plans:
            return self._open_plan(plans[0])
        try:
            files = read_day_files(paths)
        except InputError as exc:
            self.show_problems(f"{name} could not be opened; nothing was changed.", exc)
            return False
        if files.jobs is None:
            return all(self._attach(kind, files.paths[kind], getattr(files, kind))
                       for kind in ("sites", "travel") if kind in files.paths)
        if not self.maybe_save():
            return False
        jobs_path = files.paths["jobs"]
        settings, origin = self.settings.day_settings_for(jobs_path.parent)
        self._finish_open(DayDocument.from_inputs(files.inputs(settings)), jobs_path, origin)
        return True

    def _open_plan(self, path: Path) -> bool:
        if not self.maybe_save():
            return False
        try:
            document = DayDocument.open(path)
        except InputError as exc:
            self.show_problems(f"{path.name} could not be opened; nothing was changed.", exc)
            return False
        self._finish_open(document, path, PLAN)
        self.remember_day_settings()
        return True

    def _finish_open(self, document: DayDocument, path: Path, origin: str | None) -> None:
        self.opened.emit(document, path)
        if path.suffix.lower() == PLAN_SUFFIX:
            self.settings.add_recent_file(path)
        self._remember(path)
        attached = [k for k in ("sites", "travel") if k in document.sources]
        note = f" with {' and '.join(attached)} files" if attached else ""
        where = ORIGIN_TEXT.get(origin, "")
        self.settings_origin.emit(where)
        self.message.emit(f"Opened {path.name}{note}" + (f"; {where}" if where else ""), 8000)

    def show_problems(self, heading: str,
                      problems: InputError | list[Problem]) -> ProblemsDialog:
        """Show problems in a window that does not block (the day stays as it was)."""
        if self.problem_dialog is not None:
            self.problem_dialog.close()
        listed, more = (problems_of(problems) if isinstance(problems, InputError)
                        else (list(problems), 0))
        self.problem_dialog = ProblemsDialog(heading, listed, self.dialog_parent, more)
        self.problem_dialog.show()
        return self.problem_dialog

    @contextmanager
    def _guard(self, what: str):
        """Nothing raised in a slot may escape into Qt: an unexpected failure is
        shown (with its type, to report it) and the day stays as it was."""
        outcome: list = []
        try:
            yield outcome
        except Exception as exc:  # noqa: BLE001 - shown to the user, never raised
            QMessageBox.critical(self.dialog_parent, "Not opened",
                                 f"{what} could not be opened because of an unexpected error "
                                 f"({type(exc).__name__}: {str(exc)[:200]}); nothing was "
                                 "changed. Please report it.")

    # ------------------------------------------------------------ day settings
    def document_folder(self) -> Path | None:
        """The folder the day on screen was opened from (its plan file or jobs file),
        None for the built-in demo or a day not from a file."""
        doc = self.document
        source = doc.path or (Path(doc.sources["jobs"]) if "jobs" in doc.sources else None)
        if source is None:
            return None
        folder = source.resolve().parent
        demo = Path(demo_files()["jobs"]).resolve().parent
        return None if folder == demo else folder

    def remember_day_settings(self, *, edited: bool = False) -> None:
        """The day's settings become the ones its folder's next jobs file starts with."""
        folder = self.document_folder()
        if folder is None:
            return
        self.settings.remember_day_settings(folder, self.document.settings)
        if edited:
            self.settings_origin.emit(ORIGIN_TEXT[EDITED])

    def make_default_day_settings(self) -> None:
        self.settings.set_default_day_settings(self.document.settings)
        self.settings_origin.emit(ORIGIN_TEXT[DEFAULT_SET])
        self.message.emit("These day settings are now the default for jobs files from "
                          "folders not planned before", 8000)

    # ------------------------------------------------------------ companions
    def attach_companion(self, kind: str) -> None:
        path, _ = QFileDialog.getOpenFileName(self.dialog_parent, f"Attach a {kind} file",
                                              self._directory(), TABLE_FILTER)
        if path:
            self.attach_file(kind, Path(path))

    def attach_file(self, kind: str, path: Path) -> bool:
        """Read ``path`` as the day's sites or travel file (as ``--sites`` / ``--travel``
        read it; a workbook's sheet named like the kind is used if there is one)."""
        with self._guard(path.name) as outcome:
            try:
                _kind, value = read_kind(path, kind)
            except InputError as exc:
                self.show_problems(f"The {kind} file {path.name} could not be attached.", exc)
                return False
            outcome.append(self._attach(kind, path, value))
        return bool(outcome and outcome[0])

    def _attach(self, kind: str, path: Path, value) -> bool:
        command = AttachSites if kind == "sites" else AttachTravel
        self.undo_stack.push(command(self.document, value, str(path)))
        self._remember(path)
        return True

    def remove_companion(self, kind: str) -> None:
        command = AttachSites if kind == "sites" else AttachTravel
        self.undo_stack.push(command(self.document, [] if kind == "sites" else {}, None))

    # ------------------------------------------------------------ saving
    def save(self) -> bool:
        path = self.document.path
        if path is None:
            return self.save_as()
        return self._save_to(path)

    def save_as(self) -> bool:
        doc = self.document
        suggestion = Path(self._directory()) / (Path(doc.title).stem + PLAN_SUFFIX)
        path, _ = QFileDialog.getSaveFileName(self.dialog_parent, "Save the day", str(suggestion),
                                              PLAN_FILTER)
        if not path:
            return False
        path = Path(path)
        if path.suffix.lower() != PLAN_SUFFIX:
            path = path.with_name(path.name + PLAN_SUFFIX)
        return self._save_to(path)

    def _save_to(self, path: Path) -> bool:
        try:
            self.document.save(path)
        except OSError as exc:
            QMessageBox.warning(self.dialog_parent, "Not saved",
                                f"{path.name} was not saved: {os_error_text(exc)}.")
            return False
        self.document.path = path
        self.undo_stack.setClean()
        self.settings.add_recent_file(path)
        self._remember(path)
        self.saved.emit(path)
        self.message.emit(f"Saved {path.name}", 5000)
        return True

    def maybe_save(self) -> bool:
        """Ask about unsaved changes; False means the user chose to stay."""
        if self.undo_stack.isClean():
            return True
        buttons = QMessageBox.StandardButton
        answer = QMessageBox.question(
            self.dialog_parent, "Unsaved changes",
            f"{self.document.title} has changes that are not saved. Save them?",
            buttons.Save | buttons.Discard | buttons.Cancel, buttons.Save)
        if answer == buttons.Save:
            return self.save()
        return answer == buttons.Discard

    # ------------------------------------------------------------ export
    def maybe_stop_export(self) -> bool:
        """Before closing: stop a running export if the user agrees (it then writes
        nothing); False means the user chose to wait."""
        if not self.exports.busy:
            return True
        buttons = QMessageBox.StandardButton
        answer = QMessageBox.question(
            self.dialog_parent, "Export still running",
            f"{self.exports.what[0].upper()}{self.exports.what[1:]} is still being written. "
            "Stop it and close? (It will not be written.)",
            buttons.Yes | buttons.No, buttons.No)
        if answer != buttons.Yes:
            return False
        self.exports.cancel()
        return True

    def _export_path(self, title: str, suffix: str, pattern: str) -> Path | None:
        stem = Path(self.document.title).stem
        path, _ = QFileDialog.getSaveFileName(self.dialog_parent, title,
                                              str(Path(self._directory()) / f"{stem}{suffix}"),
                                              pattern)
        if not path:
            return None
        path = Path(path)
        return path if path.suffix.lower() == suffix else path.with_name(path.name + suffix)

    def _plan_to_export(self) -> Plan | None:
        """The plan on screen if it matches the inputs and passed its independent check;
        a plan that failed the check is refused, as the command line and the PDF do."""
        plan = self.current_plan()
        if plan is None or self.exports.busy:
            return None
        if not plan.verified:
            QMessageBox.warning(
                self.dialog_parent, "Not exported",
                "This plan did not pass its independent check, so it is not exported: "
                "it could be wrong. Please report this with the day's files.")
            return None
        return plan

    def _export_failed(self, what: str, reason: str) -> None:
        QMessageBox.warning(self.dialog_parent, "Not exported",
                            f"{what[0].upper()}{what[1:]} was not written: {reason}.")

    def _names(self, plan: Plan) -> dict[int, str]:
        return names_by_vehicle(self.document.place_drivers(plan.route_ids()))

    def export_json(self) -> bool:
        """Write the plan as JSON in the background; True when the export started."""
        plan = self._plan_to_export()
        if plan is None:
            return False
        path = self._export_path("Export the plan as JSON", ".json", "JSON (*.json)")
        if path is None:
            return False
        names = self._names(plan)

        def write(_progress, _cancelled) -> None:
            write_bytes_atomic(path, plan_to_json(plan, driver_names=names).encode("utf-8"))
        return self.exports.start(f"the plan JSON {path.name}", path, write)

    def export_routes(self) -> bool:
        """One row per job with vehicle and sequence, for a spreadsheet (background)."""
        plan = self._plan_to_export()
        if plan is None:
            return False
        stem = Path(self.document.title).stem
        path, chosen = QFileDialog.getSaveFileName(
            self.dialog_parent, "Export routes for a spreadsheet",
            str(Path(self._directory()) / f"{stem}-routes.csv"), ";;".join(ROUTES_FILTERS))
        if not path:
            return False
        path = Path(path)
        if path.suffix.lower() not in (".csv", ".xlsx"):
            path = path.with_name(path.name + ROUTES_FILTERS.get(chosen, ".csv"))
        names = self._names(plan)
        return self.exports.start(f"the routes {path.name}", path,
                                  lambda _progress, _cancelled: write_routes(plan, path, names))

    def export_pdf(self) -> bool:
        """Driver sheets and proof as PDF, in the background with progress and cancel."""
        if self.pdf_writer is None:
            return False
        plan = self._plan_to_export()
        if plan is None:
            return False
        path = self._export_path("Export route sheets as PDF", ".pdf", "PDF (*.pdf)")
        if path is None:
            return False
        names, writer = self._names(plan), self.pdf_writer
        return self.exports.start(
            f"the PDF {path.name}", path,
            lambda progress, _cancelled: writer(plan, path, driver_names=names,
                                                progress=progress))

    # ------------------------------------------------------------ drag and drop
    @staticmethod
    def droppable(mime: QMimeData) -> list[Path]:
        """Every local file: the readers decide what it is (and say so if nothing)."""
        if not mime.hasUrls():
            return []
        return [Path(u.toLocalFile()) for u in mime.urls() if u.isLocalFile()]
