"""Make Prunella's invented demo cohort: breathless adults at Fenwick Bay Health.

Every record is invented. The script is seeded, so each run writes the same bytes:

    python sample_data/make_demo_cohort.py [OUTPUT_DIR]

OUTPUT_DIR defaults to the folder this script lives in. It writes
breathless_ed.csv, breathless_ed.xlsx and breathless_ed.dictionary.json.
The planted structure is described in sample_data/README.md.
"""

from __future__ import annotations

import argparse
import csv
import datetime as dt
import io
import json
import re
import sys
import zipfile
from pathlib import Path

import numpy as np
import openpyxl

SEED = 20240104  # fixed; other seeds recover the same planted tree, with box rates a little off
N_PATIENTS = 3300
FIRST_DAY = dt.date(2024, 1, 1)
LAST_DAY = dt.date(2025, 12, 31)
STEM = "breathless_ed"
# Fixed stamp for the XLSX metadata and zip entries, so the file hashes the same on every run.
FIXED_STAMP = dt.datetime(2026, 1, 1, 0, 0, 0)

COLUMNS = [
    "visit_id", "patient_id", "campus", "arrival_date", "age", "sex",
    "resp_rate", "spo2", "heart_rate", "temperature", "systolic_bp", "crp",
    "triage_level", "arrival_mode", "complaint", "admitted", "los_hours", "bed_booked",
]
ARRIVAL_MODES = ["ambulance", "walked in", "GP referral", "inter-hospital transfer"]
COMPLAINTS = ["breathlessness", "wheeze", "cough with fever", "chest tightness",
              "leg swelling", "other"]
CAMPUSES = ["North", "Riverside"]

# Target admission rate of each planted box, by campus (North, Riverside). The boxes are the
# outcome boxes of a small planted tree (sample_data/README.md). Boxes that part at a question
# lie on opposite sides of a 50 % rate, so every question changes the expected outcome and
# survives pruning by misclassification cost:
#   0: spo2 <= 91, and age >= 70 or triage level 1-2
#   1: spo2 <= 91, age under 70, triage level 3-5
#   2: spo2 >= 92, resp_rate >= 25, by ambulance or inter-hospital transfer
#   3: spo2 >= 92, resp_rate >= 25, walked in or sent by a GP
#   4: spo2 >= 92, resp_rate <= 24, CRP recorded and above 100 mg/L
#   5: spo2 >= 92, resp_rate <= 24, CRP 100 mg/L or lower, or not recorded
BOX_RATES = {
    0: (0.86, 0.87),
    1: (0.32, 0.34),
    2: (0.74, 0.76),
    3: (0.26, 0.44),
    4: (0.68, 0.70),
    5: (0.11, 0.15),
}
BOX_NAMES = {
    0: "SpO2 91 % or lower, aged 70 or older or triage level 1-2",
    1: "SpO2 91 % or lower, under 70, triage level 3-5",
    2: "SpO2 92 % or higher, breathing rate above 24 /min, ambulance or transfer",
    3: "SpO2 92 % or higher, breathing rate above 24 /min, walked in or GP referral",
    4: "SpO2 92 % or higher, breathing rate 24 /min or lower, CRP recorded above 100 mg/L",
    5: "SpO2 92 % or higher, breathing rate 24 /min or lower, CRP 100 mg/L or lower or blank",
}


def _expit(x: np.ndarray) -> np.ndarray:
    return 1.0 / (1.0 + np.exp(-x))


def _offset_for_rate(modifier: np.ndarray, target: float) -> float:
    """Intercept c with mean(expit(c + modifier)) == target (bisection; mean is monotone in c)."""
    lo, hi = -20.0, 20.0
    for _ in range(100):
        mid = (lo + hi) / 2
        if _expit(mid + modifier).mean() < target:
            lo = mid
        else:
            hi = mid
    return (lo + hi) / 2


def make_patients(rng: np.random.Generator) -> dict[str, np.ndarray]:
    """One row per invented patient: home campus, sex, age at first visit, illness tendency."""
    n = N_PATIENTS
    tendency = rng.normal(0.0, 1.0, n)
    # Sicker patients come back more often; most come once.
    p_return = _expit(-2.0 + 0.6 * tendency)
    n_visits = np.ones(n, dtype=int)
    returns = rng.random(n) < p_return
    n_visits[returns] += rng.choice([1, 2, 3], size=returns.sum(), p=[0.65, 0.25, 0.10])
    return {
        "home_campus": (rng.random(n) < 0.45).astype(int),  # 1 = Riverside
        "female": rng.random(n) < 0.52,
        "first_age": np.clip(np.round(rng.normal(63.0, 17.0, n)), 18, 95).astype(int),
        "tendency": tendency,
        "n_visits": n_visits,
    }


def make_visits(rng: np.random.Generator, pat: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
    """Expand patients into visits with dates, campus and age at the visit, in arrival order."""
    owner = np.repeat(np.arange(N_PATIENTS), pat["n_visits"])
    n_days = (LAST_DAY - FIRST_DAY).days + 1
    day = rng.integers(0, n_days, owner.size)
    # Order by patient then day, so each patient's first visit is their earliest.
    order = np.lexsort((day, owner))
    owner, day = owner[order], day[order]
    first_day = np.empty(N_PATIENTS, dtype=int)
    first_day[owner[::-1]] = day[::-1]
    age = pat["first_age"][owner] + (day - first_day[owner]) // 365
    # Most returners come back to the same campus.
    switch = rng.random(owner.size) < 0.10
    campus = np.where(switch, 1 - pat["home_campus"][owner], pat["home_campus"][owner])
    # Final order: by arrival day, ties broken by a random draw, then number visits in that order.
    tiebreak = rng.random(owner.size)
    order = np.lexsort((tiebreak, day))
    owner, day, age, campus = owner[order], day[order], age[order], campus[order]
    # Patient numbers follow first appearance, like a registry would hand them out.
    seen: dict[int, int] = {}
    patient_no = np.array([seen.setdefault(int(o), len(seen) + 1) for o in owner])
    return {
        "owner": owner,
        "day": day,
        "age": np.clip(age, 18, 99),
        "campus": campus,
        "patient_no": patient_no,
    }


def make_findings(rng: np.random.Generator, pat: dict[str, np.ndarray],
                  vis: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
    """Complaint, arrival mode, triage, vital signs and CRP for each visit."""
    n = vis["owner"].size
    age = vis["age"]
    tendency = pat["tendency"][vis["owner"]]
    # Severity of this episode: part patient tendency (so repeat visits are alike), part chance.
    severity = 0.5 * tendency + 0.85 * rng.normal(0.0, 1.0, n) + 0.01 * (age - 60)

    complaint = rng.choice(len(COMPLAINTS), size=n, p=[0.35, 0.15, 0.20, 0.12, 0.08, 0.10])
    fever = complaint == COMPLAINTS.index("cough with fever")

    spo2 = np.round(94.4 - 2.6 * severity + rng.normal(0.0, 1.8, n))
    spo2 = np.clip(spo2, 72, 100).astype(int)
    resp_rate = np.round(20.3 + 3.0 * severity + rng.normal(0.0, 3.6, n))
    resp_rate = np.clip(resp_rate, 10, 48).astype(int)
    heart_rate = np.round(88.0 + 9.0 * severity + 6.0 * fever + rng.normal(0.0, 14.0, n))
    heart_rate = np.clip(heart_rate, 42, 170).astype(int)
    temperature = (36.9 + 1.1 * fever + 0.15 * severity
                   + rng.normal(0.0, 1.0, n) * (0.5 + 0.35 * fever))  # fevers vary more
    temperature = np.round(np.clip(temperature, 35.2, 41.0), 1)
    systolic_bp = np.round(128.0 + 0.3 * (age - 60) - 3.0 * severity + rng.normal(0.0, 20.0, n))
    systolic_bp = np.clip(systolic_bp, 72, 215).astype(int)

    log_crp = np.log(12.0) + 1.6 * fever + 0.35 * severity + rng.normal(0.0, 1.0, n)
    crp = np.round(np.clip(np.exp(log_crp), 0.5, 450.0), 1)

    # Arrival mode: the sicker and older come by ambulance; some are sent on by another hospital.
    mode_score = np.stack([
        0.6 * severity + 0.015 * (age - 60),  # ambulance
        -0.5 * severity - 0.015 * (age - 60),  # walked in
        np.zeros(n),                          # GP referral
        0.3 * severity - 1.4,                 # inter-hospital transfer
    ], axis=1)
    mode_p = np.exp(mode_score)
    mode_p /= mode_p.sum(axis=1, keepdims=True)
    arrival_mode = (rng.random(n)[:, None] > np.cumsum(mode_p, axis=1)).sum(axis=1)
    arrival_mode = np.minimum(arrival_mode, len(ARRIVAL_MODES) - 1)

    triage = np.round(3.3 - 0.5 * severity - 0.2 * (arrival_mode == 0) + rng.normal(0.0, 0.8, n))
    triage = np.clip(triage, 1, 5).astype(int)

    # CRP is often not sent for walk-ins, and Riverside records it less often.
    walked_in = arrival_mode == ARRIVAL_MODES.index("walked in")
    p_crp_missing = _expit(-1.65 + 1.1 * walked_in + 0.75 * vis["campus"])
    crp_missing = rng.random(n) < p_crp_missing

    return {
        "severity": severity, "complaint": complaint, "fever": fever,
        "spo2": spo2, "resp_rate": resp_rate, "heart_rate": heart_rate,
        "temperature": temperature, "systolic_bp": systolic_bp,
        "crp": crp, "crp_missing": crp_missing,
        "arrival_mode": arrival_mode, "triage": triage,
    }


def planted_box(spo2: np.ndarray, resp_rate: np.ndarray, age: np.ndarray,
                triage: np.ndarray, arrival_mode: np.ndarray, crp: np.ndarray) -> np.ndarray:
    """The planted risk box of each visit (0..5, see BOX_RATES); crp is NaN when not recorded."""
    low_spo2 = spo2 <= 91
    fast = resp_rate > 24
    brought = np.isin(arrival_mode, [ARRIVAL_MODES.index("ambulance"),
                                     ARRIVAL_MODES.index("inter-hospital transfer")])
    return np.select(
        [low_spo2 & ((age >= 70) | (triage <= 2)), low_spo2, fast & brought, fast, crp > 100],
        [0, 1, 2, 3, 4],
        default=5,
    )


def make_outcomes(rng: np.random.Generator, pat: dict[str, np.ndarray],
                  vis: dict[str, np.ndarray], fnd: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
    """Admission (step structure plus small effects), length of stay and the bed-booked flag."""
    n = vis["owner"].size
    tendency = pat["tendency"][vis["owner"]]
    crp_high_recorded = (~fnd["crp_missing"]) & (fnd["crp"] > 100)
    modifier = (
        0.2 * (fnd["arrival_mode"] == ARRIVAL_MODES.index("ambulance"))
        + 0.6 * crp_high_recorded
        + 0.2 * (fnd["triage"] <= 2)
        + 0.3 * fnd["fever"]
        + 0.5 * tendency
    )
    box = planted_box(fnd["spo2"], fnd["resp_rate"], vis["age"], fnd["triage"],
                      fnd["arrival_mode"], np.where(fnd["crp_missing"], np.nan, fnd["crp"]))
    logit = np.empty(n)
    # Calibrate each box x campus so its expected admission rate is the planted one.
    for b, rates in BOX_RATES.items():
        for c, rate in enumerate(rates):
            cell = (box == b) & (vis["campus"] == c)
            if cell.any():
                logit[cell] = _offset_for_rate(modifier[cell], rate) + modifier[cell]
    admitted = rng.random(n) < _expit(logit)

    # Length of stay: ED hours for those sent home; ED plus ward for those admitted.
    age = vis["age"]
    shortfall = np.clip(94 - fnd["spo2"], 0, None)
    log_ed = np.log(4.5) + 0.004 * (age - 60) + 0.03 * shortfall + rng.normal(0.0, 0.45, n)
    # Ward stays step up at 75 (about 2.7 times as long), so a stay tree asks about age.
    log_ward = (np.log(50.0) + 1.0 * (age >= 75) + 0.04 * shortfall
                + 0.002 * fnd["crp"] + rng.normal(0.0, 0.4, n))
    los = np.where(admitted, np.exp(log_ed) + np.exp(log_ward), np.exp(log_ed))
    los_hours = np.round(np.clip(los, 0.5, 1500.0), 1)

    # A bed is booked once the team decides to admit; a few bookings are cancelled or skipped.
    slip = np.where(admitted, rng.random(n) < 0.025, rng.random(n) < 0.015)
    bed_booked = admitted ^ slip

    return {"box": box, "admitted": admitted, "los_hours": los_hours, "bed_booked": bed_booked}


def build_table(seed: int = SEED) -> list[dict[str, object]]:
    """The whole invented cohort as a list of row dicts (Python values; None = not recorded)."""
    rng = np.random.default_rng(seed)
    pat = make_patients(rng)
    vis = make_visits(rng, pat)
    fnd = make_findings(rng, pat, vis)
    out = make_outcomes(rng, pat, vis, fnd)
    n = vis["owner"].size

    # Sentinels and gaps, as a real extract would have them.
    sbp_not_recorded = rng.random(n) < 0.01
    temp_blank = rng.random(n) < 0.006

    rows: list[dict[str, object]] = []
    for i in range(n):
        owner = vis["owner"][i]
        rows.append({
            "visit_id": f"V{i + 1:05d}",
            "patient_id": f"P{vis['patient_no'][i]:04d}",
            "campus": CAMPUSES[vis["campus"][i]],
            "arrival_date": FIRST_DAY + dt.timedelta(days=int(vis["day"][i])),
            "age": int(vis["age"][i]),
            "sex": "female" if pat["female"][owner] else "male",
            "resp_rate": int(fnd["resp_rate"][i]),
            "spo2": int(fnd["spo2"][i]),
            "heart_rate": int(fnd["heart_rate"][i]),
            "temperature": None if temp_blank[i] else float(fnd["temperature"][i]),
            "systolic_bp": -99 if sbp_not_recorded[i] else int(fnd["systolic_bp"][i]),
            "crp": None if fnd["crp_missing"][i] else float(fnd["crp"][i]),
            "triage_level": int(fnd["triage"][i]),
            "arrival_mode": ARRIVAL_MODES[fnd["arrival_mode"][i]],
            "complaint": COMPLAINTS[fnd["complaint"][i]],
            "admitted": "yes" if out["admitted"][i] else "no",
            "los_hours": float(out["los_hours"][i]),
            "bed_booked": "yes" if out["bed_booked"][i] else "no",
        })
    return rows


def _as_text(value: object) -> str:
    """One cell as CSV text: blank for missing, ISO dates, one decimal for measured decimals."""
    if value is None:
        return ""
    if isinstance(value, dt.date):
        return value.isoformat()
    if isinstance(value, float):
        return f"{value:.1f}"
    return str(value)


def write_csv(rows: list[dict[str, object]], path: Path) -> None:
    """UTF-8, comma-separated, '\\n' line endings, blank cell for missing."""
    with open(path, "w", encoding="utf-8", newline="") as fh:
        writer = csv.writer(fh, lineterminator="\n")
        writer.writerow(COLUMNS)
        for row in rows:
            writer.writerow([_as_text(row[c]) for c in COLUMNS])


ABOUT_LINES = [
    "Prunella demo cohort: breathless adults at the emergency departments of Fenwick Bay Health",
    "EVERY RECORD IS INVENTED. Fenwick Bay Health, its campuses and its patients do not exist.",
    "Made by sample_data/make_demo_cohort.py (seeded; rerunning it gives the same file).",
    "Adults (18+) arriving with acute breathlessness at two campuses, North and Riverside, "
    "visits dated 2024-01-01 to 2025-12-31.",
    "One row per visit; some patients return 2-4 times (same patient_id).",
    "Classification outcome: admitted (yes/no). Regression outcome: los_hours.",
    "bed_booked is known only after the decision to admit: it is leakage, never a predictor.",
    "systolic_bp = -99 means not recorded; blank cells are not recorded.",
    "See sample_data/README.md and breathless_ed.dictionary.json for the columns.",
    "For trying the software only: not for clinical use and not a reference for any result.",
]


def _workbook_bytes(rows: list[dict[str, object]]) -> bytes:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "visits"
    ws.append(COLUMNS)
    date_col = COLUMNS.index("arrival_date") + 1
    for row in rows:
        ws.append([row[c] for c in COLUMNS])
    for (cell,) in ws.iter_rows(min_row=2, min_col=date_col, max_col=date_col):
        cell.number_format = "yyyy-mm-dd"
    ws.freeze_panes = "A2"
    about = wb.create_sheet("about")
    for line in ABOUT_LINES:
        about.append([line])
    about.column_dimensions["A"].width = 100
    wb.properties.creator = "Prunella demo generator"
    wb.properties.title = "Invented demo cohort (not real patients)"
    wb.properties.created = FIXED_STAMP
    wb.properties.modified = FIXED_STAMP
    buf = io.BytesIO()
    wb.save(buf)
    return buf.getvalue()


def write_xlsx(rows: list[dict[str, object]], path: Path) -> None:
    """XLSX with sheets 'visits' and 'about', byte-identical on every run.

    openpyxl stamps the save time into docProps/core.xml and the zip entries, so the archive is
    rewritten with a fixed stamp and fixed entry metadata, keeping openpyxl's entry order.
    """
    stamp = FIXED_STAMP.strftime("%Y-%m-%dT%H:%M:%SZ")
    src = zipfile.ZipFile(io.BytesIO(_workbook_bytes(rows)))
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w") as dst:
        for name in src.namelist():
            data = src.read(name)
            if name == "docProps/core.xml":
                text = data.decode("utf-8")
                text = re.sub(r"(<dcterms:created[^>]*>)[^<]*(<)", rf"\g<1>{stamp}\g<2>", text)
                text = re.sub(r"(<dcterms:modified[^>]*>)[^<]*(<)", rf"\g<1>{stamp}\g<2>", text)
                data = text.encode("utf-8")
            info = zipfile.ZipInfo(name, date_time=FIXED_STAMP.timetuple()[:6])
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            info.create_system = 0
            dst.writestr(info, data, compresslevel=6)
    path.write_bytes(out.getvalue())


def _column(name: str, role: str, kind: str, label: str, unit: str = "",
            missing_codes: list[str] | None = None, levels: list[str] | None = None,
            positive: str | None = None, note: str = "") -> dict[str, object]:
    return {"name": name, "role": role, "kind": kind, "label": label, "unit": unit,
            "missing_codes": missing_codes or [], "levels": levels or [],
            "positive": positive, "note": note}


DICTIONARY_COLUMNS = [
    _column("visit_id", "ignore", "identifier", "Visit number",
            note="Unique for each visit."),
    _column("patient_id", "patient_id", "identifier", "Patient number",
            note="Repeats for patients who return; keep a patient's visits in the same fold."),
    _column("campus", "site", "nominal", "Campus", levels=CAMPUSES,
            note="Where the visit took place; use it to derive at one campus and check at the other."),
    _column("arrival_date", "ignore", "date", "Arrival date",
            note="Date of arrival at the emergency department (yyyy-mm-dd)."),
    _column("age", "predictor", "numeric", "Age", unit="years"),
    _column("sex", "predictor", "binary", "Sex", levels=["female", "male"]),
    _column("resp_rate", "predictor", "numeric", "Breathing rate", unit="/min"),
    _column("spo2", "predictor", "numeric", "Oxygen saturation (room air)", unit="%"),
    _column("heart_rate", "predictor", "numeric", "Heart rate", unit="/min"),
    _column("temperature", "predictor", "numeric", "Temperature", unit="°C",
            note="Blank when not recorded."),
    _column("systolic_bp", "predictor", "numeric", "Systolic blood pressure", unit="mmHg",
            missing_codes=["-99"], note="-99 means not recorded."),
    _column("crp", "predictor", "numeric", "C-reactive protein (CRP)", unit="mg/L",
            note="Blank when not measured; more often blank for walk-ins and at Riverside."),
    _column("triage_level", "predictor", "ordinal", "Triage level",
            levels=["1", "2", "3", "4", "5"], note="1 = most urgent, 5 = least urgent."),
    _column("arrival_mode", "predictor", "nominal", "How the patient arrived",
            levels=ARRIVAL_MODES),
    _column("complaint", "predictor", "nominal", "Main complaint", levels=COMPLAINTS),
    _column("admitted", "outcome", "binary", "Admitted to hospital",
            levels=["no", "yes"], positive="yes",
            note="The classification outcome: admitted from the emergency department."),
    _column("los_hours", "ignore", "numeric", "Length of stay", unit="hours",
            note="The regression outcome: emergency department stay for those sent home, "
                 "emergency department plus ward for those admitted. Set its role to outcome "
                 "to grow a regression tree."),
    _column("bed_booked", "ignore", "binary", "Ward bed booked", levels=["no", "yes"],
            note="Known only after the decision to admit (leakage): never use it as a predictor."),
]


def write_dictionary(path: Path) -> None:
    """The data dictionary in the prunella-dictionary/1 format."""
    doc = {"format": "prunella-dictionary/1", "columns": DICTIONARY_COLUMNS}
    path.write_text(json.dumps(doc, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")


def summarise(rows: list[dict[str, object]]) -> str:
    """Counts and admission rate per planted box and campus, for the console."""
    box = planted_box(np.array([r["spo2"] for r in rows]),
                      np.array([r["resp_rate"] for r in rows]),
                      np.array([r["age"] for r in rows]),
                      np.array([r["triage_level"] for r in rows]),
                      np.array([ARRIVAL_MODES.index(r["arrival_mode"]) for r in rows]),
                      np.array([np.nan if r["crp"] is None else r["crp"] for r in rows]))
    campus = np.array([r["campus"] for r in rows])
    admitted = np.array([r["admitted"] == "yes" for r in rows])
    lines = [f"{len(rows)} visits, {len({r['patient_id'] for r in rows})} patients, "
             f"admitted {admitted.mean():.3f}"]
    for b, name in BOX_NAMES.items():
        parts = []
        for c in CAMPUSES:
            cell = (box == b) & (campus == c)
            parts.append(f"{c} {admitted[cell].mean():.3f} (n={cell.sum()})")
        lines.append(f"  {name}: " + ", ".join(parts))
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Write Prunella's invented demo cohort.")
    parser.add_argument("output_dir", nargs="?", default=str(Path(__file__).resolve().parent),
                        help="folder to write into (default: this script's folder)")
    args = parser.parse_args(argv)
    out_dir = Path(args.output_dir)
    if not out_dir.is_dir():
        print(f"Output folder {out_dir} does not exist: create it first or pick another.",
              file=sys.stderr)
        return 2
    rows = build_table()
    write_csv(rows, out_dir / f"{STEM}.csv")
    write_xlsx(rows, out_dir / f"{STEM}.xlsx")
    write_dictionary(out_dir / f"{STEM}.dictionary.json")
    print(summarise(rows))
    return 0


if __name__ == "__main__":
    sys.exit(main())
