"""The main window: composes the panels, owns the document, the undo stack and the solver."""

from __future__ import annotations

from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtGui import QCloseEvent, QKeySequence, QUndoStack
from PySide6.QtWidgets import (
    QInputDialog,
    QLabel,
    QMainWindow,
    QMessageBox,
    QSplitter,
    QStyle,
    QTabWidget,
    QToolBar,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Job, Plan, Problem
from shipgui.core.caution import CAUTION
from shipgui.core.document import Change, DayDocument
from shipgui.core.drivers import DriverPlace, names_by_vehicle
from shipgui.core.io.validation import check_text

from .actions import make_action, themed_icon
from .file_actions import FileActions
from .models.commands import AddJob, ChangePlanDate, ChangeSettings, DeleteJobs, NameDriver
from .models.jobs_model import Column, JobsModel
from .panels.answer_bar import AnswerBar
from .panels.certificate_panel import CertificatePanel
from .panels.export_progress import ExportProgress
from .panels.inputs_panel import InputsPanel
from .panels.jobs_panel import JobsPanel
from .panels.problems import ProblemBox
from .panels.timeline import TimelineView
from .recovery import offer_recovery
from .services.autosave import Autosaver, Recovery
from .services.settings import AppSettings
from .services.worker import SolveController, snapshot
from .shortfall_view import ShortfallView
from .wording import count

__all__ = ["MainWindow", "CAUTION"]


class MainWindow(QMainWindow):
    """One open day.  ``plan`` is the plan shown, ``plan_is_current`` whether it
    matches the inputs as they are now."""

    plan_shown = Signal(object)  # Plan or None, after the screens were updated

    def __init__(self, settings: AppSettings | None = None, *, solve_delay_ms: int = 80) -> None:
        super().__init__()
        self.settings = settings or AppSettings()
        self.document = DayDocument()
        self.undo_stack = QUndoStack(self)
        self.plan: Plan | None = None
        self.plan_is_current = False
        self._fit_when_shown = False
        self._autosave_warned = False  # the dialog is shown once per window
        self.problems: list[Problem] = []
        self.driver_places: list[DriverPlace] = []
        self.solver = SolveController(self, delay_ms=solve_delay_ms)
        self._make_actions()
        self.jobs_model = JobsModel(self.document, self.undo_stack, self)
        self.files = FileActions(self.document, self.undo_stack, self.settings,
                                 self.current_plan, self)
        self.autosaver = Autosaver(self.document, lambda: not self.undo_stack.isClean(),
                                   self.settings.data_directory(), self)
        self._make_panels()
        self._make_menus()
        self._connect()
        self.setAcceptDrops(True)
        self.resize(1280, 760)
        self.update_title()
        self._show_empty("Open a jobs file or a plan to begin (File ▸ Open, or drop a file "
                         "here).")

    # ------------------------------------------------------------ construction
    def current_plan(self) -> Plan | None:
        """The plan on screen when it matches the inputs as they are now, else None."""
        return self.plan if self.plan is not None and self.plan_is_current else None

    def _make_actions(self) -> None:
        sp = QStyle.StandardPixmap
        # Menus read "Undo Set start of J050 to 06:30"; toolbar buttons just "Undo".
        self.undo_action = self.undo_stack.createUndoAction(self, "Undo")
        self.undo_action.setShortcut(QKeySequence.StandardKey.Undo)
        self.undo_action.setIcon(themed_icon("edit-undo"))
        self.undo_action.setIconText("Undo")
        self.redo_action = self.undo_stack.createRedoAction(self, "Redo")
        self.redo_action.setShortcut(QKeySequence.StandardKey.Redo)
        self.redo_action.setIcon(themed_icon("edit-redo"))
        self.redo_action.setIconText("Redo")
        self.add_job_action = make_action(self, "Add job", self.add_job, shortcut="Ctrl+J",
                                          icon=sp.SP_FileDialogNewFolder,
                                          tip="Add a job to the day")
        self.delete_jobs_action = make_action(self, "Delete", self.delete_selected_jobs,
                                              shortcut=QKeySequence.StandardKey.Delete,
                                              icon=sp.SP_DialogDiscardButton,
                                              tip="Delete the selected jobs")
        self.delete_jobs_action.setShortcutContext(Qt.ShortcutContext.WidgetWithChildrenShortcut)
        self.cancel_action = make_action(self, "Cancel solving", self.solver.cancel, shortcut="Esc",
                                         icon=sp.SP_BrowserStop, tip="Stop the solve in progress")
        self.cancel_action.setEnabled(False)
        self.proof_action = make_action(self, "Show proof", self.show_proof, shortcut="Ctrl+P",
                                        tip="Highlight the jobs that prove no smaller fleet "
                                            "exists, and say why", checkable=True)
        self.zoom_in_action = make_action(self, "Zoom in", lambda: self.timeline.zoom_in(),
                                          shortcut=QKeySequence.StandardKey.ZoomIn)
        self.zoom_out_action = make_action(self, "Zoom out", lambda: self.timeline.zoom_out(),
                                           shortcut=QKeySequence.StandardKey.ZoomOut)
        self.zoom_fit_action = make_action(self, "Whole day", lambda: self.timeline.zoom_to_fit(),
                                           shortcut="Ctrl+0")
        self.about_action = make_action(self, "About shipgui", self.show_about)

    def _make_panels(self) -> None:
        self.answer = AnswerBar(self.cancel_action)
        self.jobs_panel = JobsPanel(self.jobs_model, [self.add_job_action, self.delete_jobs_action])
        self.jobs_panel.table.addAction(self.delete_jobs_action)
        self.inputs_panel = InputsPanel()
        self.left_tabs = QTabWidget()
        self.left_tabs.addTab(self.jobs_panel, "Jobs")
        self.left_tabs.addTab(self.inputs_panel, "Day and files")
        self.fleet = ShortfallView(self.document, self.undo_stack, self)
        self.left_tabs.addTab(self.fleet.savings, "Save a vehicle")
        self.timeline = TimelineView(pixels_per_hour=self.settings.get("timeline/pixels_per_hour"))
        self.certificate = CertificatePanel()
        self.certificate.setVisible(False)
        self.problem_box = ProblemBox()
        self.problem_list = self.problem_box.list  # clicked problems select their job
        self.problem_heading = self.problem_box.heading
        self.caution = QLabel(CAUTION)
        self.caution.setObjectName("caution")
        self.caution.setWordWrap(True)
        self.caution.setStyleSheet("color: #56657a; padding: 3px 8px;")
        right = QSplitter(Qt.Orientation.Vertical)
        right.addWidget(self.problem_box)
        right.addWidget(self.timeline)
        right.addWidget(self.fleet.unserved)
        right.addWidget(self.certificate)
        right.setStretchFactor(1, 3)
        right.setStretchFactor(2, 1)
        right.setStretchFactor(3, 2)
        right.setChildrenCollapsible(False)
        self.right_splitter = right
        right_box = QWidget()
        right_layout = QVBoxLayout(right_box)
        right_layout.setContentsMargins(0, 0, 0, 0)
        right_layout.setSpacing(0)
        self.driver_notice = QLabel()
        self.driver_notice.setObjectName("driverNotice")
        self.driver_notice.setWordWrap(True)
        self.driver_notice.setStyleSheet("background: #fbf3df; color: #6a5420; padding: 4px 8px;")
        self.driver_notice.setToolTip("Double-click a vehicle in the timeline to name its "
                                      "driver again")
        self.driver_notice.setVisible(False)
        right_layout.addWidget(self.driver_notice)
        right_layout.addWidget(right, 1)
        right_layout.addWidget(self.caution)
        split = QSplitter(Qt.Orientation.Horizontal)
        split.addWidget(self.left_tabs)
        split.addWidget(right_box)
        split.setStretchFactor(1, 1)
        split.setSizes([430, 850])
        self.main_splitter = split
        central = QWidget()
        layout = QVBoxLayout(central)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(0)
        layout.addWidget(self.answer)
        layout.addWidget(split, 1)
        self.setCentralWidget(central)
        self.export_progress = ExportProgress(self.files.exports)
        self.statusBar().addPermanentWidget(self.export_progress)
        self.autosave_status = QLabel()
        self.autosave_status.setStyleSheet("color: #9a2f2f; font-weight: 600;")
        self.autosave_status.setVisible(False)
        self.statusBar().addPermanentWidget(self.autosave_status)

    def _make_menus(self) -> None:
        bar = self.menuBar()
        file_menu = bar.addMenu("&File")
        self.files.fill_file_menu(file_menu)
        edit = bar.addMenu("&Edit")
        for action in (self.undo_action, self.redo_action, None, self.add_job_action,
                       self.delete_jobs_action):
            edit.addSeparator() if action is None else edit.addAction(action)
        view = bar.addMenu("&View")
        for action in (self.proof_action, None, self.zoom_in_action, self.zoom_out_action,
                       self.zoom_fit_action):
            view.addSeparator() if action is None else view.addAction(action)
        plan = bar.addMenu("&Plan")
        plan.addAction(self.cancel_action)
        bar.addMenu("&Help").addAction(self.about_action)
        tools = QToolBar("Main")
        tools.setObjectName("mainToolbar")
        tools.setMovable(False)
        tools.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextBesideIcon)
        for action in (self.files.open_action, self.files.save_action, None,
                       self.undo_action, self.redo_action, None, self.proof_action,
                       self.zoom_in_action, self.zoom_out_action, self.zoom_fit_action, None,
                       *self.files.export_actions()):
            tools.addSeparator() if action is None else tools.addAction(action)
        self.addToolBar(tools)
        self.toolbar = tools

    def _connect(self) -> None:
        self.document.subscribe(self._on_document_change)
        self.undo_stack.cleanChanged.connect(lambda _clean: self.update_title())
        self.undo_stack.cleanChanged.connect(lambda c: self.autosaver.discard() if c else None)
        self.jobs_model.edit_refused.connect(self._refuse)
        self.inputs_panel.settings_refused.connect(self._refuse)
        self.inputs_panel.settings_edited.connect(
            lambda s, text: self.undo_stack.push(ChangeSettings(self.document, s, text)))
        self.autosaver.failed.connect(self._on_autosave_failed)
        self.autosaver.succeeded.connect(self._on_autosave_ok)
        self.files.opened.connect(lambda document, _path: self.load_document(document))
        self.files.saved.connect(self._on_saved)
        self.files.message.connect(self.statusBar().showMessage)
        self.files.quit_requested.connect(self.close)
        self.files.settings_origin.connect(self.inputs_panel.show_origin)
        self.inputs_panel.plan_date_edited.connect(
            lambda day, text: self.undo_stack.push(ChangePlanDate(self.document, day, text)))
        self.inputs_panel.default_requested.connect(self.files.make_default_day_settings)
        self.inputs_panel.attach_requested.connect(self.files.attach_companion)
        self.inputs_panel.remove_requested.connect(self.files.remove_companion)
        self.jobs_panel.job_selected.connect(self.timeline.select_job)
        self.timeline.job_selected.connect(self.jobs_panel.select_job)
        self.timeline.vehicle_name_requested.connect(self.ask_driver_name)
        self.timeline.zoom_changed.connect(
            lambda v: self.settings.set("timeline/pixels_per_hour", v))
        self.certificate.pair_selected.connect(self._on_pair)
        self.fleet.job_selected.connect(self.jobs_panel.select_job)
        self.fleet.moves_shown.connect(self.timeline.set_moves)
        self.problem_box.problem_clicked.connect(self._on_problem_clicked)
        self.solver.busy_changed.connect(self._on_busy)
        self.solver.stage_changed.connect(lambda text: self.answer.set_busy(True, text))
        self.solver.fleet_plan_ready.connect(lambda p, s: self._on_plan(p, s, final=False))
        self.solver.plan_ready.connect(self._on_plan)
        self.solver.search_progress.connect(
            lambda vehicles, bound, _seconds: self.answer.show_search(
                vehicles, bound, self.document.settings.max_day or 0))
        self.solver.problems_found.connect(self._on_problems)
        self.solver.solve_failed.connect(self._on_failure)
        self.solver.solve_cancelled.connect(self._on_cancelled)

    # ------------------------------------------------------------ state
    def update_title(self) -> None:
        self.setWindowTitle(f"{self.document.title}[*] — shipgui")
        self.setWindowModified(not self.undo_stack.isClean())

    def _on_saved(self, _path) -> None:
        self.autosaver.discard()  # also when the stack was clean already (recovered)
        self.update_title()

    def load_document(self, document: DayDocument) -> None:
        """Show a freshly opened day in this window (replaces the current one)."""
        self.document.replace_all(document)
        self.undo_stack.clear()
        self.undo_stack.setClean()
        self.update_title()

    def offer_recovery(self) -> bool:
        """Offer back work a crashed window autosaved; True if a day was recovered."""
        return offer_recovery(self, self.settings.data_directory(), self._take_recovery)

    def _take_recovery(self, found: Recovery) -> None:
        self.load_document(found.document)
        self.document.path = found.document.path
        self.undo_stack.resetClean()  # recovered work is not saved yet
        self.update_title()
        self.autosaver.autosave()  # this window now keeps it safe

    def _on_autosave_failed(self, reason: str) -> None:
        """Said in the status bar while it lasts, and once in a dialog."""
        self.autosave_status.setText(f"Autosave failed: {reason}")
        self.autosave_status.setVisible(True)
        if not self._autosave_warned:
            self._autosave_warned = True
            QMessageBox.warning(self, "Autosave failed",
                                f"Your unsaved changes could not be kept safe: {reason}. "
                                "Save the day (File ▸ Save as…) somewhere else to protect "
                                "it. The status bar shows this until autosave works again.")

    def _on_autosave_ok(self) -> None:
        self.autosave_status.setVisible(False)

    def request_solve(self) -> None:
        self.plan_is_current = False
        self.files.update_actions()
        if not self.document.jobs:
            self.solver.cancel(keep_search=False)
            self._show_empty("No jobs in this day yet: use Add job.")
            return
        self.solver.request(snapshot(self.document))

    def _on_document_change(self, change: Change, done: bool) -> None:
        if not done:
            return
        if change.field == "drivers":  # names do not change the plan
            if self.plan is not None:
                self._show_drivers(self.plan)
            return
        if change.kind in ("reset", "inputs", "insert", "remove") \
                or change.field == "vehicle_class":
            self.inputs_panel.show_document(self.document)
        self.fleet.document_changed()
        if change.kind == "reset":
            self.update_title()
            if self.isVisible():
                self._fit_jobs_panel()
            else:  # the splitter has its real width only once the window is shown
                self._fit_when_shown = True
        if change.field == "settings":
            self.files.remember_day_settings(edited=True)
        self.jobs_panel.show_message("")
        self.request_solve()

    def _fit_jobs_panel(self) -> None:
        """Give the jobs table room for its columns through the customer, up to half
        the window (the timeline keeps the rest)."""
        self._fit_when_shown = False
        self.jobs_panel.fit_columns()
        total = sum(self.main_splitter.sizes())
        tab_frame = 8
        left = min(self.jobs_panel.width_through(Column.CUSTOMER) + tab_frame, total // 2)
        self.main_splitter.setSizes([left, total - left])

    # ------------------------------------------------------------ solver outcomes
    def _on_busy(self, busy: bool) -> None:
        self.cancel_action.setEnabled(busy)
        if busy:
            self.answer.set_busy(True)

    def _on_plan(self, plan: Plan, seconds: float, final: bool = True) -> None:
        self.plan, self.plan_is_current, self.problems = plan, final, []
        if not final:  # fleet and proof first (the matching's routes); drivers, exports later
            self.answer.show_fleet(plan, seconds)
            for panel in (self.timeline, self.certificate, self.jobs_model):
                panel.set_plan(plan)
            return
        self.problem_box.show_shortened(plan.day)  # hidden when there are none
        self.answer.show_plan(plan, seconds)
        self._show_drivers(plan)
        self.certificate.set_plan(plan)
        self.jobs_model.set_plan(plan)
        self.fleet.show_plan(plan, self.right_splitter)
        self.inputs_panel.show_notes(plan.day.warnings)
        self.files.update_actions()
        self.statusBar().showMessage(f"Solved {count(plan.day.n, 'job')} in "
                                     f"{seconds * 1000:.0f} ms", 5000)
        self.plan_shown.emit(plan)

    def _on_problems(self, problems: list[Problem]) -> None:
        self.problems = list(problems)
        self._show_empty(f"No plan: {count(len(problems), 'problem')} in the inputs "
                         "(listed above the timeline).")
        self.problem_box.show_problems("The day cannot be planned until these are fixed "
                                       "(edit the jobs, attach a file or change a setting; "
                                       "click a job's problem to select the job):",
                                       self.problems)
        self.plan_shown.emit(None)

    def _on_failure(self, text: str, details: str) -> None:
        self._show_empty(f"The solver stopped unexpectedly: {text}")
        self.problem_box.show_problems("Something went wrong inside the solver. Please "
                                       "report it with the details below.", [Problem(text)],
                                       details)
        self.plan_shown.emit(None)

    def _on_cancelled(self) -> None:
        if self.plan is not None:
            self.answer.show_stale("Solving was cancelled: the plan shown is out of date. "
                                   "Make a change or reopen to solve again.")
        else:
            self.answer.show_nothing("Solving was cancelled.")
        self.files.update_actions()

    def _show_empty(self, why: str) -> None:
        self.plan, self.plan_is_current = None, False
        self.answer.show_nothing(why)
        self.driver_notice.setVisible(False)
        self.timeline.set_plan(None, message=why)
        self.certificate.set_plan(None)
        self.jobs_model.set_plan(None)
        self.fleet.show_plan(None, self.right_splitter)
        self.files.update_actions()

    # ------------------------------------------------------------ user actions
    def _refuse(self, text: str) -> None:
        self.jobs_panel.show_message(text)
        self.statusBar().showMessage(text, 8000)

    def add_job(self) -> None:
        doc = self.document
        current = self.jobs_panel.current_job()
        template = doc.jobs[doc.row_of(current)] if current else (
            doc.jobs[-1] if doc.jobs else None)
        origin = template.origin if template else (doc.settings.depot or "SITE")
        start = template.end if template else 8 * 3600
        job = Job(doc.new_job_id(), origin, origin, start, start + 3600,
                  vehicle_class=template.vehicle_class if template else "")
        self.undo_stack.push(AddJob(doc, len(doc.jobs), job))
        self.left_tabs.setCurrentWidget(self.jobs_panel)
        self.jobs_panel.edit_job(job.id, Column.ORIGIN)

    def delete_selected_jobs(self) -> None:
        rows = self.jobs_panel.selected_rows()
        if rows:
            self.undo_stack.push(DeleteJobs(self.document, rows))

    def _show_drivers(self, plan: Plan) -> None:
        """Drivers on their routes in the timeline, and a word when an edit split,
        merged or emptied a named route."""
        self.driver_places = self.document.place_drivers(plan.route_ids())
        self.timeline.set_plan(plan, names_by_vehicle(self.driver_places))
        notes = [p.note for p in self.driver_places if p.note]
        self.driver_notice.setText("\n".join(notes) + "  (Double-click a vehicle's name to "
                                   "name its driver again.)")
        self.driver_notice.setVisible(bool(notes))

    def ask_driver_name(self, vehicle: int) -> None:
        """Type the driver of a vehicle (printed on its route sheet); one undo step.
        The name is tied to the route's jobs, so it stays with them when a later
        solve numbers the vehicles differently."""
        if self.plan is None or not 1 <= vehicle <= self.plan.vehicles:
            return
        current = next((p.driver for p in self.driver_places if p.vehicle == vehicle), None)
        jobs = frozenset(self.plan.route_ids()[vehicle - 1])
        old = current.name if current else ""
        name, ok = QInputDialog.getText(self, "Driver", f"Driver of vehicle {vehicle}:",
                                        text=old)
        if not ok:
            return
        try:
            name = check_text(name)  # the rules of every other value of the day
        except ValueError as exc:
            self._refuse(f"The driver's name was not changed: {exc}")
            return
        if name != old or (current is not None and current.jobs != jobs):
            self.undo_stack.push(NameDriver(self.document, vehicle, jobs, current, name))

    def show_proof(self, on: bool) -> None:
        self.certificate.setVisible(on)
        self.timeline.set_certificate_highlight(on)
        if on:
            sizes = self.right_splitter.sizes()
            rest = sum(sizes[1:])
            self.right_splitter.setSizes([sizes[0], rest * 3 // 5, sizes[2],
                                          rest * 2 // 5 - sizes[2]])

    def _on_pair(self, first: str, second: str) -> None:
        self.jobs_panel.select_job(first)
        self.timeline.select_jobs([first, second])

    def _on_problem_clicked(self, problem: Problem) -> None:
        """Select the job a problem is about (by its id, else by its row in the jobs file)."""
        job_id = problem.job if problem.job and self.document.row_of(problem.job) >= 0 else None
        if job_id is None and problem.row and problem.file == self.document.sources.get("jobs"):
            job_id = next((j.id for j in self.document.jobs if j.row == problem.row), None)
        if job_id is not None:
            self.left_tabs.setCurrentWidget(self.jobs_panel)
            self.jobs_panel.select_job(job_id)
            self.timeline.select_job(job_id)

    def show_about(self) -> None:
        QMessageBox.about(self, "About shipgui",
                          "<p><b>shipgui</b> finds the fewest vehicles that can run a day of "
                          "booked jobs, the routes, and a proof that fewer will not do.</p>"
                          f"<p>{CAUTION}</p>")

    # ------------------------------------------------------------ window events
    def showEvent(self, event) -> None:
        super().showEvent(event)
        if self._fit_when_shown:
            QTimer.singleShot(0, self._fit_jobs_panel)  # after the layout has run

    def dragEnterEvent(self, event) -> None:
        if self.files.droppable(event.mimeData()):
            event.acceptProposedAction()

    def dropEvent(self, event) -> None:
        paths = self.files.droppable(event.mimeData())
        if paths:
            event.acceptProposedAction()
            self.files.open_paths(paths)

    def closeEvent(self, event: QCloseEvent) -> None:
        if not self.files.maybe_save() or not self.files.maybe_stop_export():
            event.ignore()
            return
        self.solver.cancel()
        self.fleet.cancel()
        self.autosaver.stop()
        self.settings.set("window/geometry", self.saveGeometry())
        self.settings.sync()
        event.accept()

