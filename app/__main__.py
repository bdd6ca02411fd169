"""Start the desktop program: ``python -m app [MODEL.json]``.

With no argument it opens the coaxial feeder sample, already solved. If the last session
ended with unsaved work, it offers to recover it first; with a file named, only unsaved work on
that file is offered (work on other files waits for a start without a file).
"""

from __future__ import annotations

import argparse
import logging
import sys
from pathlib import Path


def build_window(path: Path | None, settings=None, *, ask_recovery: bool = True):
    """Create and show the main window, then offer recovery, open ``path`` (or the default
    sample) and solve; a dialog on the way (recovery, a file that cannot be opened) has the
    shown window as its parent."""
    from PySide6.QtWidgets import QMessageBox

    from app.files import project_files as files
    from app.main_window import MainWindow
    from app.messages import ask

    window = MainWindow(settings)
    window.show()  # the window first: a question or a file error below is a dialog over it
    # a file named on the command line is what opens: only unsaved work on that file is offered
    recovered = files.read_recovery(path) if ask_recovery else None
    if recovered is not None:
        model, original = recovered
        question = ("Edgewise closed last time with unsaved changes"
                    + (f" to {original}" if original else "") + ". Recover them?")
        if path is not None:
            question = (f"Edgewise closed last time with unsaved changes to {path}. Open those changes "
                        "instead of the saved file?")
        answer = ask(window, "Recover unsaved work?", question, QMessageBox.Yes | QMessageBox.No, QMessageBox.Yes)
        if answer == QMessageBox.Yes and window.load_or_keep(model, original, modified=True):
            window.solve()
            return window
        files.discard_recovery()
    target = path or files.SAMPLES_DIR / files.DEFAULT_SAMPLE
    if target.is_file() or path is not None:
        window.commands.open(target)
    return window


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="edgewise", description="Edgewise: 2-D electrostatics of conductor cross-sections.")
    parser.add_argument("model", nargs="?", type=Path, help="project file to open (default: the coaxial feeder sample)")
    args = parser.parse_args(argv)
    logging.basicConfig(level=logging.WARNING)

    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from app.gui_thread_gc import collect_on_gui_thread

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("Edgewise")
    app.setOrganizationName("Edgewise")
    collect_on_gui_thread(app)  # Qt objects must die on the GUI thread, never in a solver thread
    window = build_window(args.model, QSettings("Edgewise", "Edgewise"))
    window.show()
    return app.exec()


if __name__ == "__main__":
    sys.exit(main())
