"""What is predicted from what: the outcome and predictors checked, the matrix, the guards."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "analysis": ("AnalysisData", "DesignSpec", "default_design", "prepare_analysis",
                 "rows_word_of_table", "suggest_task"),
    "matrix": ("fit_encoding",),
    "guards": ("GuardFinding", "GuardReport", "findings_from_notes", "findings_record",
               "guard_design", "identity_findings"),
})
