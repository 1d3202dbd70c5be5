"""The chosen tree as plain boxes: questions in words, its file, scoring, routes, box details."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "tree": ("Node", "Question", "TreeModel"),
    "thresholds": ("format_number",),
    "details": ("box_details", "observed_ranges", "route_patient"),
    "scoring": ("scored_table",),
    "path_table": ("PathRow", "error_text", "path_rows", "root_text"),
})
