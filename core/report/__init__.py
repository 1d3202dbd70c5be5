"""The methods and validation report (PDF): its contents, sections, figures and layout."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "rendering": ("ReportContents", "SECTIONS", "prepare_report", "render_report", "write_report"),
    "figures": ("calibration_figure", "roc_figure", "stability_figure"),
})
