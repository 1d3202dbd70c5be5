"""Sizing the tree: growing it full size, pruning, cross-validating the path, choosing the size."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "grow": ("TreeSettings",),
    "folds": ("CVSettings",),
    "cross_validated_path": ("cross_validate_path", "one_se_limit"),
    "request": ("DerivationRequest",),
    "derivation": ("Derivation", "choose_model", "derive"),
    "goal_words": ("chosen_in_words",),
})
