"""Prunella's computing core: spreadsheet to cross-validated, pruned decision tree.

Nothing in this package imports Qt; the GUI, the command line and the tests all drive the
same plain functions.
"""

__version__ = "0.1.0"
