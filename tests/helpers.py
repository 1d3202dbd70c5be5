"""Small builders shared by the tests: tables in memory turned into AnalysisData."""

from __future__ import annotations

import numpy as np
import pandas as pd

from core.design import DesignSpec, prepare_analysis
from core.variables import infer_dictionary


def analysis_from_arrays(X: np.ndarray, y: np.ndarray, task: str, names=None, **design):
    """AnalysisData for a numeric matrix and an outcome (classes as strings c0, c1, ...)."""
    names = names or [f"x{j}" for j in range(X.shape[1])]
    frame = pd.DataFrame(X, columns=names)
    frame["outcome"] = y if task == "regression" else [f"c{int(v)}" for v in y]
    dictionary, _ = infer_dictionary(frame)
    for name in names:
        dictionary = dictionary.with_column(name, kind="numeric", role="predictor", levels=())
    if task == "classification":
        levels = tuple(sorted(frame["outcome"].unique()))
        dictionary = dictionary.with_column("outcome", role="outcome", kind="nominal" if len(levels) > 2 else "binary",
                                            levels=levels)
    spec = DesignSpec(outcome="outcome", predictors=tuple(names), task=task, **design)
    return prepare_analysis(frame, dictionary, spec), frame, dictionary
