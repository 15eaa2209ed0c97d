"""The printed plan (PDF): a summary with a timeline, one route sheet per vehicle,
and the proof that the fleet is minimum.  Imports the core and reportlab, never Qt.

Each section is a pure function of the plan returning reportlab flowables, so a
caller can also print a single route sheet or just the proof.
"""

from .certificate import build_certificate
from .document import PrintLayoutError, build_pdf_bytes, write_plan_pdf
from .pages import CAUTION
from .route_sheet import build_route_sheet
from .summary import build_summary

__all__ = ["CAUTION", "PrintLayoutError", "build_certificate", "build_pdf_bytes",
           "build_route_sheet", "build_summary", "write_plan_pdf"]
