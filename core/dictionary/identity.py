"""Columns that identify a person: names, record numbers, dates of birth, addresses, phone
numbers, e-mail addresses, and identifiers that differ in every row.

Such a column must never become a question on a wall chart (it would print a patient's
identity, and it predicts nothing beyond the patients it came from), so the data dictionary
leaves it out of the predictors by default and the guards (core/design/guards.py) say why. Each
column is judged by its header *and* by its contents, so a column named "contact" that holds
phone numbers is caught, and so is a column of e-mail addresses named "notes".
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
import pandas as pd

_SAMPLE = 2000  # cells looked at per column

# Header words, matched on the header in lower case with separators turned into spaces.
_HEADER_RULES: tuple[tuple[str, re.Pattern], ...] = (
    ("e-mail addresses", re.compile(r"\b(e ?mail|email address)\b")),
    ("phone numbers", re.compile(r"\b(phone|telephone|tel|mobile|cell ?phone|fax|"
                                 r"contact (no|number))\b")),
    ("dates of birth", re.compile(r"\b(dob|d o b|date of birth|birth ?date|birthday|"
                                  r"born on)\b")),
    ("addresses", re.compile(r"\b(address|street|post ?code|postal ?code|zip ?code|zip|"
                             r"house (no|number))\b")),
    ("names", re.compile(r"\b(first|last|given|family|full|middle|maiden|patient|person|"
                         r"client|pt)\s?names?\b|\b(sur|fore)names?\b|^names?$|^initials$")),
    ("record numbers", re.compile(r"\b(mrn|urn|medical record|record (no|number)|"
                                  r"(hospital|hosp|unit|chart) (no|number|num)|hosp ?no|"
                                  r"nhs (no|number)|chi (no|number)|ssn|"
                                  r"social security|insurance (no|number)|passport|"
                                  r"national id|health card|case (no|number))\b")),
)

_EMAIL = re.compile(r"^[^@\s]+@[^@\s]+\.[A-Za-z]{2,}$")
_PHONE = re.compile(r"^(\+|00)?[\d\s().\-/]{7,22}$")
_NAME_TOKEN = re.compile(r"^[A-Z][a-zA-Z'’\-]*\.?,?$")
_STREET = re.compile(r"^\d+[A-Za-z]?,?\s+.*\b(street|st|road|rd|avenue|ave|lane|ln|drive|dr|"
                     r"close|way|place|pl|court|ct|crescent|terrace|boulevard|blvd|square|"
                     r"grove|gardens|hill|row|parade|highway|hwy)\b\.?", re.IGNORECASE)
_POSTCODE = re.compile(r"^[A-Z]{1,2}\d[A-Z\d]?\s*\d[A-Z]{2}$")  # UK style
_PHONE_PUNCTUATION = re.compile(r".*[\s\-()+/.]")
_DATE_LIKE = re.compile(r".*\d{1,4}[-/.]\d{1,2}[-/.]\d{1,4}")


@dataclass(frozen=True)
class IdentityHint:
    """Why a column looks like it identifies patients."""

    what: str  # "names", "e-mail addresses", ... or "an identifier unique to each row"
    basis: str  # "header", "contents" or "levels" (a category column's few answers)

    @property
    def reason(self) -> str:
        if self.basis == "header":
            return f"its name suggests {self.what}"
        if self.basis == "levels":
            return f"its categories look like {self.what}"
        return f"its cells look like {self.what}"


def normalised_header(name: str) -> str:
    """A header in lower case with camelCase, underscores, dots and dashes turned into spaces."""
    spaced = re.sub(r"(?<=[a-z])(?=[A-Z])", " ", str(name))
    return re.sub(r"[\s_.\-:/]+", " ", spaced).strip().lower()


def identity_by_header(name: str) -> IdentityHint | None:
    """A hint from the column name alone."""
    header = normalised_header(name)
    for what, rule in _HEADER_RULES:
        if rule.search(header):
            return IdentityHint(what, "header")
    return None


def _share(texts: list[str], rule: re.Pattern) -> float:
    return sum(1 for t in texts if rule.match(t)) / len(texts) if texts else 0.0


def identity_by_contents(values: pd.Series) -> IdentityHint | None:
    """A hint from what the cells hold (a sample of the recorded cells is enough)."""
    present = values.dropna()
    if len(present) < 5:
        return None
    if pd.api.types.is_datetime64_any_dtype(present.dtype):
        return _birth_dates(present)
    if pd.api.types.is_numeric_dtype(present.dtype) or pd.api.types.is_bool_dtype(present.dtype):
        return None
    sample = present.to_numpy(dtype=object)[:: max(1, len(present) // _SAMPLE)][:_SAMPLE]
    distinct_cells = pd.unique(sample)
    distinct = len(distinct_cells) / len(sample)
    # Patterns are judged on distinct texts: a few hundred at most, however long the column.
    texts = [v.strip() for v in distinct_cells[:500] if isinstance(v, str) and v.strip()]
    if 2 <= len(texts) <= _FEW_LEVELS:
        by_levels = identity_by_levels(texts)
        if by_levels is not None:
            return by_levels
    if len(texts) < 5:
        return None
    if _share(texts, _EMAIL) >= 0.5:
        return IdentityHint("e-mail addresses", "contents")
    if _share(texts, _DATE_LIKE) >= 0.9:
        # Dates first: a dd/mm/yyyy date is written with digits and slashes like a phone
        # number, but only dates spread over decades identify (dates of birth).
        dates = pd.to_datetime(pd.Series(texts, dtype=object), errors="coerce", format="mixed",
                               dayfirst=True)
        if dates.notna().mean() >= 0.9:
            return _birth_dates(dates.dropna())
    if distinct >= 0.5 and _share(texts, _PHONE) >= 0.8 and \
            float(np.median([sum(ch.isdigit() for ch in t) for t in texts])) >= 7 and \
            (_share(texts, _PHONE_PUNCTUATION) >= 0.5 or
             sum(t.startswith("0") for t in texts) >= 0.5 * len(texts)):
        return IdentityHint("phone numbers", "contents")
    if _share(texts, _STREET) >= 0.5 or _share([t.upper() for t in texts], _POSTCODE) >= 0.8:
        return IdentityHint("addresses", "contents")
    # Names repeat (a patient seen often, a common name), so many distinct texts shaped like
    # names are enough; a clinical category seldom has thirty capitalised two-word levels.
    if len(texts) >= 10 and (distinct >= 0.5 or len(texts) >= 30) and \
            _person_names(texts) >= 0.8:
        return IdentityHint("names", "contents")
    return None


# A category column has at most this many answers (columns.MAX_NOMINAL_LEVELS); its levels are
# screened one by one, as they would be printed on a chart ("Ward: Margaret Okafor?").
_FEW_LEVELS = 40
# Words of wards, services, sites, arrivals, triage and severity: a level that holds one is a
# clinical category, not a person ("General Surgery", "Walk In", "Very Urgent", "St Mary's").
_CATEGORY_WORDS = frozenset("""
    a e and or of the in on at to for by with without from via plus not no none nil other
    ward wards unit units bay bays bed beds room rooms floor level block wing side suite lounge
    area zone pod hub base centre center clinic clinics department dept service services team
    teams theatre theatres hospital hospitals infirmary college university memorial royal
    general district county city community site campus annex annexe main new old
    st saint queen queens king kings prince princess sir lady
    north south east west central upper lower front back inner outer left right
    medical medicine medicines surgical surgery surgeries emergency accident urgent urgency
    acute intensive critical care high dependency step down short long stay day days night
    same assessment admission admissions admitted discharge discharged observation observations
    resus resuscitation majors minors major minor trauma orthopaedics orthopedics orthopaedic
    orthopedic cardiology cardiac coronary respiratory renal stroke neurology neuro oncology
    haematology hematology paediatric paediatrics pediatric pediatrics neonatal maternity
    labour labor delivery obstetrics gynaecology gynecology elderly older people adult adults
    child children mental health psychiatry psychiatric rehab rehabilitation palliative
    hospice geriatric geriatrics frailty infectious diseases isolation endoscopy radiology
    imaging outpatient outpatients inpatient inpatients recovery ambulatory virtual
    ambulance walk walked self referral referred referrer transfer transferred police gp
    home homes nursing residential carer relative family friend taxi car bus foot helicopter
    private public primary secondary tertiary local national regional
    red amber yellow green blue orange white black purple grey gray pink
    immediate very standard routine non semi elective planned unplanned emergent
    mild moderate severe none light heavy low medium high normal abnormal positive negative
    first second third fourth fifth one two three four five six seven eight nine ten
    i ii iii iv v vi vii viii ix x
    current ex never former smoker smokers non-smoker daily weekly occasional
    male female man woman men women boy girl unknown other
    room air oxygen nasal cannula mask venturi reservoir
    ed ae icu hdu ccu amu sau cdu mau itu picu nicu or
    white black asian mixed british irish indian pakistani bangladeshi chinese african
    caribbean arab any european hispanic latino latina american native pacific islander
    aboriginal maori traveller gypsy roma english welsh scottish polish not stated declined
    united kingdom states republic medicare medicaid insurance insured uninsured pay
    pain chest abdominal back head headache heart failure attack infection infections tract
    urinary sepsis septic pneumonia acquired aspiration asthma copd exacerbation fracture
    fractured hip neck femur wrist ankle injury injuries fall falls collapse syncope stroke
    bleed bleeding haemorrhage hemorrhage embolism pulmonary atrial fibrillation flutter
    kidney liver disease chronic obstructive diabetes diabetic ketoacidosis hypoglycaemia
    cancer tumour tumor overdose poisoning alcohol drug drugs withdrawal seizure epilepsy
    delirium dementia confusion cellulitis wound ulcer burns burn shortness breath breathless
    breathlessness fever cough vomiting diarrhoea diarrhea bowel obstruction appendicitis
    cholecystitis pancreatitis gastroenteritis anaemia anemia dehydration covid influenza flu
    viral bacterial infarction myocardial angina arrest cardiac arrhythmia hypertension
    hypotension shock anaphylaxis allergic reaction rash skin eye ear nose throat dental
    mouth limb arm leg foot hand spine spinal lumbar musculoskeletal soft tissue
    social psychosocial self harm harmed suicide attempt ideation anxiety depression
    review follow up plus minus only both neither partial full complete incomplete
""".split())
_RECORD_LEVEL = re.compile(r"^[A-Za-z]{0,4}[\s\-/#:.]?\d{5,}[A-Za-z]?$|^\d{3}[\s\-]?\d{3}[\s\-]?\d{4}$")


def identity_by_levels(levels: list[str]) -> IdentityHint | None:
    """A hint from a category column's answers, each judged as a chart would print it: most of
    them written like people's names ("Margaret Okafor", "Dr Okafor", "Mary-Jane Watts") or like
    record numbers ("H400123", "MRN 0012345", "943 476 5919"). At least two must look so."""
    levels = [lv.strip() for lv in levels if lv and lv.strip()]
    if len(levels) < 2:
        return None
    for what, looks in (("names", _level_is_a_name), ("record numbers", _RECORD_LEVEL.match)):
        hits = sum(1 for lv in levels if looks(lv))
        if hits >= 2 and hits >= 0.5 * len(levels):
            return IdentityHint(what, "levels")
    return None


def _level_is_a_name(text: str) -> bool:
    """A person's name as a category would hold it: 2–4 capitalised words, none of them a
    word of wards, services or severity, and no short capitals (ICU, AMU) beside small
    letters."""
    tokens = text.replace(",", ", ").split()
    if not 2 <= len(tokens) <= 4 or not all(_NAME_TOKEN.match(t) for t in tokens):
        return False
    bare = [t.strip(".,").replace("’", "'") for t in tokens]
    if sum(len(t) >= 2 for t in bare) < 2:
        return False
    if any(t.casefold().removesuffix("'s").removesuffix("'") in _CATEGORY_WORDS for t in bare):
        return False
    mixed_case = any(ch.islower() for ch in text)
    return not (mixed_case and any(2 <= len(t) <= 4 and t.isupper() for t in bare))


def _person_names(texts: list[str]) -> float:
    """Share of cells written like a person's name: 2–4 capitalised words, e.g. 'Ada Lovelace'."""
    def looks(text: str) -> bool:
        tokens = text.replace(",", ", ").split()
        return 2 <= len(tokens) <= 4 and all(_NAME_TOKEN.match(t) for t in tokens) and \
            sum(len(t.strip(".,")) >= 2 for t in tokens) >= 2
    return sum(map(looks, texts)) / len(texts)


def _birth_dates(dates: pd.Series) -> IdentityHint | None:
    """Dates spread over decades and all in the past: how dates of birth look in a cohort."""
    try:
        years = pd.DatetimeIndex(dates).year
    except (TypeError, ValueError):
        return None
    if len(years) < 5:
        return None
    span = int(np.max(years)) - int(np.min(years))
    if span >= 30 and int(np.min(years)) >= 1880 and pd.Timestamp(np.max(dates)) <= pd.Timestamp.now():
        return IdentityHint("dates of birth", "contents")
    return None


# What a patient-number column may hold: record numbers (one per person, never shared).
GROUPING_IDENTITIES = ("record numbers", "an identifier unique to each row")


def may_group_patients(spec) -> bool:
    """Whether a column (its dictionary entry) may be the patient number that keeps a patient's
    rows together: record numbers may; names, addresses, phone numbers, e-mail addresses and
    dates of birth never (different people share them, and one person's are written in
    several ways)."""
    hint = identity_by_header(spec.name)
    if hint is not None and hint.what not in GROUPING_IDENTITIES:
        return False
    note = getattr(spec, "note", "") or ""
    return not (note.startswith("identity: ") and
                note[len("identity: "):] not in GROUPING_IDENTITIES)


# Hospitals and campuses are often named after people ("John Radcliffe"): a site column's
# levels are not screened for names.
_SITE_HEADER = re.compile(r"\b(site|sites|campus|hospital|centre|center|facility|trust)\b")


def identity_hint(name: str, values: pd.Series) -> IdentityHint | None:
    """Why the column looks like it identifies patients, or None."""
    hint = identity_by_header(name) or identity_by_contents(values)
    if hint is not None and hint.basis == "levels" and hint.what == "names" and \
            _SITE_HEADER.search(normalised_header(name)):
        return None
    return hint


def looks_like_record_numbers(numbers: np.ndarray, n_present: int, hinted: bool) -> bool:
    """Whole numbers that differ in every row and are laid out like record numbers.

    Real measurements in whole units rarely differ in every one of many rows; record numbers
    do, and are either numbered densely (1, 2, 3, …), long (6 digits or more), or named so.
    """
    finite = numbers[np.isfinite(numbers)]
    if len(finite) < 20 or len(finite) != n_present:
        return False
    if not np.all(finite == np.round(finite)) or pd.unique(finite).size != len(finite):
        return False
    if hinted:
        return True
    dense = (finite.max() - finite.min() + 1) <= 1.5 * len(finite)
    long = bool(np.all(np.abs(finite) >= 100_000))
    return len(finite) >= 50 and (dense or long)
