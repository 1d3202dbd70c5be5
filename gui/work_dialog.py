"""File ▸ Where the work runs: this computer's cores (all by default) or a Dask cluster.

The choice belongs to this computer, not to a project, so it is kept in the app's settings
(work/jobs, work/cluster) and given to the session as a core.work_place.WorkPlace."""

from __future__ import annotations

from PySide6.QtCore import QSettings
from PySide6.QtWidgets import (
    QButtonGroup, QDialog, QDialogButtonBox, QFormLayout, QLabel, QLineEdit, QRadioButton,
    QSpinBox, QVBoxLayout,
)

from core.errors import InputError
from core.work_place import ALL_CORES, WorkPlace, cores


def saved_work_place(settings: QSettings) -> WorkPlace:
    """The place saved in the app's settings (all cores when none is, or it is unusable)."""
    try:
        jobs = int(settings.value("work/jobs", ALL_CORES))
        cluster = str(settings.value("work/cluster", "") or "").strip() or None
        return WorkPlace(jobs=jobs, cluster=cluster)
    except (InputError, TypeError, ValueError):
        return WorkPlace()


def save_work_place(settings: QSettings, place: WorkPlace) -> None:
    settings.setValue("work/jobs", place.jobs)
    settings.setValue("work/cluster", place.cluster or "")


class WorkPlaceDialog(QDialog):
    """Choose where folds, nested cross-validation and bootstrap resamples run."""

    def __init__(self, place: WorkPlace, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Where the work runs")
        layout = QVBoxLayout(self)
        layout.addWidget(QLabel(
            "Cross-validation folds, nested cross-validation and bootstrap resamples can run "
            "side by side. The results are the same wherever they run."))
        self.here = QRadioButton("This computer")
        self.cluster = QRadioButton("A Dask cluster")
        group = QButtonGroup(self)
        group.addButton(self.here)
        group.addButton(self.cluster)
        form = QFormLayout()
        self.workers = QSpinBox()
        self.workers.setRange(0, max(64, cores()))
        self.workers.setSpecialValueText(f"all cores ({cores()})")
        self.workers.setValue(0 if place.jobs == ALL_CORES else place.jobs)
        self.workers.setAccessibleName("Workers on this computer")
        self.address = QLineEdit(place.cluster or "")
        self.address.setPlaceholderText("tcp://10.0.0.5:8786")
        self.address.setAccessibleName("Address of the Dask scheduler")
        form.addRow(self.here)
        form.addRow("Workers:", self.workers)
        form.addRow(self.cluster)
        form.addRow("Scheduler address:", self.address)
        layout.addLayout(form)
        layout.addWidget(QLabel(
            "A cluster needs Dask's distributed scheduler (pip install -e \".[cluster]\"). Only "
            "the numbers the trees are grown from travel to its workers, never the spreadsheet "
            "or identifiers."))
        for label in self.findChildren(QLabel):
            label.setWordWrap(True)
        (self.cluster if place.cluster else self.here).setChecked(True)
        self.here.toggled.connect(self._enable)
        self._enable()
        buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        layout.addWidget(buttons)

    def _enable(self) -> None:
        self.workers.setEnabled(self.here.isChecked())
        self.address.setEnabled(self.cluster.isChecked())

    def place(self) -> WorkPlace:
        """The place chosen (a cluster without an address counts as this computer)."""
        jobs = self.workers.value() or ALL_CORES
        address = self.address.text().strip()
        if self.cluster.isChecked() and address:
            return WorkPlace(jobs=jobs, cluster=address)
        return WorkPlace(jobs=jobs)
