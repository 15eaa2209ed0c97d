"""Putting the sections together and writing the PDF safely."""

from __future__ import annotations

import io
import os
from collections.abc import Callable, Mapping

from reportlab.platypus import Flowable, NextPageTemplate, PageBreak
from reportlab.platypus.doctemplate import LayoutError

from shipgui.core import PlanNotVerified
from shipgui.core.fleet.suggest import SuggestionSearch
from shipgui.core.io.files import write_bytes_atomic
from shipgui.core.model import Plan

from .certificate import build_certificate
from .pages import PlanDocTemplate
from .route_sheet import build_route_sheet
from .shortfall import build_suggestions, build_unserved
from .styles import register_fonts
from .summary import build_summary, plan_title
from .text import plan_date_text
from .workday_proof import build_workday_proof

__all__ = ["build_pdf_bytes", "write_plan_pdf", "PrintLayoutError"]


class PrintLayoutError(Exception):
    """Something on the plan could not be laid out on a page; the message is for the
    dispatcher (reportlab's own text names its internal objects)."""


def _require_verified(plan: Plan) -> None:
    if not plan.verified:
        reasons = "; ".join(plan.verification_failures[:3])
        raise PlanNotVerified("The plan did not pass its independent check, so it is not "
                              "printed." + (f" ({reasons})" if reasons else ""))


def _checked_names(driver_names: Mapping[int, str] | None) -> dict[int, str]:
    """Driver names by vehicle number; numbers not in the plan are simply not printed."""
    names = dict(driver_names or {})
    for number, name in names.items():
        if not isinstance(number, int) or not isinstance(name, str):
            raise TypeError(f"driver_names maps vehicle numbers to names; got {number!r}: "
                            f"{name!r}")
    return names


def _new_section(template: str) -> list[Flowable]:
    return [NextPageTemplate(template), PageBreak()]


# Progress is told in thousandths: building the sections takes about a quarter
# of the time, laying out the pages the rest (measured at 3 000 jobs).
_PROGRESS_STEPS = 1000
_STORY_SHARE = 250

Progress = Callable[[int, int], None]  # (done, total); raising from it stops the build


def _story(plan: Plan, driver_names: Mapping[int, str], progress: Progress | None = None,
           suggestions: SuggestionSearch | None = None) -> list[Flowable]:
    story = [NextPageTemplate("summary"), *build_summary(plan)]
    unserved = build_unserved(plan)
    if unserved:
        story += _new_section("certificate") + unserved
    for number in range(1, plan.vehicles + 1):
        story += _new_section("route")
        story += build_route_sheet(plan, number, driver_name=driver_names.get(number))
        if progress is not None:
            progress(_STORY_SHARE * number // max(plan.vehicles, 1), _PROGRESS_STEPS)
    story += _new_section("certificate")
    story += build_certificate(plan) if plan.workday is None else build_workday_proof(plan)
    saving = build_suggestions(plan, suggestions)
    if saving:
        story += _new_section("certificate") + saving
    return story


def _layout_progress(progress: Progress):
    """reportlab's progress callback (kind, value) as thousandths of the whole build."""
    total = [1]

    def told(kind: str, value: int) -> None:
        if kind == "SIZE_EST":
            total[0] = max(value, 1)
        elif kind == "PROGRESS":
            share = (_PROGRESS_STEPS - _STORY_SHARE) * value // total[0]
            progress(_STORY_SHARE + share, _PROGRESS_STEPS)
    return told


def build_pdf_bytes(plan: Plan, *, driver_names: Mapping[int, str] | None = None,
                    progress: Progress | None = None,
                    suggestions: SuggestionSearch | None = None) -> bytes:
    """The whole printed plan as PDF bytes: summary, one route sheet per vehicle, proof.

    With fewer vehicles than needed, a page of the jobs not served (with the proof
    that no more fit) follows the summary; ``suggestions`` (a search for slot
    moves that save a vehicle) adds a last page.

    The same plan and names always give the same bytes (reportlab's invariant mode).
    Raises :class:`~shipgui.core.PlanNotVerified` if the plan failed its check,
    :class:`PrintLayoutError` if something cannot be laid out, and ``TypeError``
    if ``driver_names`` does not map vehicle numbers to text.
    Pages: the summary (more when the timeline needs them), then each vehicle's
    route sheet (more for long routes), then the proof.  ``progress(done, total)``
    is called often while building (a desktop app shows it); an exception raised
    from it stops the build and comes out of this function.
    """
    _require_verified(plan)
    names = _checked_names(driver_names)
    register_fonts()
    buffer = io.BytesIO()
    document = PlanDocTemplate(buffer, plan_date=plan_date_text(plan.day),
                               fingerprint=plan.day.fingerprint, title=plan_title(plan))
    if progress is not None:
        document.setProgressCallBack(_layout_progress(progress))
    try:
        document.build_story(_story(plan, names, progress, suggestions))
    except LayoutError:
        # Every user value is cut to fit its place (report.text.LIMITS), so this
        # is a guard: say what to do, not which flowable overflowed.
        raise PrintLayoutError("The PDF could not be laid out: a value of the plan is too "
                               "long to fit on a page. Shorten long notes, names or ids and "
                               "export again.") from None
    return buffer.getvalue()


def write_plan_pdf(plan: Plan, path: str | os.PathLike, *,
                   driver_names: Mapping[int, str] | None = None,
                   progress: Progress | None = None,
                   suggestions: SuggestionSearch | None = None) -> None:
    """Write the printed plan to ``path``.

    Parameters
    ----------
    plan : a verified plan from :func:`shipgui.core.solve_day`.
    path : the PDF file to create or replace.
    driver_names : vehicle number (1-based, as printed) -> driver name; vehicles
        without a name get a blank line to write on.
    progress : called as ``progress(done, total)`` while the PDF is built; raise
        from it to stop (nothing is written then).

    Raises
    ------
    PlanNotVerified
        If the plan failed its independent check; nothing is written.
    OSError
        If the file cannot be written; an existing file stays as it was.

    Notes
    -----
    The PDF is built in memory and written with the one crash-safe writer
    (:func:`shipgui.core.io.files.write_bytes_atomic`): a failure never leaves a
    half-written file, and a replaced file keeps its permissions.  Time and size
    are linear in the number of jobs (a 2 000-job day: about 8 s and 1 MB).
    """
    write_bytes_atomic(path, build_pdf_bytes(plan, driver_names=driver_names,
                                             progress=progress, suggestions=suggestions))
