"""The project file: everything needed to redo a piece of work, and checks of its contents."""

from ..package_face import lazy_face

__getattr__, __dir__, __all__ = lazy_face(__name__, {
    "project": ("PROJECT_FORMAT", "PROJECT_SUFFIX", "Project", "chart_options", "chart_settings",
        "check_data_file", "load_project", "save_project"),
})
