"""Markup from users and data is text (issue 15.6): a data file's name, a title and an external
check's source holding '&', '<b>', an unclosed tag or a link print literally on the chart and
in the report, and the PDF has no link annotation. The data are invented."""

from __future__ import annotations

import re
import shutil

from pypdf import PdfReader

from tests.helpers import DEMO_CSV, prunella

FILE_NAME = "ward & co <b>audit.csv"
TITLE = "Who <b>is & admitted <i"
SOURCE = '<a href="http://example.invalid">click</a> & <u'


def _words(path) -> str:
    return " ".join(" ".join(p.extract_text().split()) for p in PdfReader(path).pages)


def _links(path) -> list:
    return [a for p in PdfReader(path).pages if "/Annots" in p for a in p["/Annots"]
            if a.get_object().get("/Subtype") == "/Link"]


def test_markup_in_every_field_prints_literally(tmp_path):
    data = tmp_path / FILE_NAME
    shutil.copy(DEMO_CSV, data)
    dictionary = DEMO_CSV.with_name(DEMO_CSV.stem + ".dictionary.json")
    model, chart, report = tmp_path / "m.json", tmp_path / "c.pdf", tmp_path / "r.pdf"
    ran = prunella("fit", data, "--outcome", "admitted", "--dictionary", dictionary,
                   "--folds", "3", "--model", model, "--title", TITLE, "--chart", chart,
                   "--paper", "a3", "--quiet")
    assert ran.returncode == 0, ran.stderr
    assert TITLE in _words(chart) and not _links(chart)
    ran = prunella("report", model, data, "--dictionary", dictionary, "--no-nested",
                   "--bootstrap", "3", "--external", DEMO_CSV, "--external-source", SOURCE,
                   "--out", report)
    assert ran.returncode == 0, ran.stderr
    words = _words(report)
    assert SOURCE in words and FILE_NAME in words
    assert not _links(report)
    assert not re.search(r"Traceback|paraparser", ran.stderr)
