"""Take the window's screenshots (offscreen): `python resources/screenshots/make_screenshots.py [OUT_DIR]`.

Builds a temporary library from the example CSV, opens the real window on it,
loads the example requirements and grabs each view. Nothing is written to the
user's library or settings.
"""

from __future__ import annotations

import os
import sys
import tempfile
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

ROOT = Path(__file__).resolve().parents[2]


def dark_palette():
    """A dark system palette, to see that the window reads in both."""
    from PySide6.QtGui import QColor, QPalette

    palette = QPalette()
    for role, colour in ((QPalette.ColorRole.Window, (45, 45, 48)), (QPalette.ColorRole.WindowText, (230, 230, 230)),
                         (QPalette.ColorRole.Base, (30, 30, 32)), (QPalette.ColorRole.AlternateBase, (50, 50, 54)),
                         (QPalette.ColorRole.Text, (230, 230, 230)), (QPalette.ColorRole.Button, (55, 55, 58)),
                         (QPalette.ColorRole.ButtonText, (230, 230, 230)), (QPalette.ColorRole.Highlight, (40, 110, 200)),
                         (QPalette.ColorRole.HighlightedText, (255, 255, 255)),
                         (QPalette.ColorRole.PlaceholderText, (150, 150, 150))):
        palette.setColor(role, QColor(*colour))
    return palette


def main(out: Path, *, dark: bool = False, size: tuple[int, int] = (1366, 768), suffix: str = "") -> None:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication([])
    if dark:
        app.setStyle("Fusion")
        app.setPalette(dark_palette())
    from partpick.cli.app import dispose_window
    from partpick.gui.commands import Workbench, load_requirement_file
    from partpick.gui.compare_view import CompareDialog
    from partpick.gui.main_window import MainWindow
    from partpick.gui.part_editor import PartEditor
    from partpick.library.store import open_library

    out.mkdir(parents=True, exist_ok=True)
    work = Path(tempfile.mkdtemp(prefix="partpick-shots-"))
    library = open_library(work / "library.sqlite", create=True)
    library.import_csv(ROOT / "resources" / "example_library" / "parts.csv")
    bench = Workbench(library)
    window = MainWindow(bench, settings=QSettings(str(work / "settings.ini"), QSettings.Format.IniFormat))
    window.resize(*size)
    window.show()

    def settle():
        for _ in range(10):
            app.processEvents()

    def shot(widget, name):
        widget.grab().save(str(out / f"{name}{suffix}.png"))

    load_requirement_file(bench, ROOT / "resources" / "requirements" / "reverse_polarity_24V.toml")
    window.rechecker.run_now()
    window.shortlist.select_rows([0, 1])
    settle()
    shot(window, "series_shortlist_curves")

    window.curves.tabs.setCurrentWidget(window.curves.pages["junction_temperature"])
    settle()
    shot(window, "series_junction_temperature")
    window.curves.tabs.setCurrentWidget(window.curves.pages["iv"])

    bench.requirement.edit_text("packages", "XYZ-99")  # an empty result says why
    window.rechecker.run_now()
    settle()
    shot(window, "empty_shortlist")
    bench.requirement.edit_text("packages", "")

    load_requirement_file(bench, ROOT / "resources" / "requirements" / "zener_5V1_reference.toml")
    window.rechecker.run_now()
    window.shortlist.select_rows([0])
    window.curves.tabs.setCurrentWidget(window.curves.pages["zener_output"])
    settle()
    shot(window, "zener_output_vs_supply")
    window.curves.tabs.setCurrentWidget(window.curves.pages["iv"])
    settle()
    shot(window, "zener_iv")

    from partpick.gui.compare_view import SubstitutesDialog
    from partpick.gui.dialogs import CheckSheetDialog

    substitutes = SubstitutesDialog(bench, bench.result.candidates[0]["part_number"], window)
    substitutes.show()
    settle()
    shot(substitutes, "substitutes")
    substitutes.close()
    sheet = CheckSheetDialog(bench.result.result, bench.result.candidates[0]["part_number"],
                             bench.library.get_part(bench.result.candidates[0]["part_number"]), window)
    sheet.show()
    settle()
    shot(sheet, "check_sheet")
    sheet.close()

    load_requirement_file(bench, ROOT / "resources" / "requirements" / "ac_mains_front_end.toml")
    window.rechecker.run_now()
    window.shortlist.select_rows([0])
    window.curves.tabs.setCurrentWidget(window.curves.pages["ac_cycle"])
    settle()
    window.grab().save(str(out / "ac_rectifier_cycle.png"))
    load_requirement_file(bench, ROOT / "resources" / "requirements" / "zener_5V1_reference.toml")
    window.rechecker.run_now()

    window.shortlist.select_rows([0, 1, 2])
    compare = CompareDialog(bench, bench.result.selected, window)
    compare.resize(min(compare.width(), size[0] - 24), min(680, size[1] - 56))
    compare.show()
    settle()
    shot(compare, "compare")
    compare.close()

    part = next(p for p in bench.library.parts if p.get("vf_points"))
    editor = PartEditor(part, title=f"Edit {part['part_number']}", existing=bench.library.part_numbers(),
                        parent=window)
    editor.resize(min(1180, size[0] - 24), min(760, size[1] - 56))  # as on a screen of `size`
    editor.show()
    settle()
    shot(editor, "part_editor")
    editor.close()

    dispose_window(window)
    bench.close()
    print(f"screenshots in {out}")


if __name__ == "__main__":
    import argparse

    parser = argparse.ArgumentParser(description="Take the window's screenshots offscreen.")
    parser.add_argument("out", nargs="?", default=str(Path(__file__).resolve().parent))
    parser.add_argument("--dark", action="store_true", help="a dark system palette")
    parser.add_argument("--size", default="1366x768", help="window size WxH (default 1366x768)")
    parser.add_argument("--suffix", default="", help="added to every file name (e.g. _dark)")
    args = parser.parse_args()
    width, height = (int(v) for v in args.size.lower().split("x"))
    main(Path(args.out), dark=args.dark, size=(width, height), suffix=args.suffix)
