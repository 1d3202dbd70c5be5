"""The widgets on their own: the table preview stays lazy on a million rows, the dictionary
table edits through core, the predictor checklist searches, the curve picks the clicked size."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtWidgets import QTableView  # noqa: E402

from core.dictionary import DataDictionary  # noqa: E402
from gui.widgets.checklist import Checklist  # noqa: E402
from gui.widgets.curve import CurveCanvas, CurveData  # noqa: E402
from gui.widgets.dictionary_model import COLUMNS, DictionaryModel  # noqa: E402
from gui.widgets.frame_model import FrameModel, cell_text  # noqa: E402
from tests.helpers import DEMO_DICTIONARY  # noqa: E402


class CountingModel(FrameModel):
    calls = 0

    def data(self, index, role=Qt.DisplayRole):
        if role == Qt.DisplayRole:
            CountingModel.calls += 1
        return super().data(index, role)


def test_preview_of_a_million_rows_asks_only_for_visible_cells(qtbot):
    n = 1_000_000
    frame = pd.DataFrame({"id": np.arange(n), "value": np.linspace(0, 1, n),
                          "word": pd.Series(["a", "b", None, "d"] * (n // 4), dtype=object)})
    model = CountingModel(frame)
    view = QTableView()
    qtbot.addWidget(view)
    view.verticalHeader().setSectionResizeMode(view.verticalHeader().ResizeMode.Fixed)
    view.setModel(model)
    view.resize(600, 400)
    view.show()
    qtbot.waitExposed(view)
    view.scrollToBottom()
    qtbot.wait(50)
    assert model.rowCount() == n
    assert CountingModel.calls < 5000  # a screenful or two, not a million
    assert model.index(n - 1, 0).data() == str(n - 1)
    assert model.index(2, 2).data() == ""  # missing shows blank
    assert model.headerData(0, Qt.Vertical) == "1"


def test_cell_text():
    assert cell_text(205.0) == "205" and cell_text(37.7) == "37.7"
    assert cell_text(float("nan")) == "" and cell_text(None) == "" and cell_text("x") == "x"
    assert cell_text(pd.Timestamp("2024-01-02")) == "2024-01-02"


def _column(field: str) -> int:
    return [f for f, _header, _tip in COLUMNS].index(field)


def test_dictionary_table_edits_through_core(qtbot):
    dictionary = DataDictionary.load(DEMO_DICTIONARY)
    model = DictionaryModel()
    model.set_dictionary(dictionary)
    edited = []
    model.edited.connect(edited.append)
    row = dictionary.names.index("triage_level")
    levels, kind, codes = _column("levels"), _column("kind"), _column("missing_codes")
    assert model.index(row, levels).data() == "1; 2; 3; 4; 5"
    assert model.setData(model.index(row, levels), "5; 4; 3; 2; 1")  # reverse the level order
    assert edited[-1].get("triage_level").levels == ("5", "4", "3", "2", "1")
    assert model.setData(model.index(row, kind), "nominal")
    assert edited[-1].get("triage_level").kind == "nominal"
    assert model.index(row, kind).data() == "unordered categories"
    assert model.setData(model.index(row, codes), "-9 | 99")
    assert edited[-1].get("triage_level").missing_codes == ("-9", "99")
    assert not model.setData(model.index(row, 0), "renamed")  # the name is not editable
    assert not model.flags(model.index(row, 0)) & Qt.ItemIsEditable
    count = len(edited)
    assert not model.setData(model.index(row, _column("label")),
                             dictionary.get("triage_level").label)
    assert len(edited) == count  # no change, no signal


def test_plausible_values_are_typed_in_the_table(qtbot):
    """A measurement's plausible values are set in step 1's table as '20 to 45'; a slip is
    refused in one sentence and changes nothing; a category has none to set."""
    dictionary = DataDictionary.load(DEMO_DICTIONARY)
    model = DictionaryModel()
    model.set_dictionary(dictionary)
    edited, refused = [], []
    model.edited.connect(edited.append)
    model.refused.connect(refused.append)
    row, column = dictionary.names.index("temperature"), _column("plausible")
    cell = model.index(row, column)
    assert model.headerData(column, Qt.Horizontal) == "Plausible values"
    assert model.flags(cell) & Qt.ItemIsEditable
    assert model.setData(cell, "30 – 43.5")
    assert edited[-1].get("temperature").plausible == (30.0, 43.5)
    assert model.index(row, column).data() == "30 to 43.5"
    for slip in ("43.5 to 30", "thirty to 43", "30"):
        assert not model.setData(cell, slip)
        assert f"{slip!r} is not" in refused[-1] and "such as '20 to 45'" in refused[-1]
    assert model.dictionary.get("temperature").plausible == (30.0, 43.5)  # unchanged
    assert model.setData(cell, "")  # none again
    assert edited[-1].get("temperature").plausible is None
    triage = model.index(dictionary.names.index("triage_level"), column)
    assert not model.flags(triage) & Qt.ItemIsEditable and triage.data() == ""


def test_checklist_search_and_ticks(qtbot):
    checklist = Checklist()
    qtbot.addWidget(checklist)
    items = [("age", "Age (age)", ""), ("spo2", "Oxygen saturation (spo2)", ""),
             ("crp", "C-reactive protein (crp)", "")]
    checklist.set_items(items, ("age",), suggested=("age", "crp"))
    changes = []
    checklist.changed.connect(changes.append)
    assert checklist.checked() == ("age",) and changes == []  # setting is not a change
    checklist.search.setText("oxy")
    assert checklist.view.model().rowCount() == 1
    qtbot.mouseClick(checklist.all_button, Qt.LeftButton)  # ticks only what is shown
    assert checklist.checked() == ("age", "spo2")
    qtbot.mouseClick(checklist.suggested_button, Qt.LeftButton)
    assert checklist.checked() == ("age", "crp") and checklist.search.text() == ""
    qtbot.mouseClick(checklist.none_button, Qt.LeftButton)
    assert checklist.checked() == () and changes[-1] == ()
    assert "0 of 3" in checklist.count_label.text()


def test_curve_click_picks_the_nearest_size(qtbot):
    canvas = CurveCanvas()
    qtbot.addWidget(canvas)
    canvas.resize(700, 450)
    canvas.show()
    qtbot.waitExposed(canvas)
    data = CurveData(leaves=np.array([12, 7, 4, 2, 1]), cv_risk=np.array([.22, .2, .19, .21, .3]),
                     cv_se=np.full(5, .01), train_risk=np.array([.1, .14, .17, .2, .3]),
                     min_leaves=4, one_se_leaves=4, risk_measure="error rate")
    canvas.show_curve(data, chosen=4, fits=(1, 2, 4, 7), fit_label="fits")
    picked = []
    canvas.size_clicked.connect(picked.append)
    for leaves in (7, 2, 12):
        qtbot.mouseClick(canvas, Qt.LeftButton, pos=canvas.position_of(leaves))
    assert picked == [7, 2, 12]
    labels = canvas.legend_texts()
    assert any("Cross-validated" in t for t in labels) and any("Training" in t for t in labels)
    assert any("fits" == t for t in labels)
