"""Every message a user can meet, worded once in the catalogue and said by its code."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "message": ("app_advice", "app_wording", "catalogue", "distinct_messages", "explain",
        "markdown_table", "say"),
})
