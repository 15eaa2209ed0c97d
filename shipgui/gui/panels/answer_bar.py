"""The always-visible answer: vehicles needed, empty driving, verified, solving state.

When the plan carries a fleet / empty-driving trade-off (``plan.tradeoff``), the
empty-driving figure says it is the least for the fleet, a short line says what
one more vehicle would save, and a popup (also the figure's tooltip) lists the
whole trade-off.
"""

from __future__ import annotations

import html

from PySide6.QtCore import QPoint, Qt
from PySide6.QtGui import QAction
from PySide6.QtWidgets import (
    QFrame,
    QHBoxLayout,
    QLabel,
    QMenu,
    QProgressBar,
    QSizePolicy,
    QToolButton,
    QVBoxLayout,
    QWidget,
    QWidgetAction,
)

from shipgui.core import Plan
from shipgui.core.clock import format_duration, shown_minutes
from shipgui.core.day import settings_text
from shipgui.core.fleet.deadhead import tradeoff_rows
from shipgui.core.fleet.schedule import class_counts
from shipgui.core.workday.explain import (
    a_working_day,
    format_limit,
    limit_cost_text,
    search_text,
)

from ..wording import count

__all__ = ["AnswerBar", "saving_text", "tradeoff_cells", "tradeoff_html", "fleet_caption",
           "search_caption", "fleet_tooltip", "deadhead_caption", "limit_cost_line"]

LINK_COLOUR = "#2f5f8f"
VERIFIED_TIP = ("An independent check confirmed that every job is covered once, each route "
                "is drivable, and no smaller fleet exists.")
VERIFIED_WORKDAY_TIP = ("An independent check confirmed that every job is covered once, each "
                        "route is drivable within the working-day limit, and the proof of the "
                        "least number of vehicles needed holds.")


def saving_text(before: int, after: int) -> str:
    """Empty driving saved going from ``before`` to ``after`` seconds, as a reader
    checks it against the two figures shown (each rounded up to the minute):
    '−39 min', '−1 h 05 min'; '−<1 min' for a saving the rounding hides; '' for none."""
    if after >= before:
        return ""
    minutes = shown_minutes(before) - shown_minutes(after)
    return f"−{format_duration(minutes * 60)}" if minutes > 0 else "−<1 min"


def tradeoff_cells(plan: Plan) -> list[tuple[int, str, str, str]]:
    """(vehicles, least empty driving with at most that many, saving against the
    plan, with exactly that many where that shows differently, else ''), minimum
    fleet first; none unless the plan's routes are the least empty driving for its
    fleet (:func:`shipgui.core.fleet.deadhead.tradeoff_rows`)."""
    rows = tradeoff_rows(plan)
    base = rows[0].at_most if rows else 0
    return [(row.vehicles, format_duration(row.at_most), saving_text(base, row.at_most),
             format_duration(row.exactly) if row.exactly_differs else "")
            for row in rows]


def tradeoff_html(plan: Plan) -> str:
    """The whole trade-off as a small rich-text table (popup and tooltip); '' for none."""
    return _table_html(plan, tradeoff_cells(plan))


def _table_html(plan: Plan, rows: list[tuple[int, str, str, str]]) -> str:
    if not rows:
        return ""
    with_exact = any(row[3] for row in rows)
    head = ["Vehicles", "Least empty driving", "Saved"]
    if with_exact:
        head.append("Exactly this many out")
    aligns = ("left", "right", "right", "right")
    pad = "padding: 1px 8px; white-space: nowrap;"
    lines = ["<tr>" + "".join(f'<th style="{pad}" align="{a}">{h}</th>'
                              for a, h in zip(aligns, head)) + "</tr>"]
    for k, (vehicles, deadhead, saved, exactly) in enumerate(rows):
        cells = [f"{vehicles} (this plan)" if k == 0 else str(vehicles), deadhead,
                 saved or "–", exactly][:len(head)]
        lines.append("<tr>" + "".join(f'<td style="{pad}" align="{a}">{c}</td>'
                                      for a, c in zip(aligns, cells)) + "</tr>")
    minimum = rows[0][0]
    notes = [f"The routes shown use {count(minimum, 'vehicle')}, the fewest possible, and have the "
             f"least empty driving any {minimum}-vehicle plan can have.",
             "Each row: the least empty driving with at most that many vehicles, and "
             "what that saves against this plan."]
    if with_exact:
        depot = plan.day.settings.depot
        where = f" from {html.escape(plan.day.site_label(depot))}" if depot else ""
        notes.append("Where putting exactly that many vehicles on the road costs more "
                     f"(each drives out{where} and back), that figure is shown too.")
    return ("<p style='white-space: nowrap;'><b>Less empty driving with more "
            "vehicles</b></p><table cellspacing='0'>" + "".join(lines) + "</table>"
            + "".join(f"<p>{note}</p>" for note in notes))


def fleet_caption(plan: Plan) -> str:
    """Beside the fleet figure: what it is and what is proven about it, on lines short
    enough for a narrow window.

    'vehicles needed'; with a working-day limit 'vehicles — proven minimum' over
    'for an 11 h working day', or 'planned, at least 32' over 'search stopped ·
    11 h day'."""
    info = plan.workday
    noun = "vehicle" if plan.vehicles == 1 else "vehicles"
    if info is None:
        return f"{noun} needed"
    if plan.proven_minimum:
        return f"{noun} — proven minimum\nfor {a_working_day(info.limit)}"
    if info.minimum_by_search:
        return f"{noun} — the minimum\nfor {a_working_day(info.limit)}"
    ended = {"stopped": "search stopped", "time limit": "time limit reached",
             "too large": "fast plan only"}.get(info.status, "search ended")
    return f"planned, at least {plan.lower_bound}\n{ended} · {format_limit(info.limit)} day"


def search_caption(vehicles: int, bound: int, limit: int) -> str:
    """Beside the fleet figure while a working-day search runs."""
    if bound >= vehicles:
        noun = "vehicle" if vehicles == 1 else "vehicles"
        return f"{noun} — proven minimum\nfinishing… · {format_limit(limit)} day"
    return f"planned, at least {bound}\nsearching… · {format_limit(limit)} day"


def limit_cost_line(plan: Plan) -> str:
    """Under the fleet caption: '28 without the limit (+11)', '(+4 to +6)' when the
    minimum is not pinned down."""
    info = plan.workday
    most = plan.vehicles - info.unlimited_vehicles
    least = most if plan.proven_minimum or info.minimum_by_search \
        else plan.lower_bound - info.unlimited_vehicles
    extra = f"+{most}" if least >= most else f"+{max(least, 0)} to +{most}"
    return f"{info.unlimited_vehicles} without the limit ({extra})"


def fleet_tooltip(plan: Plan) -> str:
    """The fleet figure's tooltip: what 'at least' means, in full sentences."""
    info = plan.workday
    if info is None:
        return ""
    limit = format_limit(info.limit)
    span = "leaving the depot to being back" if plan.day.settings.depot \
        else "the first job's start to the last job's end"
    text = f"Every vehicle's working day ({span}) is at most {limit}. "
    if plan.proven_minimum:
        text += (f"No plan within that limit has fewer than {plan.lower_bound} vehicles: "
                 "Show proof says why.")
    else:
        text += (f"{plan.vehicles} are planned; no plan within that limit can have fewer "
                 f"than {plan.lower_bound} (proven: Show proof says why), so the minimum is "
                 f"{plan.lower_bound} to {plan.vehicles}; {search_text(info)}.")
        if info.minimum_by_search:
            text += (f" The search found no plan with fewer than {plan.vehicles}, so "
                     f"{plan.vehicles} is the minimum, though the written proof reaches "
                     f"{plan.lower_bound}.")
    return text + " " + limit_cost_text(plan) + "."


def deadhead_caption(plan: Plan) -> str | None:
    """The empty-driving caption under a working-day limit (None without one)."""
    if plan.workday is None:
        return None
    return {"proven least": "empty driving, least possible with "
                            f"{count(plan.vehicles, 'vehicle')}",
            "searched": "empty driving, searched for less\n(not proven least)"}.get(
        plan.workday.deadhead_status, "empty driving\n(not optimised: no time left)")


def _short(text: str, limit: int = 24) -> str:
    return text if len(text) <= limit else text[:limit - 1] + "…"


class _Figure(QWidget):
    """A big value with a small caption beside it (and room for a line under the caption)."""

    def __init__(self, caption: str, parent=None) -> None:
        super().__init__(parent)
        self.value = QLabel("–")
        self.value.setObjectName("figureValue")
        self.caption = QLabel(caption)
        self.caption.setObjectName("figureCaption")
        self.notes = QVBoxLayout()
        self.notes.setContentsMargins(0, 0, 0, 0)
        self.notes.setSpacing(0)
        self.notes.addWidget(self.caption)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(6)
        layout.addWidget(self.value)
        layout.addLayout(self.notes)
        self.setSizePolicy(QSizePolicy.Policy.Fixed, QSizePolicy.Policy.Preferred)


class AnswerBar(QFrame):
    def __init__(self, cancel_action: QAction, parent=None) -> None:
        super().__init__(parent)
        self.setObjectName("answerBar")
        self.vehicles = _Figure("vehicles needed")
        # Vehicles per class under the caption; shown only when the day has classes.
        self.by_class = QLabel()
        self.by_class.setObjectName("vehiclesByClass")
        self.by_class.setTextFormat(Qt.TextFormat.PlainText)
        self.by_class.setVisible(False)
        self.vehicles.notes.addWidget(self.by_class)
        # What the working-day limit costs; shown only for a plan under a limit.
        self.limit_cost = QLabel()
        self.limit_cost.setObjectName("limitCost")
        self.limit_cost.setVisible(False)
        self.vehicles.notes.addWidget(self.limit_cost)
        self.deadhead = _Figure("empty driving")
        # What more vehicles would save; shown only for a plan with a trade-off.
        self.saving = QLabel()
        self.saving.setObjectName("savingLink")
        self.saving.setTextFormat(Qt.TextFormat.RichText)
        self.saving.setTextInteractionFlags(Qt.TextInteractionFlag.LinksAccessibleByMouse
                                            | Qt.TextInteractionFlag.LinksAccessibleByKeyboard)
        self.saving.setFocusPolicy(Qt.FocusPolicy.TabFocus)
        self.saving.setVisible(False)
        self.saving.linkActivated.connect(lambda _link: self.show_tradeoff())
        self.deadhead.notes.addWidget(self.saving)
        self.tradeoff_text = ""  # the whole trade-off, rich text
        self.tradeoff_wide = False  # with the exactly-k column
        self.tradeoff_popup: QMenu | None = None  # made anew each time, sized to the text
        self.verified = QLabel("✓ verified")
        self.verified.setObjectName("verifiedBadge")
        self.verified.setToolTip(VERIFIED_TIP)
        self.verified.setVisible(False)
        self.status = QLabel("")
        self.status.setObjectName("solveStatus")
        self.status.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        # Takes the room left and wraps in a narrow window rather than widening it.
        self.status.setWordWrap(True)
        self.status.setAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        self.status.setSizePolicy(QSizePolicy.Policy.Ignored, QSizePolicy.Policy.Preferred)
        self.status.setMinimumWidth(  # the longest part that does not wrap
            self.status.fontMetrics().horizontalAdvance("solved in 00000 ms") + 4)
        self.progress = QProgressBar()
        self.progress.setRange(0, 0)
        self.progress.setMaximumWidth(120)
        self.progress.setMinimumWidth(48)  # solving must not widen a narrow window
        self.progress.setTextVisible(False)
        self.progress.setVisible(False)
        self.cancel = QToolButton()
        self.cancel.setDefaultAction(cancel_action)
        self.cancel.setVisible(False)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(12, 6, 12, 6)
        layout.setSpacing(18)
        layout.addWidget(self.vehicles)
        layout.addWidget(self.deadhead)
        layout.addWidget(self.verified, 0, Qt.AlignmentFlag.AlignVCenter)
        layout.addWidget(self.status, 1)
        layout.addWidget(self.progress)
        layout.addWidget(self.cancel)
        self.setStyleSheet(
            "#answerBar { background: #f1f4f8; border-bottom: 1px solid #d6dce4; }"
            " #figureValue { font-size: 20px; font-weight: 600; color: #22303f; }"
            " #figureCaption, #vehiclesByClass, #limitCost { color: #56657a; }"
            " #verifiedBadge { color: #ffffff; background: #3f8a5f; border-radius: 4px;"
            " padding: 2px 8px; font-weight: 600; }"
            " #solveStatus { color: #56657a; }")

    def show_plan(self, plan: Plan, seconds: float) -> None:
        self.vehicles.value.setText(str(plan.vehicles))
        self._show_classes(plan)
        sf = plan.shortfall
        if sf is not None and sf.unserved:  # fewer vehicles available than needed
            self.vehicles.caption.setText(
                f"vehicles used · {len(sf.unserved)} job{'s' if len(sf.unserved) != 1 else ''}"
                f" not served ({sf.needed_for_all} needed for all)")
            self.vehicles.caption.setStyleSheet("color: #9a2f2f; font-weight: 600;")
        else:
            self.vehicles.caption.setText(fleet_caption(plan))
            self.vehicles.caption.setStyleSheet("")
        self.vehicles.setToolTip(fleet_tooltip(plan))
        self._show_limit_cost(plan)
        self.deadhead.value.setText(format_duration(plan.deadhead_seconds))
        self._show_tradeoff(plan)
        self.verified.setVisible(bool(plan.verified))
        self.verified.setToolTip(VERIFIED_TIP if plan.workday is None else VERIFIED_WORKDAY_TIP)
        self.set_busy(False)
        note = "" if plan.verified else "  The independent check FAILED."
        took = f"solved in {seconds * 1000:.0f} ms" if seconds < 10 \
            else f"solved in {seconds:.0f} s"
        if plan.deadhead_note:
            note += f"  {plan.deadhead_note}"
            self.deadhead.caption.setText("empty driving (not the least: time limit)")
            self.deadhead.setToolTip(plan.deadhead_note)
        # No-break spaces: a narrow bar wraps between the parts, not inside them.
        parts = ("Up to date", count(plan.day.n, "job"), took)
        self.status.setText(" · ".join(p.replace(" ", "\u00a0") for p in parts) + note
                            + f"\nPlanned with {settings_text(plan.day.settings)}")

    def _show_classes(self, plan: Plan | None) -> None:
        counts = class_counts(plan) if plan is not None else []
        shown = len(counts) > 1
        self.by_class.setVisible(shown)
        self.by_class.setText(" · ".join(f"{_short(name or '(no class)')} {n}"
                                         for name, n in counts) if shown else "")
        self.by_class.setToolTip("Vehicles needed per vehicle class" if shown else "")

    def _show_limit_cost(self, plan: Plan | None) -> None:
        info = plan.workday if plan is not None else None
        self.limit_cost.setVisible(info is not None)
        self.limit_cost.setText(limit_cost_line(plan) if info else "")

    def show_search(self, vehicles: int, bound: int, limit: int) -> None:
        """An improvement of the working-day search in progress: the best plan's fleet
        and the proven bound so far (the rest of the answer waits for the plan)."""
        self.vehicles.value.setText(str(vehicles))
        self.vehicles.caption.setText(search_caption(vehicles, bound, limit))
        self.vehicles.setToolTip(f"The search has found a plan with {vehicles} vehicles and "
                                 f"proven that at least {bound} are needed. Cancel keeps the "
                                 "best plan found.")
        self.limit_cost.setVisible(False)
        self._show_classes(None)
        self.deadhead.value.setText("–")
        self._show_tradeoff(None)
        self.deadhead.caption.setText("empty driving, once the search ends")

    def show_fleet(self, plan: Plan, seconds: float) -> None:
        """The fleet and its proof, while the routes with the least empty driving
        are still being found (the solve goes on: busy)."""
        self.vehicles.value.setText(str(plan.vehicles))
        self.deadhead.value.setText("…")
        self._show_tradeoff(None)
        self.set_busy(True, f"fleet and proof in {seconds * 1000:.0f} ms; finding the routes "
                      "with the least empty driving")

    def _show_tradeoff(self, plan: Plan | None) -> None:
        """The least-for-this-fleet note, the one-more-vehicle line and the list;
        the plain caption when there is no trade-off."""
        rows = tradeoff_cells(plan) if plan is not None else []
        table = _table_html(plan, rows) if rows else ""
        self.tradeoff_text = table
        self.tradeoff_wide = any(row[3] for row in rows)
        self.deadhead.setToolTip(table)
        if not table:
            caption = deadhead_caption(plan) if plan is not None else None
            self.deadhead.caption.setText(caption or "empty driving")
            self.saving.setVisible(False)
            return
        (vehicles, least), *more = plan.tradeoff
        self.deadhead.caption.setText("empty driving, least possible with "
                                     f"{count(vehicles, 'vehicle')}")
        if not more:  # every job has a vehicle of its own: nothing to trade
            self.saving.setVisible(False)
            return
        saved = saving_text(least, more[0][1])
        line = (f"1 more vehicle: {saved} empty driving" if saved
                else "more vehicles would not reduce it")
        self.saving.setText(f'<a href="tradeoff" style="color: {LINK_COLOUR}; '
                            f'text-decoration: none;">{line} ▾</a>')
        self.saving.setVisible(True)

    def show_tradeoff(self) -> None:
        """Open the trade-off list under the one-more-vehicle line."""
        if not self.saving.isVisible():
            return
        if self.tradeoff_popup is not None:
            self.tradeoff_popup.close()
            self.tradeoff_popup.deleteLater()
        label = QLabel(self.tradeoff_text)
        label.setObjectName("tradeoffTable")
        label.setTextFormat(Qt.TextFormat.RichText)
        label.setWordWrap(True)
        label.setFixedWidth(560 if self.tradeoff_wide else 440)
        label.setContentsMargins(10, 8, 10, 10)
        menu = QMenu(self)
        holder = QWidgetAction(menu)
        holder.setDefaultWidget(label)
        menu.addAction(holder)
        self.tradeoff_popup = menu
        menu.popup(self.saving.mapToGlobal(QPoint(0, self.saving.height())))

    def show_stale(self, why: str) -> None:
        """Keep the figures but say they no longer match the inputs."""
        self.verified.setVisible(False)
        self.set_busy(False)
        self.status.setText(why)

    def show_nothing(self, why: str) -> None:
        self.vehicles.value.setText("–")
        self.vehicles.caption.setText("vehicles needed")
        self.vehicles.caption.setStyleSheet("")
        self.deadhead.value.setText("–")
        self.vehicles.setToolTip("")
        self._show_classes(None)
        self._show_limit_cost(None)
        self._show_tradeoff(None)
        self.verified.setVisible(False)
        self.set_busy(False)
        self.status.setText(why)

    def set_busy(self, busy: bool, stage: str = "") -> None:
        if busy:  # first, so the bar never needs the badge and the progress at once
            self.verified.setVisible(False)
        self.progress.setVisible(busy)
        self.cancel.setVisible(busy)
        if busy:
            self.status.setText(f"Solving… {stage}" if stage else "Solving…")
