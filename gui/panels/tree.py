"""Step 4, the tree: the chosen tree as a diagram (zoom, pan, fit), the details of a clicked
box, and a lookup that lights up one patient's way to an outcome box."""

from __future__ import annotations

from html import escape

from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtWidgets import (
    QComboBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel, QLineEdit, QPushButton, QSizePolicy,
    QSplitter, QTextBrowser, QVBoxLayout, QWidget,
)

from core.messages import say
from core.phrases import plural, rows_count
from core.model import box_details, observed_ranges, route_patient
from gui.panels.step_panel import StepPanel, scrolling, side_by_side, tool_buttons, with_tooltip
from gui.panels.wording import warning_html
from gui.widgets.tree_view import TreeView

NOT_RECORDED = "(not recorded)"


def details_html(model, box: int) -> str:
    """The details of a box as a short HTML page (numbers from core.model.details)."""
    d = box_details(model, box)
    kind = "Outcome box" if d.leaf else "Question"
    word = model.rows_word  # visits where patients came more than once, else patients
    rows = [f"<h3>Box {d.box}: {kind}</h3>", f"<p><b>{escape(d.text)}</b></p>",
            f"<p>{rows_count(d.n, word)} reach this box ({d.share_of_all:.0%} of the "
            f"{model.n_rows:,} it was grown on).</p>"]
    if d.classes:
        rows.append("<table cellspacing='0' cellpadding='3' border='1' style='border-collapse:"
                    f"collapse'><tr><th align='left'>Outcome</th><th align='right'>{word.capitalize()}</th>"
                    "<th align='right'>Share</th><th align='left'>95% interval</th></tr>")
        for c in d.classes:
            rows.append(f"<tr><td>{escape(c.label)}</td><td align='right'>{c.count:,}</td>"
                        f"<td align='right'>{c.share:.0%}</td>"
                        f"<td>{c.low:.0%} to {c.high:.0%}</td></tr>")
        rows.append("</table><p style='color:#444'>The interval is the Wilson 95% interval: "
                    f"where the true rate plausibly lies, given this many {word}.</p>")
    elif d.mean is not None:
        rows.append(f"<p>Mean {escape(d.number(d.mean, True))} (SD {escape(d.number(d.sd))}); "
                    f"95% interval of the mean {escape(d.number(d.mean_low))} to "
                    f"{escape(d.number(d.mean_high, True))}.</p>")
        if d.quartiles is not None:
            rows.append(f"<p>The middle half of these {word} (25th to 75th percentile): "
                        f"{escape(d.number(d.quartiles[0]))} to "
                        f"{escape(d.number(d.quartiles[1], True))}. The interval of "
                        "the mean is not the range for one patient.</p>")
    question = model.node(box).question
    if question is not None and question.kind != "missing":
        if not question.routes_missing:
            rows.append("<p>None of the patients reaching this box lacked this value, so the "
                        "tree has no branch for a patient without it: measure it first.</p>")
        else:
            rows.append(f"<p>{question.missing_in_derivation:,} of them had it not recorded; "
                        f"such patients follow {question.missing_goes.upper()}.</p>")
    if d.steps:
        rows.append("<p><b>How patients get here</b></p><ol>")
        rows.extend(f"<li>{escape(s.text())}</li>" for s in d.steps)
        rows.append("</ol>")
    else:
        rows.append("<p>Every patient starts here.</p>")
    return "\n".join(rows)


class TreePanel(StepPanel):
    step = "tree"
    intro = ("The chosen tree. Click a box to see its patients and how they get there; enter "
             "one patient's values on the right to see which outcome box they reach.")

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self._fields: dict[str, QWidget] = {}

        self.view = TreeView()
        self.view.setAccessibleName("The tree")
        self.view.box_clicked.connect(self.show_box)
        tools = QHBoxLayout()
        tool_buttons(tools, (("Zoom in", "Make the diagram larger (Ctrl +).", self.view.zoom_in),
                             ("Zoom out", "Make the diagram smaller (Ctrl −).", self.view.zoom_out),
                             ("Fit to window", "Show the whole tree (Ctrl 0).", self.view.fit)))
        self.size_label = QLabel()
        tools.addStretch(1)
        tools.addWidget(self.size_label)
        left = QWidget()
        left_layout = QVBoxLayout(left)
        left_layout.setContentsMargins(0, 0, 0, 0)
        left_layout.addLayout(tools)
        left_layout.addWidget(self.view, 1)

        self.details = QTextBrowser()
        self.details.setOpenLinks(False)
        self.details.setAccessibleName("Details of the chosen box")
        details_box = QGroupBox("The box you clicked")
        box_layout = QVBoxLayout(details_box)
        box_layout.addWidget(self.details)

        self.lookup_form = QFormLayout()
        self.lookup_form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
        self.lookup_form.setRowWrapPolicy(QFormLayout.WrapLongRows)
        self.clear_button = with_tooltip(QPushButton("Clear"), "Forget the values entered for this "
                                    "patient.")
        self.clear_button.clicked.connect(self.clear_lookup)
        self.result = QLabel("Enter values to see where this patient goes.")
        self.result.setWordWrap(True)
        self.result.setTextFormat(Qt.RichText)
        lookup_inner = QWidget()
        lookup_layout = QVBoxLayout(lookup_inner)
        lookup_layout.setContentsMargins(0, 0, 0, 0)
        lookup_layout.addLayout(self.lookup_form)
        lookup_layout.addWidget(self.result)
        lookup_layout.addWidget(self.clear_button, 0, Qt.AlignLeft)
        lookup_layout.addStretch(1)
        scroll = scrolling(lookup_inner)
        self.result.setSizePolicy(QSizePolicy.Ignored, QSizePolicy.Preferred)
        lookup_box = QGroupBox("Look up one patient")
        lookup_box.setToolTip("Only the questions this tree asks are needed; leave a value "
                              "blank if it was not recorded.")
        lookup_box_layout = QVBoxLayout(lookup_box)
        lookup_box_layout.addWidget(scroll)

        side = QSplitter(Qt.Vertical)
        side.addWidget(details_box)
        side.addWidget(lookup_box)
        side.setChildrenCollapsible(False)
        side.setStretchFactor(0, 1)
        side.setStretchFactor(1, 1)
        side.setMinimumWidth(340)
        splitter = side_by_side(left, side, stretch=(3, 1), sizes=(900, 420))
        self.add_tree_content(splitter)

        session.opened.connect(lambda: self._build_lookup(None))  # no values of another file
        session.result_changed.connect(self.refresh)
        session.chosen_changed.connect(self.refresh)
        self.refresh()

    def refresh(self) -> None:
        model = self.session.model
        if not self.show_tree_content():
            self.view.show_model(None)
            self._build_lookup(None)
            self.details.setHtml("")
            return
        self.view.show_model(model)
        leaves = len(model.leaves)
        questions = len(model.nodes) - leaves
        self.size_label.setText(f"{plural(questions, 'question', 'questions')}, "
                                f"{plural(leaves, 'outcome box', 'outcome boxes')}")
        self._build_lookup(model)
        self.show_box(1)
        self.view.select_box(None)

    def show_box(self, box: int) -> None:
        model = self.session.model
        if model is not None and 1 <= box <= len(model.nodes):
            self.details.setHtml(details_html(model, box))

    # --- the lookup -------------------------------------------------------------------------

    def _build_lookup(self, model) -> None:
        previous = self.values()
        while self.lookup_form.rowCount():
            self.lookup_form.removeRow(0)
        self._fields.clear()
        if model is None:
            return
        for column in model.columns_asked():
            spec = model.spec(column)
            label = spec.display + (f" ({spec.unit})" if spec.unit else "") + ":"
            if spec.kind == "numeric":
                field = QLineEdit()
                field.setPlaceholderText("not recorded")
                field.setToolTip(f"{spec.display}, as a number" +
                                 (f" in {spec.unit}" if spec.unit else "") + "; leave blank if "
                                 "not recorded.")
                field.setText(previous.get(column) or "")
                field.textChanged.connect(self.look_up)
            else:
                field = QComboBox()
                field.addItem(NOT_RECORDED, None)
                for level in spec.levels:
                    field.addItem(level, level)
                field.setToolTip(f"{spec.display}: choose the patient's category.")
                index = field.findData(previous.get(column))
                field.setCurrentIndex(max(0, index))
                field.currentIndexChanged.connect(self.look_up)
            self._fields[column] = field
            self.lookup_form.addRow(label, field)
        # Keyboard order: the details, then the patient's values top to bottom, then Clear.
        chain = [self.details] + list(self._fields.values()) + [self.clear_button]
        for first, second in zip(chain, chain[1:]):
            QWidget.setTabOrder(first, second)
        self.look_up()

    def values(self) -> dict[str, str | None]:
        out: dict[str, str | None] = {}
        for column, field in self._fields.items():
            if isinstance(field, QLineEdit):
                out[column] = field.text().strip() or None
            else:
                out[column] = field.currentData()
        return out

    def set_values(self, values: dict[str, str | None]) -> None:
        """Put values in the lookup's fields (one lookup follows, not one per field)."""
        for column, value in values.items():
            field = self._fields.get(column)
            if field is None:
                continue
            with QSignalBlocker(field):
                if isinstance(field, QLineEdit):
                    field.setText("" if value is None else str(value))
                else:
                    field.setCurrentIndex(max(0, field.findData(value)))
        self.look_up()

    def clear_lookup(self) -> None:
        self.set_values({c: None for c in self._fields})

    def _derivation_ranges(self) -> dict:
        """The values of the patients the tree was grown on (core computes them once per
        run), against which a typed value is flagged."""
        chosen = self.session.chosen
        if chosen is None:
            return {}
        if getattr(self, "_ranges_of", None) is not chosen.data:
            self._ranges_of = chosen.data
            self._ranges = observed_ranges(chosen.data.predictors)
        return self._ranges

    def look_up(self, *_args) -> None:
        model = self.session.model
        values = self.values()
        if model is None or not any(v is not None for v in values.values()):
            self.view.light_path(())
            self.result.setText("Enter values to see where this patient goes.")
            self.last_route = None
            return
        route = route_patient(model, values, self._derivation_ranges())
        self.last_route = route
        if route.refused:  # a word or an impossible number: said in the lookup's words, no box
            self.view.light_path(())
            self.result.setText("<p><b>Not looked up yet.</b></p>"
                                + "".join(warning_html(r) for r in route.refused))
            return
        self.view.light_path(route.boxes)
        # A value no patient the tree was grown on had is read before the answer, not after.
        warn = "".join(warning_html(w) for w in route.warnings)
        if route.needs is not None:  # no branch for this missing value: which one to measure
            label = model.spec(route.needs).display
            self.result.setText(warn + f"<p><b>Stops at box {route.waiting_box}.</b></p>"
                                + warning_html(say("app.measure_first", label=label,
                                                   box=route.waiting_box)))
            self.show_box(route.waiting_box)
            return
        leaf = model.node(route.outcome_box)
        # The way there is lit in the diagram and listed in the box details above.
        self.result.setText(f"{warn}<p><b>Reaches box {route.outcome_box}:</b> "
                            f"{escape(leaf.text)}</p>")
        self.show_box(route.outcome_box)
