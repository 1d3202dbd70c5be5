"""The methods and validation report (PDF): its contents, sections, figures and layout."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "contents": ("ReportContents", "prepare_report"),
    "rendering": ("render_report", "write_report"),
    "section_numbers": ("SECTIONS",),
    "figures": ("DECISION_CURVE_READING", "calibration_figure", "decision_curve_figure",
                "roc_figure", "stability_figure"),
})
