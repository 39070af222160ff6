"""Reports a person reads: one self-contained HTML page per forecast."""

from bayesgrowth.report.build import build_report, report_parts, write_report
from bayesgrowth.report.html import SECTIONS, ReportParts, render_report

__all__ = ["SECTIONS", "ReportParts", "build_report", "render_report", "report_parts",
           "write_report"]
