"""Every message a user can meet, worded once in the catalogue and said by its code."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "message": ("Message", "MessageKind", "advice_for", "distinct_messages", "message_kinds",
        "kind_of", "kind_of_text", "say"),
    "app": ("app_advice", "app_wording"),
    "readme_table": ("markdown_table",),
})
