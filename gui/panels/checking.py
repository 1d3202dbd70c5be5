"""Step 5, checking it: how the chosen tree did on patients it was not grown on — the
cross-validated error of its size, and the result on patients set aside or from elsewhere."""

from __future__ import annotations

from html import escape

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QGroupBox, QLabel, QScrollArea, QVBoxLayout, QWidget

from core.cautions import UNCHECKED_BANNER, UNCHECKED_DETAIL
from gui.panels.base import Banner, Panel

RULES = {"1se": "smallest within one standard error (SE) of the lowest error",
         "min": "lowest cross-validated error", "user": "chosen by you"}
MEASURE_WORDS = {
    "accuracy": "Share of patients the tree classed correctly",
    "risk": "Misclassification cost per patient",
    "mean_squared_error": "Mean squared error",
}


def cross_validated_html(model) -> str:
    chosen, path = model.chosen, model.path
    folds = path.get("folds")
    return (
        "<table cellpadding='4'>"
        f"<tr><td>Size</td><td><b>{chosen['leaves']} outcome boxes</b> ({RULES[chosen['rule']]})"
        "</td></tr>"
        f"<tr><td>Error measured as</td><td>{escape(path['risk_measure'])}</td></tr>"
        f"<tr><td>Cross-validated error</td><td><b>{chosen['cv_risk']:.3f}</b> ± "
        f"{chosen['cv_se']:.3f} (one SE)</td></tr>"
        f"<tr><td>Training error, beside it</td><td>{chosen['train_risk']:.3f} (on the patients "
        "it was grown on; always looks better)</td></tr>"
        f"<tr><td>How it was checked</td><td>{escape(path['cv'])}"
        + (f", {folds} fits on parts of the data" if folds else "") + "</td></tr>"
        f"<tr><td>Grown on</td><td>{model.n_rows:,} rows</td></tr></table>")


def validation_html(check: dict) -> str:
    rows = [f"<p>On <b>{check.get('n', '?'):,}</b> patients from {escape(str(check['source']))}"
            "</p>" if isinstance(check.get("n"), int) else
            f"<p>On patients from {escape(str(check.get('source', 'elsewhere')))}</p>"]
    if check.get("summary"):
        rows.append(f"<p><b>{escape(str(check['summary']))}</b></p>")
    else:
        measured = [(MEASURE_WORDS.get(k, k.replace("_", " ").capitalize()), v)
                    for k, v in check.items() if isinstance(v, float)]
        if measured:
            rows.append("<table cellpadding='4'>" + "".join(
                f"<tr><td>{escape(name)}</td><td><b>{value:.3f}</b></td></tr>"
                for name, value in measured) + "</table>")
    return "\n".join(rows)


class CheckingPanel(Panel):
    step = "checking"
    intro = ("How well the chosen tree does on patients it was not grown on. Cross-validation "
             "estimates it from the derivation data; patients set aside before growing, or from "
             "another site or period, check it for real.")

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self.cv_label = QLabel()
        self.cv_label.setTextFormat(Qt.RichText)
        self.cv_label.setWordWrap(True)
        self.cv_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        cv_box = QGroupBox("Cross-validated performance of this size")
        cv_box.setToolTip("Cross-validation: the tree is regrown without part of the patients "
                          "and tested on that part, in turn.")
        QVBoxLayout(cv_box).addWidget(self.cv_label)

        self.unchecked = Banner("⚠")
        self.validation_label = QLabel()
        self.validation_label.setTextFormat(Qt.RichText)
        self.validation_label.setWordWrap(True)
        self.validation_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        validation_box = QGroupBox("Checked on separate patients")
        validation_layout = QVBoxLayout(validation_box)
        validation_layout.addWidget(self.unchecked)
        validation_layout.addWidget(self.validation_label)

        inner = QWidget()
        inner_layout = QVBoxLayout(inner)
        inner_layout.setContentsMargins(0, 0, 0, 0)
        inner_layout.addWidget(cv_box)
        inner_layout.addWidget(validation_box)
        inner_layout.addStretch(1)
        self.extra_layout = inner_layout  # the checking tools add their sections here
        scroll = QScrollArea()
        scroll.setWidget(inner)
        scroll.setWidgetResizable(True)
        scroll.setFocusPolicy(Qt.NoFocus)  # tab goes to the controls inside, not the frame
        self.empty = Banner("ℹ", "Go to step 3")
        self.empty.button.clicked.connect(lambda: self.go_to.emit("size"))
        self.body.addWidget(self.empty)
        self.body.addWidget(scroll, 1)
        self.content = scroll

        session.result_changed.connect(self.refresh)
        session.chosen_changed.connect(self.refresh)
        self.refresh()

    def refresh(self) -> None:
        model = self.session.model
        self.content.setVisible(model is not None)
        if model is None:
            self.empty.show_text("No tree yet: run step 3 to grow one.")
            return
        self.empty.hide()
        self.cv_label.setText(cross_validated_html(model))
        check = model.extra.get("validation")
        if check:
            self.unchecked.hide()
            self.validation_label.setText(validation_html(check))
        else:
            self.unchecked.show_text(f"<b>{UNCHECKED_BANNER}.</b> {UNCHECKED_DETAIL}")
            self.validation_label.setText(
                "To check it here, set some patients aside before growing (step 3, “Set aside "
                "for checking”) and run again.")
