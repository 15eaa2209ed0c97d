"""The desktop app (the only package that imports PySide6).

Start it with :func:`shipgui.gui.app.run`; import that lazily so that the
command line never loads Qt.
"""

from ._compat import check_qt_binding

check_qt_binding()
