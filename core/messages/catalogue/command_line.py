"""Messages only the command line says, and those of any long work."""

ENTRIES = [
    ("cli.output_is_input", "refused", "{target} is an input file; choose another name for "
     "the output so the input stays unchanged.", "Write results to a new file."),
    ("cli.priors", "refused", "--priors must be observed, equal, or numbers separated by "
     "commas (one per class).", "For example --priors 0.7,0.3."),
    ("cli.size_words", "part", "must be 1se, min or a number of outcome boxes, not {given!r}", ""),
    ("cli.report_needs_pdf", "refused", "--out must name a PDF file (ending in .pdf).",
     "Give an output name ending in .pdf."),
    ("cli.report_data_differs", "warning", "The data file's SHA-256 ({found}...) differs "
     "from the one the model was fitted on ({expected}...): this report re-derives the tree "
     "from the data given, which is not the model's data.",
     "Give the report the data file the model was fitted on."),
    ("cli.report_no_settings", "refused", "The model file holds no derivation settings, so "
     "the derivation cannot be rerun for the report; fit the model again with Prunella.",
     "Fit the model again."),
    ("cli.report_tree_differs", "warning", "The tree re-derived from the data differs from "
     "the tree in the model file; the report describes the re-derived tree.",
     "Check that the data and the Prunella version are those the model was fitted with."),
    ("cli.chart_date", "refused", "--date must be a date written YYYY-MM-DD, not {given!r}.",
     "For example --date 2025-03-01."),
    ("cli.chart_bands", "refused", "--bands must be one or two numbers separated by a comma, "
     "e.g. 10,30.", "For example --bands 10,30."),
    ("cli.chart_not_printed", "refused", "The model was saved to {model}, but no chart was "
     "printed. {reason}",
     "Choose the size the message names, or larger paper, and print the chart with 'prunella "
     "chart'."),
    ("cli.usage", "refused", "{problem}; see '{command} --help'.",
     "Run the command with --help to see its options."),
    ("cli.unknown_arguments", "part", "unrecognized arguments: {arguments}", ""),
    ("cli.interrupted", "note", "interrupted.",
     "Nothing to do; run the command again to start over."),
    ("work.cancelled", "note", "The computation was cancelled.",
     "Nothing to do; run it again when you are ready."),
]
