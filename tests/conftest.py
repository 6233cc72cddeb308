"""Test-wide set-up.

Qt must never try to open a display here: with no platform set, creating a
QApplication without a display aborts the whole pytest process. The platform
is set before anything can import Qt.
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
