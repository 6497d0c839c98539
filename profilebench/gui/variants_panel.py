"""The variants dock: the project's named variants of the profile, and their ranking.

Store the profile being edited as a named variant, switch the editor to a variant, rename or
delete one, mark the baseline variant the others are ranked against: each is one undoable edit
(:mod:`profilebench.editor.variant_edits`) pushed through the window, so the variants are saved
and reopened with the project. "Rank" analyses every variant at the document's conditions with
:func:`profilebench.studies.variants.rank_variants` in a child process (the GUI thread stays
free) and shows the ranking table, the same rows as the command line's
(:func:`profilebench.plotting.variants_page.ranking_rows`), with the caution under it.
"""

from __future__ import annotations

import functools

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QAbstractItemView,
    QFileDialog,
    QGridLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QListWidget,
    QListWidgetItem,
    QPushButton,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from profilebench.editor import variant_edits
from profilebench.editor.document import CAUTION
from profilebench.errors import ProfileBenchError
from profilebench.gui.child_process import call_with_keywords, import_modules
from profilebench.gui.runners import ProcessTaskRunner, TaskRunner
from profilebench.plotting.variants_page import RANKING_COLUMNS, ranking_rows

__all__ = ["VariantsPanel", "install_variants_panel", "DOCK_TITLE"]

DOCK_TITLE = "Variants"

# named by module path, so that the child imports the studies and not this Qt module
_RANK_IN_CHILD = functools.partial(
    call_with_keywords, "profilebench.studies.variants:rank_variants"
)
_IMPORT_STUDIES = functools.partial(import_modules, "profilebench.studies.variants")


class VariantsPanel(QWidget):
    """The variants of ``window``'s document (a :class:`~profilebench.gui.main_window.MainWindow`:
    its ``document`` and ``push(edit)`` are used). ``rank_fn(variants, conditions, baseline)``
    (tests) runs the ranking on a thread instead of the child process."""

    def __init__(self, window, rank_fn=None, parent=None):
        super().__init__(parent)
        self.window = window
        self.document = None
        if rank_fn is None:
            self.runner = ProcessTaskRunner(
                _RANK_IN_CHILD, self, warm_up=_IMPORT_STUDIES, child="variants", start=False
            )
            self._in_child = True
        else:
            self.runner = TaskRunner(rank_fn, self)
            self._in_child = False
        self.runner.finished.connect(self._ranked)
        self.runner.failed.connect(self._rank_failed)
        self.ranking = None  # the last VariantTable shown
        self._shown = None  # what the list shows (see refresh)
        self._ranked_for = {}  # generation -> (variants, conditions, baseline) it ranks

        self.list = QListWidget()
        self.list.setSelectionMode(QAbstractItemView.SingleSelection)
        self.list.itemDoubleClicked.connect(lambda item: self.switch_to(self._name(item)))
        self.name = QLineEdit()
        self.name.setPlaceholderText("variant name (for Store and Rename)")
        self.note = QLineEdit()
        self.note.setPlaceholderText("note kept with a stored variant (optional)")
        self.store_button = QPushButton("Store profile as variant")
        self.store_button.setToolTip(
            "keep the profile being edited as a named variant (a name already stored is "
            "replaced only with Store over)"
        )
        self.overwrite_button = QPushButton("Store over selected")
        self.switch_button = QPushButton("Edit selected")
        self.switch_button.setToolTip("put the selected variant's profile in the editor (undoable)")
        self.rename_button = QPushButton("Rename selected")
        self.delete_button = QPushButton("Delete selected")
        self.baseline_button = QPushButton("Mark as baseline")
        self.rank_button = QPushButton("Rank variants")
        self.rank_button.setToolTip(
            "analyse every variant at the current conditions and rank them by drag force "
            "(by Cd when no frontal area or width is given)"
        )
        self.store_button.clicked.connect(lambda: self.store(self.name.text()))
        self.overwrite_button.clicked.connect(self._store_over)
        self.switch_button.clicked.connect(lambda: self.switch_to(self.selected()))
        self.rename_button.clicked.connect(lambda: self.rename(self.selected(), self.name.text()))
        self.delete_button.clicked.connect(lambda: self.delete(self.selected()))
        self.baseline_button.clicked.connect(lambda: self.mark_baseline(self.selected()))
        self.rank_button.clicked.connect(self.rank)
        self.page_button = QPushButton("Save ranking page...")
        self.page_button.setToolTip(
            "the variants review page of the ranking shown (PNG, SVG or PDF), with the caution"
        )
        self.page_button.setEnabled(False)
        self.page_button.clicked.connect(self._ask_export_page)

        self.table = QTableWidget(0, len(RANKING_COLUMNS))
        self.table.setHorizontalHeaderLabels(RANKING_COLUMNS)
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.verticalHeader().setVisible(False)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.message = QLabel("")
        self.message.setWordWrap(True)
        self.caution = QLabel(CAUTION)
        self.caution.setWordWrap(True)
        self.caution.setStyleSheet("color: #5a4500;")

        grid = QGridLayout()
        grid.addWidget(self.store_button, 0, 0)
        grid.addWidget(self.overwrite_button, 0, 1)
        grid.addWidget(self.switch_button, 1, 0)
        grid.addWidget(self.rename_button, 1, 1)
        grid.addWidget(self.baseline_button, 2, 0)
        grid.addWidget(self.delete_button, 2, 1)
        lay = QVBoxLayout(self)
        lay.addWidget(self.list, 1)
        lay.addWidget(self.name)
        lay.addWidget(self.note)
        lay.addLayout(grid)
        ranking = QHBoxLayout()
        ranking.addWidget(self.rank_button)
        ranking.addWidget(self.page_button)
        lay.addLayout(ranking)
        lay.addWidget(self.table, 2)
        lay.addWidget(self.message)
        lay.addWidget(self.caution)

    # ------------------------------------------------------------------ the document
    def set_document(self, document) -> None:
        """Show ``document``'s variants, and follow its changes (edits, undo, redo)."""
        if self.document is not None:
            self.document.unsubscribe(self._changed)
        self.document = document
        self._shown = None
        document.subscribe(self._changed)
        self.runner.cancel_pending()  # a ranking of another document's variants is not shown
        self.ranking = None
        self.page_button.setEnabled(False)
        self.table.setRowCount(0)
        self.message.setText("")
        self.refresh()

    def _changed(self, state):
        self.refresh()

    def refresh(self) -> None:
        """The list of variants as the document holds them, the selection kept (not rebuilt
        when nothing it shows changed: a drag changes the state at every move)."""
        doc = self.document
        if doc is None:
            self.list.clear()
            return
        shown = (
            doc.variants,
            doc.baseline_variant,
            tuple(v.profile == doc.profile for v in doc.variants),
        )
        if shown == self._shown:
            return
        self._shown = shown
        keep = self.selected()
        self.list.clear()
        baseline = doc.baseline_variant or (doc.variants[0].name if doc.variants else None)
        for v in doc.variants:
            text = v.name + ("  (baseline)" if v.name == baseline else "")
            if v.profile == doc.profile:
                text += "  [in the editor]"
            item = QListWidgetItem(text)
            item.setData(Qt.UserRole, v.name)
            item.setToolTip(v.note or v.name)
            self.list.addItem(item)
            if keep is not None and v.name == keep:
                item.setSelected(True)
                self.list.setCurrentItem(item)
        for b in (self.switch_button, self.rename_button, self.delete_button):
            b.setEnabled(bool(doc.variants))
        self.baseline_button.setEnabled(bool(doc.variants))
        self.overwrite_button.setEnabled(bool(doc.variants))
        self.rank_button.setEnabled(bool(doc.variants))

    @staticmethod
    def _name(item):
        return None if item is None else item.data(Qt.UserRole)

    def names(self) -> list[str]:
        """The variants' names as listed."""
        return [self._name(self.list.item(i)) for i in range(self.list.count())]

    def selected(self):
        """The selected variant's name, or None."""
        items = self.list.selectedItems()
        return self._name(items[0]) if items else None

    def select(self, name) -> None:
        for i in range(self.list.count()):
            item = self.list.item(i)
            item.setSelected(self._name(item) == name)

    # ------------------------------------------------------------------ edits
    def _apply(self, make_edit) -> bool:
        if self.document is None:
            return False
        try:
            edit = make_edit(self.document.state)
        except ProfileBenchError as exc:
            self.message.setText(str(exc))
            return False
        self.message.setText("")
        return self.window.push(edit)

    def _need(self, name) -> bool:
        if name is None:
            self.message.setText("select a variant in the list first")
            return False
        return True

    def store(self, name: str = "") -> bool:
        """Store the profile being edited as the variant ``name`` (a free "variant N" when
        empty)."""
        name = name if name.strip() else variant_edits.suggest_name(self.document.state)
        note = self.note.text()
        done = self._apply(lambda s: variant_edits.store_variant(s, name, note))
        if done:
            self.name.clear()
            self.note.clear()
            self.select(name)
        return done

    def _store_over(self):
        name, note = self.selected(), self.note.text()
        if self._need(name) and self._apply(
            lambda s: variant_edits.store_variant(s, name, note, overwrite=True)
        ):
            self.note.clear()

    def switch_to(self, name) -> bool:
        """Put the variant's profile in the editor (one undoable edit)."""
        return self._need(name) and self._apply(lambda s: variant_edits.switch_to_variant(s, name))

    def rename(self, name, new_name: str) -> bool:
        done = self._need(name) and self._apply(
            lambda s: variant_edits.rename_variant(s, name, new_name)
        )
        if done:
            self.name.clear()
            self.select(new_name)
        return done

    def delete(self, name) -> bool:
        return self._need(name) and self._apply(lambda s: variant_edits.delete_variant(s, name))

    def mark_baseline(self, name) -> bool:
        return self._need(name) and self._apply(
            lambda s: variant_edits.set_baseline_variant(s, name)
        )

    # ------------------------------------------------------------------ ranking
    def rank(self) -> bool:
        """Rank the variants at the document's conditions, off the GUI thread."""
        doc = self.document
        if doc is None or not doc.variants:
            self.message.setText("store at least two variants to rank them")
            return False
        key = (doc.variants, doc.conditions, doc.baseline_variant)
        if self._in_child:
            self.runner.start_child()
            generation = self.runner.request(
                (doc.variants, doc.conditions), {"baseline": doc.baseline_variant, "workers": 1}
            )
        else:
            generation = self.runner.request(*key)
        self._ranked_for = {generation: key}
        self.message.setText(f"ranking {len(doc.variants)} variants...")
        self.rank_button.setEnabled(False)
        return True

    def _ranked(self, generation, table, seconds):
        self.rank_button.setEnabled(True)
        key = self._ranked_for.pop(generation, None)
        doc = self.document
        self.ranking = table
        self.table.setRowCount(0)
        for r, row in enumerate(ranking_rows(table)):
            self.table.insertRow(r)
            for c, text in enumerate(row):
                self.table.setItem(r, c, QTableWidgetItem(text))
        notes = [table.key_reason] + list(table.notes)
        notes += [f"{r.name}: {w}" for r in table.rows for w in r.warnings]
        notes += [f"{r.name}: {r.status.value}: {r.message}" for r in table.failed]
        if doc is not None and key != (doc.variants, doc.conditions, doc.baseline_variant):
            notes.insert(0, "the variants or conditions changed since: rank again")
        notes.append(f"({seconds:.1f} s)")
        self.message.setText("\n".join(notes))
        self.page_button.setEnabled(True)

    def _rank_failed(self, generation, message):
        self.rank_button.setEnabled(True)
        self._ranked_for.pop(generation, None)
        self.message.setText(f"the ranking failed: {message}")

    def export_page(self, path) -> bool:
        """Write the variants review page of the ranking shown (PNG, SVG or PDF; it carries
        the caution); a failure's message is shown under the table."""
        from profilebench.io.atomic import check_writable
        from profilebench.plotting.review import save_figure
        from profilebench.plotting.variants_page import variants_figure

        if self.ranking is None:
            self.message.setText("rank the variants first: the page shows a ranking")
            return False
        try:
            check_writable(path)
            name = self.document.profile.name if self.document else ""
            fig = variants_figure(self.ranking, title=f"Variants of {name}" if name else None)
            save_figure(fig, path)
        except ProfileBenchError as exc:
            self.message.setText(f"the page was not saved: {exc}")
            return False
        self.message.setText(f"page saved: {path}")
        return True

    def _ask_export_page(self):
        path, _ = QFileDialog.getSaveFileName(
            self, "Save ranking page", "", "Images (*.png *.svg *.pdf)"
        )
        if path:
            self.export_page(path)

    def close_runner(self, msecs: int = 30000) -> bool:
        return self.runner.close(msecs)


#: the dock the variants dock shares a place with, as a tab behind it (the layout of the other
#: docks stays as it was)
TAB_BESIDE = "Drag summary"


def install_variants_panel(window, area=Qt.RightDockWidgetArea, rank_fn=None) -> VariantsPanel:
    """Make the variants dock on ``window`` (through its ``_dock``, as a tab beside the drag
    summary when the window has one) and return the panel; the window calls
    ``panel.set_document`` whenever it installs a document."""
    panel = VariantsPanel(window, rank_fn=rank_fn)
    window._dock(DOCK_TITLE, panel, area)
    beside = window._docks.get(TAB_BESIDE)
    if beside is not None:
        window.tabifyDockWidget(beside, window._docks[DOCK_TITLE])
        beside.raise_()
    return panel
