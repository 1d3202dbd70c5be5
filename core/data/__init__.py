"""Reading the file: CSV, TSV and XLSX tables with provenance, and cells turned into values."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "table": ("EXCEL_SUFFIXES", "LoadedTable", "Provenance", "file_sha256", "list_sheets",
        "read_table"),
})
