"""Prunella's desktop app (PySide6). Holds no statistics: everything is computed by core."""
