"""What is predicted from what: the outcome and predictors checked, the matrix, the guards."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "analysis": ("AnalysisData", "DesignSpec", "default_design", "prepare_analysis",
                 "suggest_task"),
    "matrix": ("fit_encoding",),
    "guards": ("GuardFinding", "GuardReport", "guard_design", "identity_findings"),
})
