"""Checking a tree: intervals, measures, held-out and external patients, nested CV, stability."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "new_patients": ("CheckResult", "check_heldout", "check_table", "with_check"),
    "metrics": ("ClassificationMeasures",),
    "nested": ("DEFAULT_OUTER_FOLDS", "nested_cross_validate"),
    "stability": ("DEFAULT_RESAMPLES", "bootstrap_stability"),
})
