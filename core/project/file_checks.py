"""Checking a project file's contents before a project is built from them.

A project file may have been edited by hand, cut short or written by another program. Every
field is checked for its type and its range (a size is "1se", "min" or a whole number of
boxes; folds are a whole number of 2 or more; a seed is a whole number; …) so that a damaged
file is refused, naming the field, when it is opened, instead of failing later while a tree is
grown or a chart is printed. Booleans are not numbers here: JSON's ``true`` is not a size.
"""

from __future__ import annotations

from ..document_checks import TEXT_LENGTH, Field, check_nesting
from ..errors import InputError
from ..messages.message import say
from ..sizing.request_checks import check_request_document, check_size

HEX = frozenset("0123456789abcdef")


def check_project_document(data: dict, file: str = "The project") -> None:
    """Refuse (InputError) a project dict of the current layout whose fields have the wrong
    type, size or an impossible value, naming the field by its path (``request.cv.folds``);
    ``file`` names the file in the message."""
    def refuse(where: str, problem: str) -> InputError:
        return InputError(say("project.damaged", file=file, where=where, problem=problem))

    check_nesting(data, refuse)
    top = Field(data, "", refuse)
    entry = top["data"]
    if entry.object():
        entry["path"].text(optional=False, longest=4096)
        entry["sheet"].text()
        entry["relative_path"].text(longest=4096)
        sha = entry["sha256"]
        if sha.value is not None and (not isinstance(sha.value, str) or len(sha.value) != 64
                                      or not set(sha.value) <= HEX):
            sha.fail("it must be the 64 hexadecimal digits of a SHA-256")
    top["dictionary"].object()
    if top["request"].object():
        check_request_document(top["request"])
    check_size(top["size"])
    if top["seed"].value is not None:
        top["seed"].limited("seed")
    chart = top["chart"]
    if chart.object():
        for key in ("title", "subtitle"):
            chart[key].text(empty=True, longest=TEXT_LENGTH)
        chart["paper"].text()
        chart["orientation"].text()
        chart["min_text"].number(least=0, most=1000)  # the chart says 6 to 40 pt
        chart["form"].text(choices=("tree", "rules"))
        chart["show_file_name"].truth()
    top["model_fingerprint"].text()
    top["saved_by"].text()
