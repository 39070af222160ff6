"""Reports a person reads: one self-contained HTML page per forecast.

The names below load on first use (PEP 562): the command line's printed lines use
:mod:`bayesgrowth.report.words` alone, without the page's builder.
"""

import importlib

__all__ = ["SECTIONS", "ReportParts", "build_report", "render_report", "report_parts",
           "write_report"]

_HOMES = {
    "build_report": "bayesgrowth.report.build",
    "report_parts": "bayesgrowth.report.build",
    "write_report": "bayesgrowth.report.build",
    "SECTIONS": "bayesgrowth.report.html",
    "ReportParts": "bayesgrowth.report.html",
    "render_report": "bayesgrowth.report.html",
}


def __getattr__(name: str):
    home = _HOMES.get(name)
    if home is None:
        raise AttributeError(f"module 'bayesgrowth.report' has no attribute {name!r}")
    value = getattr(importlib.import_module(home), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)
