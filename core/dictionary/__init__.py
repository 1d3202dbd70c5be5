"""The data dictionary: what each column is, inferred from the cells or saved beside the data."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "columns": ("CATEGORY_KINDS", "KINDS", "PREDICTOR_KINDS", "ROLES", "ColumnSpec",
        "DataDictionary", "plausible_from_words", "plausible_in_words"),
    "identity": ("may_group_patients",),
    "inference": ("infer_dictionary",),
    "for_table": ("confirm_missing_codes", "dictionary_beside", "dictionary_for",
        "merge_dictionary", "open_proposals"),
    "typed_columns": ("positive_level", "typed_column"),
})
