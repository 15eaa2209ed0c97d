"""The fleet you have, in the window: the jobs the vehicles available cannot serve
(a panel under the timeline) and the search for slot moves that save a vehicle
(a tab), wired to the plan shown and to the document's undo stack."""

from __future__ import annotations

from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import QSplitter

from shipgui.core import Plan
from shipgui.core.document import DayDocument

from .models.commands import MoveSlots
from .panels.savings_panel import SavingsPanel
from .panels.unserved_panel import UnservedPanel
from .services.suggest_worker import SuggestController

__all__ = ["ShortfallView"]

_ROOM = 200  # pixels the jobs-not-served panel takes from the timeline when it appears


class ShortfallView(QObject):
    """Owns the two panels and the search.  Emits ``moves_shown`` with (job id,
    seconds) to draw on the timeline (empty: none) and ``job_selected`` when a job
    not served is picked."""

    moves_shown = Signal(list)
    job_selected = Signal(str)

    def __init__(self, document: DayDocument, undo_stack: QUndoStack, parent=None) -> None:
        super().__init__(parent)
        self._document, self._undo_stack = document, undo_stack
        self._plan: Plan | None = None
        self.unserved = UnservedPanel()
        self.unserved.setVisible(False)
        self.savings = SavingsPanel()
        self.suggester = SuggestController(self)
        self.unserved.job_selected.connect(self.job_selected)
        self.savings.search_requested.connect(self.look_for_moves)
        self.savings.suggestion_chosen.connect(self._show_moves)
        self.savings.apply_requested.connect(self.apply_moves)
        self.suggester.busy_changed.connect(self.savings.set_busy)
        self.suggester.found.connect(self.savings.show_search)
        self.suggester.failed.connect(self.savings.show_failure)

    def show_plan(self, plan: Plan | None, splitter: QSplitter) -> None:
        """A new plan (None: no current plan): the panel under the timeline shows,
        only when some jobs are not served, with room taken from the timeline."""
        self._plan = plan
        some = self.unserved.set_plan(plan)
        if some and self.unserved.isHidden():
            sizes = splitter.sizes()
            at = splitter.indexOf(self.unserved)
            room = min(_ROOM, sum(sizes) // 3)
            sizes[at - 1], sizes[at] = max(sizes[at - 1] - room, 100), room
            self.unserved.setVisible(True)
            splitter.setSizes(sizes)
        self.unserved.setVisible(some)

    def document_changed(self) -> None:
        """The day changed: a search running or shown no longer applies."""
        self._plan = None  # until the changed day is solved
        self.suggester.cancel()
        self.savings.mark_stale()

    def cancel(self) -> None:
        self.suggester.cancel()

    def look_for_moves(self, count: int, max_move: int) -> None:
        """Search, off the GUI thread, for slot moves that save a vehicle."""
        if self._plan is None:
            self.savings.status.setText("Solve the day first (fix the problems shown).")
            return
        self.suggester.request(self._plan.day, count, max_move)

    def _show_moves(self, moves: list[tuple[str, int]]) -> None:
        if self._plan is not None:
            self.moves_shown.emit(moves)

    def apply_moves(self, moves: list[tuple[str, int]]) -> None:
        """A suggestion's moves (job id, seconds) as one undoable edit; the panel says
        the customer must agree first."""
        if moves and all(self._document.row_of(job_id) >= 0 for job_id, _ in moves):
            self._undo_stack.push(MoveSlots(self._document, moves))
