"""Help -> Keyboard shortcuts and Help -> Reading the canvas: one short page each.

The shortcut page is built from the window's own menu actions, so it can never
list a key the window does not have; the mouse gestures are the canvas's.
"""

from __future__ import annotations

import html

from PySide6.QtGui import QKeySequence
from PySide6.QtWidgets import QDialog, QDialogButtonBox, QTextBrowser, QVBoxLayout

GESTURES = (
    ("click empty canvas", "add a point of the class chosen under Fit settings"),
    ("Shift + click", "add a point of the other class"),
    ("click a point", "select it (Ctrl + click: add it to or take it from the selection)"),
    ("drag a point", "move it, or the whole selection it belongs to; the fit follows"),
    ("Ctrl + drag", "select the points in a box"),
    ("drag empty canvas", "pan the view"),
    ("wheel, or right-drag", "zoom"),
    ("double-click a table cell", "type a new coordinate or label (Enter applies, Esc "
                                  "cancels)"),
)

READING = """
<h3>Reading the canvas</h3>
<p><b>Shading</b> shows the decision value f(x): the deeper the tint, the more
firmly that side's class; white is f = 0.  The <b>solid line</b> is the boundary
f = 0; the two <b>dashed lines</b> are the margin edges f = +1 and f = &minus;1,
and the band between them is the margin.</p>
<p><b>Rings</b> mark the support vectors, the points with alpha &gt; 0: they alone
decide where the boundary lies.  A <b>short line from a point</b> is its slack
&xi;: it runs to where the point would have to be to sit on its own margin edge.
Points outside the band have no slack and no say.</p>
<p>The <b>arrow</b> (linear kernel) is w, from the boundary to the edge f = +1:
its length is <nobr>1/|w|</nobr>, half the margin width.  w is at right angles to the
boundary in the data's units.  When the two axes are not drawn to the same
scale the arrow does not look perpendicular, and the mark <i>axes not to scale</i>
stands beside it; View &rarr; Equal axis scales draws them to scale.</p>
<p>A <b>dashed grey line</b> is the pinned fit (Edit &rarr; Pin current fit,
Ctrl+P), kept as a ghost to compare against; the Compare tab lists what changed.
The status bar reads x, y and f(x) under the mouse, and says whether the fit
shown is current, solving, or stale (and why).</p>
<p>A kernel fit has no w in the plane: its margin width and distances are in the
kernel's feature space, as the Summary says.</p>
<p><i>A boundary tuned by eye on training points is not a validated model:
validate on held-out data before relying on it.</i></p>
"""


def shortcut_rows(window) -> list[tuple[str, str]]:
    """(keys, what) for every menu action of ``window`` that has a shortcut."""
    rows, seen = [], set()
    menus = [action.menu() for action in window.menuBar().actions() if action.menu()]
    while menus:
        menu = menus.pop(0)
        for action in menu.actions():
            if action.menu() is not None:
                menus.append(action.menu())
                continue
            keys = action.shortcut().toString(QKeySequence.NativeText)
            text = action.text().replace("&", "").replace("\u2026", "")
            if keys and (keys, text) not in seen:
                seen.add((keys, text))
                rows.append((keys, f"{menu.title().replace('&', '')} \u2192 {text}"))
    return rows


def shortcuts_html(window) -> str:
    def table(rows):
        return ("<table cellspacing='0' cellpadding='3'>" + "".join(
            f"<tr><td><b>{html.escape(a)}</b></td><td>{html.escape(b)}</td></tr>"
            for a, b in rows) + "</table>")
    return ("<h3>Keyboard shortcuts</h3>" + table(shortcut_rows(window))
            + "<h3>Mouse on the canvas</h3>" + table(GESTURES))


def show_page(parent, title: str, page: str, name: str) -> QDialog:
    """A small non-modal window with one page of text."""
    dialog = QDialog(parent)
    dialog.setObjectName(name)
    dialog.setWindowTitle(title)
    text = QTextBrowser()
    text.setHtml(page)
    text.setOpenExternalLinks(False)
    buttons = QDialogButtonBox(QDialogButtonBox.Close)
    buttons.rejected.connect(dialog.close)
    layout = QVBoxLayout(dialog)
    layout.addWidget(text)
    layout.addWidget(buttons)
    dialog.resize(560, 520)
    dialog.show()
    return dialog
