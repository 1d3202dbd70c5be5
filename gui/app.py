"""Starting the desktop app: ``prunella`` opens it, ``prunella --demo`` opens it on the
invented demo cohort, ``prunella FILE`` opens a spreadsheet or a project."""

from __future__ import annotations

import argparse
import sys

ORGANISATION = "Prunella Tree Charts"  # our own names, for the settings' location
APPLICATION = "Prunella"


# Qt's own command-line options that take a value (QGuiApplication, QApplication): kept with
# their value for Qt, so that "-platform xcb" does not read "xcb" as the file to open.
_QT_VALUE_OPTIONS = {"-platform", "-platformpluginpath", "-platformtheme", "-plugin",
                     "-qwindowgeometry", "-qwindowicon", "-qwindowtitle", "-session", "-style",
                     "-stylesheet", "-display", "-geometry"}


def parse_arguments(argv: list[str]) -> tuple[argparse.Namespace, list[str]]:
    ours, qt_args = [], []
    words = iter(argv)
    for word in words:
        if word in _QT_VALUE_OPTIONS:
            qt_args += [word, next(words, "")]
        else:
            ours.append(word)
    parser = argparse.ArgumentParser(prog="prunella", description="Open the Prunella app.")
    parser.add_argument("--demo", action="store_true",
                        help="open with the invented demo cohort loaded")
    parser.add_argument("file", nargs="?", help="a spreadsheet or a Prunella project to open")
    args, rest = parser.parse_known_args(ours)  # the rest goes to Qt (e.g. -reverse)
    return args, qt_args + rest


def make_application(qt_args: list[str] | None = None):
    """The QApplication with our names, icon and high-DPI policy (reuses one that exists)."""
    from PySide6.QtCore import QSettings, Qt
    from PySide6.QtGui import QGuiApplication, QIcon
    from PySide6.QtWidgets import QApplication

    from gui.resources import ICON

    app = QApplication.instance()
    if app is None:
        # Fractional scale factors (125 %, 150 %) are used as they are, so text stays crisp.
        QGuiApplication.setHighDpiScaleFactorRoundingPolicy(
            Qt.HighDpiScaleFactorRoundingPolicy.PassThrough)
        app = QApplication([sys.argv[0]] + list(qt_args or []))
    app.setOrganizationName(ORGANISATION)
    app.setApplicationName(APPLICATION)
    app.setApplicationDisplayName("Prunella")
    QSettings.setDefaultFormat(QSettings.IniFormat)
    # Group titles read as section headings; what is inside keeps the normal weight.
    app.setStyleSheet("QGroupBox { font-weight: bold; } "
                      "QGroupBox QWidget { font-weight: normal; }")
    if ICON.is_file():
        app.setWindowIcon(QIcon(str(ICON)))

    return app


def run_app(argv: list[str]) -> int:
    """Open the main window; returns the exit status when it closes."""
    args, qt_args = parse_arguments(list(argv))
    from PySide6.QtCore import QTimer
    from PySide6.QtWidgets import QApplication

    if QApplication.instance() is None and "-platform" not in qt_args:
        from gui.window_system import why_no_window

        problem = why_no_window()
        if problem is not None:  # Qt would abort with a page of plugin names
            print(problem, file=sys.stderr)
            return 2

    from gui.window_system import sentence_if_qt_aborts

    with sentence_if_qt_aborts():  # Qt would abort with a page of plugin names
        app = make_application(qt_args)
    from gui.main_window import MainWindow

    window = MainWindow()
    window.show()
    if args.demo:
        window.open_demo()
    elif args.file:
        window.open_any(args.file)
    QTimer.singleShot(0, window.first_start)
    return app.exec()
