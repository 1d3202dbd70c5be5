"""Reference trees for the chart's capacity: trees Prunella itself chooses on open data sets,
the demo cohort's lowest-error tree, and seeded random shapes.

Open data sets, both shipped inside scikit-learn (``sklearn.datasets``):

- Breast Cancer Wisconsin (Diagnostic), Street, Wolberg & Mangasarian 1993 (UCI machine
  learning repository): 569 cases, 30 measurements of cell nuclei, malignant or benign.
- Diabetes, Efron, Hastie, Johnstone & Tibshirani 2004, Annals of Statistics 32:407–499:
  442 patients, ten baseline variables, disease progression one year later. The labels and
  units below are those of scikit-learn's description of the data set (``load_diabetes``).

The demo cohort (sample_data/) is invented: it stands for the kind of tree the app shows first.
Used by the chart tests and by tests/benchmarks/bench_chart_capacity.py.
"""

from __future__ import annotations

import random
import tempfile
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import numpy as np

from core.sizing import Derivation, DerivationRequest, choose_model, derive
from core.design import DesignSpec
from core.model.tree import Node, Question, TreeModel, question_text
from core.data import read_table
from core.dictionary import ColumnSpec, DataDictionary, infer_dictionary

_FOLDER = tempfile.TemporaryDirectory(prefix="prunella-references-")

DIABETES_COLUMNS = {  # column: (label, unit), from scikit-learn's description of the data
    "age": ("Age", "years"), "sex": ("Sex", ""), "bmi": ("Body mass index", "kg/m²"),
    "bp": ("Average blood pressure", "mm Hg"), "s1": ("Total serum cholesterol", "mg/dL"),
    "s2": ("Low-density lipoproteins", "mg/dL"), "s3": ("High-density lipoproteins", "mg/dL"),
    "s4": ("Total cholesterol / HDL", ""), "s5": ("Log of serum triglycerides", ""),
    "s6": ("Blood sugar level", "mg/dL"),
}


def _read(frame, name: str):
    """The frame as a user's file: written to CSV and read back as Prunella reads files."""
    path = Path(_FOLDER.name) / f"{name}.csv"
    if not path.exists():
        frame.to_csv(path, index=False)
    return read_table(path)


@lru_cache(maxsize=None)
def wisconsin(columns: int = 30) -> Derivation:
    """The 1-SE tree for malignant versus benign from the first ``columns`` measurements
    (default settings: 10-fold cross-validation, the 1-SE rule)."""
    from sklearn.datasets import load_breast_cancer

    data = load_breast_cancer(as_frame=True)
    frame = data.frame.drop(columns=["target"])
    frame = frame[list(frame.columns[:columns])].copy()
    frame["diagnosis"] = np.where(data.target == 0, "malignant", "benign")
    table = _read(frame, f"wisconsin-{columns}")
    dictionary, _ = infer_dictionary(table.frame)
    dictionary = dictionary.with_column("diagnosis", role="outcome", label="Diagnosis")
    predictors = tuple(frame.columns[:columns])
    return derive(table, dictionary, DerivationRequest(
        DesignSpec("diagnosis", predictors, positive="malignant")))


@lru_cache(maxsize=None)
def diabetes() -> Derivation:
    """A regression tree of disease progression on the ten baseline variables (in their
    original units), its size chosen by the 1-SE rule; :func:`diabetes_size` picks others."""
    from sklearn.datasets import load_diabetes

    data = load_diabetes(as_frame=True, scaled=False)
    frame = data.frame.rename(columns={"target": "progression"})
    table = _read(frame, "diabetes")
    columns = [ColumnSpec(name, kind="numeric", label=label, unit=unit)
               for name, (label, unit) in DIABETES_COLUMNS.items()]
    columns.append(ColumnSpec("progression", role="outcome", kind="numeric",
                              label="Disease progression after one year"))
    return derive(table, DataDictionary(tuple(columns)), DerivationRequest(
        DesignSpec("progression", tuple(DIABETES_COLUMNS), task="regression")))


@lru_cache(maxsize=None)
def diabetes_size(leaves: int) -> Derivation:
    return choose_model(diabetes(), leaves)


@lru_cache(maxsize=None)
def demo_lowest_error() -> Derivation:
    """The invented demo cohort's admission tree at its lowest cross-validated error."""
    import _chart_demo as demo

    derivation = demo.admitted()
    return choose_model(derivation, "min")


# --- seeded random shapes ---------------------------------------------------------------------

# Questions as a clinician's dictionary words them (label, unit, a plausible threshold range).
_NUMERIC = (("Age", "years", 18, 90), ("Breathing rate", "/min", 12, 40),
            ("Oxygen saturation (room air)", "%", 80, 99), ("Heart rate", "/min", 50, 150),
            ("C-reactive protein", "mg/L", 5, 200), ("Systolic blood pressure", "mm Hg", 80, 180),
            ("Temperature", "°C", 35.5, 40.0), ("Creatinine", "µmol/L", 50, 300),
            ("Lactate", "mmol/L", 1, 6), ("White cell count", "×10⁹/L", 2, 25))
_LEVELS = (("How the patient arrived", ("ambulance", "inter-hospital transfer", "walked in",
                                        "referred by GP")),
           ("Triage level", ("1", "2", "3", "4", "5")),
           ("Known heart failure", ("yes", "no")))


@dataclass(frozen=True)
class _Shape:
    leaves: int
    yes: "_Shape | None" = None
    no: "_Shape | None" = None


def _random_shape(rng: random.Random, leaves: int) -> _Shape:
    if leaves == 1:
        return _Shape(1)
    # Trees that pruning keeps are seldom balanced: a split sends a few patients one way.
    split = rng.choice([1, 1, max(1, leaves // 3), max(1, leaves // 2)])
    split = min(split, leaves - 1)
    if rng.random() < 0.5:
        split = leaves - split
    return _Shape(leaves, _random_shape(rng, split), _random_shape(rng, leaves - split))


def random_model(seed: int, leaves: int) -> TreeModel:
    """A yes/no-outcome model of ``leaves`` outcome boxes with a random shape, random
    clinical questions (numbers with units, lists of levels, 'or not recorded' branches) and
    random counts; numbered breadth-first, YES first, as Prunella numbers a tree."""
    rng = random.Random(seed * 1000 + leaves)
    specs = [ColumnSpec(f"n{k}", kind="numeric", label=label, unit=unit)
             for k, (label, unit, _, _) in enumerate(_NUMERIC)]
    specs += [ColumnSpec(f"c{k}", kind="nominal", label=label, levels=levels)
              for k, (label, levels) in enumerate(_LEVELS)]
    outcome = ColumnSpec("admitted", role="outcome", kind="binary", label="Admitted to hospital",
                         levels=("no", "yes"))
    shape = _random_shape(rng, leaves)
    total = rng.randint(400, 4000)
    order: list[tuple[_Shape, int, int]] = []  # (shape, depth, patients) breadth-first
    queue = [(shape, 0, total)]
    while queue:
        here = queue.pop(0)
        order.append(here)
        node, depth, n = here
        if node.yes is not None:
            share = rng.uniform(0.15, 0.85)
            # at least five patients in every outcome box below
            yes = max(5 * node.yes.leaves, min(n - 5 * node.no.leaves, round(n * share)))
            queue += [(node.yes, depth + 1, yes), (node.no, depth + 1, n - yes)]
    number = {id(s): k + 1 for k, (s, _, _) in enumerate(order)}
    rates = {}
    nodes = []
    for node, depth, n in order:
        if node.yes is None:
            positive = round(n * rng.uniform(0.02, 0.9))
            rates[id(node)] = (n - positive, positive)
    for node, depth, n in reversed(order):  # counts add up from the outcome boxes
        if node.yes is not None:
            a, b = rates[id(node.yes)], rates[id(node.no)]
            rates[id(node)] = (a[0] + b[0], a[1] + b[1])
    for node, depth, n in order:
        counts = rates[id(node)]
        prediction = "yes" if counts[1] * 2 > sum(counts) else "no"
        if node.yes is None:
            text = (f"{outcome.display}: expect {prediction} "
                    f"({counts[1] / sum(counts):.0%} of {sum(counts)} patients had yes)")
            nodes.append(Node(id=number[id(node)], depth=depth, n=sum(counts), counts=counts,
                              prediction=prediction, text=text))
            continue
        spec = rng.choice(specs)
        if spec.kind == "numeric":
            lo, hi = next((lo, hi) for label, _, lo, hi in _NUMERIC if label == spec.label)
            value = round(rng.uniform(lo, hi), 1 if hi - lo < 10 else 0)
            question = Question(spec.name, "above", threshold=float(value),
                                missing_goes=rng.choice(("yes", "no")), missing_in_derivation=3)
        else:
            levels = list(spec.levels)
            rng.shuffle(levels)
            cut = rng.randint(1, len(levels) - 1)
            question = Question(spec.name, "in", yes_levels=tuple(levels[:cut]),
                                no_levels=tuple(levels[cut:]),
                                missing_goes=rng.choice(("yes", "no")), missing_in_derivation=3)
        nodes.append(Node(id=number[id(node)], depth=depth, n=sum(counts), question=question,
                          children=(number[id(node.yes)], number[id(node.no)]), counts=counts,
                          prediction=prediction, text=question_text(question, spec)))
    root = nodes[0]
    # A layout reference: better than no tree, and every question with a branch for a missing
    # value (its label the longest a question box carries).
    chosen = {"leaves": leaves, "rule": "user", "cv_risk": 0.2, "cv_se": 0.01,
              "train_risk": 0.18, "better_than_no_tree": True}
    path = {"leaves": [leaves], "cv_risk": [0.2], "cv_se": [0.01], "train_risk": [0.18],
            "cv": "10-fold cross-validation", "risk_measure": "error rate"}
    extra = {"cohort": {"visits": root.n, "outcome_counts": {"no": root.counts[0],
                                                             "yes": root.counts[1]}},
             "data": {"file": "random.csv", "sha256": f"{seed:064x}"}}
    return TreeModel(task="classification", outcome=outcome, classes=("no", "yes"),
                     predictors=tuple(specs), nodes=tuple(nodes), n_rows=root.n, path=path,
                     chosen=chosen, extra=extra)
