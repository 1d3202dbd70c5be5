"""Messages of reading the file: what kind of file, its layout and header, a workbook's
sheets and cells, and the cells turned into values."""

ENTRIES = [
    ("xlsx.too_large_unpacked", "refused", "{file} would unpack to {mb} MB ({ratio} times "
     "its packed size), far more than a workbook of patients; it may be damaged or made to "
     "exhaust memory. Save the sheet as CSV and open that.",
     "Export the sheet as CSV from the spreadsheet program."),
    ("read.not_regular", "refused", "{file} is not an ordinary file (a pipe, socket or "
     "device); save the data as a file and open that.", "Open a saved CSV, TSV or XLSX file."),
    ("read.no_file", "refused", "No file at {path}; check the path and the file name.",
     "Check the spelling of the path; on the command line put paths with spaces in quotes."),
    ("read.folder", "refused", "{path} is a folder; choose a spreadsheet file inside it.",
     "Choose the file itself, not the folder that holds it."),
    ("read.cannot_open", "refused", "{file} cannot be opened ({reason}); check that you may "
     "read it and that no other program has it locked, then try again.",
     "Close the file in other programs, or copy it to a folder you can read."),
    ("read.zero_bytes", "refused", "{file} is empty (it holds no data); choose the file that "
     "holds the table.",
     "The file has no bytes at all: the export or the copy failed. Export the table again."),
    ("read.blank", "refused", "{file} holds only blank lines; choose the file that holds the "
     "table.", "Export the table again; check that the right sheet was saved."),
    ("read.binary", "refused", "{file} does not look like a text spreadsheet (it holds "
     "binary data); open the original file or save it as CSV from the spreadsheet program.",
     "The file is not CSV even though its name says so. Open it in the program that made it "
     "and save it as CSV (UTF-8) or XLSX."),
    ("read.other_file", "refused", "{file} is {what}, not a spreadsheet; choose the CSV, TSV "
     "or XLSX file that holds the table.", "Choose the data file itself; unpack archives first."),
    ("read.html", "refused", "{file} is a web page (HTML), not a spreadsheet; open it in the "
     "spreadsheet program and save it as CSV or XLSX.",
     "Some systems export 'Excel' files that are really web pages. Save them again as XLSX."),
    ("read.workbook_with_text_name", "refused", "{file} is an Excel workbook saved under a "
     "text name; rename it to end in .xlsx, or save it from the spreadsheet program as CSV.",
     "Rename the file so that it ends in .xlsx."),
    ("read.text_with_workbook_name", "refused", "{file} is a text file, not an Excel "
     "workbook; rename it to end in .csv (or .txt) and open it again.",
     "Rename the file so that its ending matches what it holds."),
    ("read.encrypted", "refused", "{file} is protected with a password; remove the "
     "protection in the spreadsheet program (or save an unprotected copy) and open the copy.",
     "Prunella never asks for passwords. Save an unprotected copy in a safe place."),
    ("read.ole", "refused", "{file} is an old-style .xls workbook or is protected with a "
     "password; save it as .xlsx (without a password) in the spreadsheet program.",
     "Save the workbook as 'Excel Workbook (.xlsx)' without a password."),
    ("read.text_has_no_sheets", "refused", "{file} is a text file and has no sheets; leave "
     "out the sheet name.", "Only XLSX workbooks have sheets; leave out --sheet."),
    ("read.utf16", "note", "{file} is UTF-16 encoded; it was read as such.", "Nothing to do."),
    ("read.cp1252", "warning", "{file} is not UTF-8 (first other character on line {line}); "
     "it was read as Windows-1252 (Western European). If accented letters look wrong, save "
     "the file as CSV UTF-8 and open it again.",
     "Check accented letters in the preview; save as 'CSV UTF-8' to be sure."),
    ("read.latin1", "warning", "{file} is not UTF-8 (first other character on line {line}); "
     "it was read as Latin-1. If letters look wrong, save the file as CSV UTF-8 and open it "
     "again.", "Save as 'CSV UTF-8' in the spreadsheet program."),
    ("read.xls_text", "warning", "{file} is named .xls but holds a text table; it was read "
     "as text. Check the preview, or save it as .xlsx in the spreadsheet program.",
     "Some systems export text under an .xls name; check the columns look right."),
    ("read.layout", "note", "{file} was read with {delimiter} between cells and {decimal} as "
     "the decimal mark.", "Check the preview if the numbers look wrong."),
    ("read.title_rows", "warning", "{where}: {lines} hold a title ({title!r}), not column "
     "names; the header was taken from row {header_row}. If that is wrong, delete the title "
     "rows in the spreadsheet.", "Check that the right row was taken as the header."),
    ("read.no_header", "refused", "{where}: row {row}, where the column names should be, "
     "holds only numbers ({examples}); add a row of column names at the top of the table.",
     "Every column needs a name in the first row of the table."),
    ("read.ragged", "refused", "{file}: line {line} has {saw} cells but the header has "
     "{expected}. The table uses {delimiter} between cells; check that line for an extra "
     "delimiter (a text cell holding one must be in double quotes) and save again.",
     "Open the file in a text editor at that line, or save the sheet again as CSV."),
    ("read.open_quote", "refused", "{file}: a double quote opened on line {line} is never "
     "closed, so the rest of the file would be one cell; close or remove that quote and save "
     "again.", "Look for a stray \" in that line of the file."),
    ("read.unparseable", "refused", "{file} could not be read as a table ({detail}); save "
     "the sheet again as CSV (UTF-8) or XLSX and open that.",
     "Re-export the table from the program that made it."),
    ("read.repeated_header", "warning", "{where}: {n} row(s) repeating the column names{rows} "
     "were left out (two exports pasted together?); check that the rows below them belong to "
     "this table.",
     "A copy of the header row inside the table would be read as a patient; if the rows "
     "below it come from another export, check they use the same columns."),
    ("read.stray_bom", "warning", "{file}: an invisible byte-order mark inside the "
     "file{rows} was taken out (two exports pasted together?); check those rows "
     "belong to this table.",
     "A byte-order mark belongs only at the very start of a file; inside it, it would make "
     "'yes' and 'yes' with an invisible mark two different answers."),
    ("read.nul_bytes", "warning", "{file}: NUL bytes{rows} were taken out (the export "
     "may be damaged); check those rows against the original.",
     "A NUL byte is never part of a spreadsheet cell; export the table again if rows look "
     "wrong."),
    ("read.line_too_long", "refused", "{file}: row {row} runs on for more than {mb} MB "
     "without a line break, so reading stopped there; the file has lost its line breaks or is "
     "not a table: save the sheet again as CSV or XLSX and open that.",
     "Open the file in a text editor to see what it holds, or export the table again."),
    ("read.too_big", "refused", "{file} is too large for this computer's memory; split it "
     "into smaller files or leave out columns you do not need.",
     "Close other programs, or keep only the columns you need."),
    ("read.empty_columns", "note", "{where}: {n} empty column(s) without a header were left "
     "out (column {columns}).", "Nothing to do."),
    ("read.empty_rows", "note", "{where}: {n} empty row(s) were left out{rows}.",
     "Nothing to do."),
    ("read.no_columns", "refused", "{where} holds no columns; choose a file that holds a "
     "table.", "Choose the file or sheet that holds the data."),
    ("read.long_header", "refused", "{where}: the header of column {column} is {length} "
     "characters long, longer than Prunella can keep or print (at most {limit}); shorten it "
     "and save the file again.", "Give the column a short header; put long explanations in "
     "the data dictionary's note."),
    ("read.blank_headers", "warning", "{where}: column(s) {columns} have no header; they "
     "were named 'column …'. Give every column a header in the spreadsheet to name them "
     "yourself.", "Type a name into each empty header cell."),
    ("read.duplicate_header", "warning", "{where}: the header {name!r} appears more than "
     "once; the repeat in column {column} was renamed {new!r}. Rename one of them in the "
     "spreadsheet.", "Give the two columns different names so you know which is which."),
    ("read.header_only", "refused", "{where} has a header but no rows of data; choose the "
     "file that holds the patients.", "Check that the export included the rows."),
    ("xlsx.damaged", "refused", "{file} could not be opened as an Excel workbook (the file "
     "is damaged, cut short, or not really XLSX); open it in the spreadsheet program and save "
     "it again, or save it as CSV.",
     "Copy the file again from its source; a download or copy may have been cut short."),
    ("xlsx.not_workbook", "refused", "{file} is a zip file but not an Excel workbook "
     "(perhaps another Office document); choose the XLSX file that holds the table.",
     "Choose the spreadsheet, not a document or presentation."),
    ("xlsx.no_sheets", "refused", "{file} holds no sheets; choose another workbook.",
     "Choose the workbook that holds the data."),
    ("xlsx.no_such_sheet", "refused", "{file} has no sheet called {sheet!r}; its sheets are: "
     "{sheets}.", "Give the sheet name exactly as shown on its tab."),
    ("xlsx.empty_sheet", "refused", "{where} is empty; choose the sheet that holds the table.",
     "Pick another sheet (--sheet NAME)."),
    ("xlsx.several_sheets", "warning", "{file} has {n} sheets; the first visible one, "
     "{sheet!r}, was read (the others: {others}). Choose another sheet by name if that is not "
     "the data.", "On the command line: --sheet NAME."),
    ("xlsx.two_header_rows", "warning", "{where}: the header is in two rows ({lines}, merged "
     "group names above column names); each column was named by joining the two.",
     "Check the column names; a single header row avoids this."),
    ("xlsx.merged_header", "warning", "{where}: header cells in row {row} are merged; each "
     "column of a merged cell was given its name (repeats renamed).",
     "Unmerge the header cells and give each column its own name."),
    ("xlsx.numbers_as_text", "note", "{where}: {n} number(s) in column {column!r} are stored "
     "as text (cells {cells}); they were read as numbers.",
     "Nothing to do; to tidy, convert the cells to numbers in the spreadsheet."),
    ("xlsx.error_cells", "warning", "{where}: {n} cell(s) hold a spreadsheet error such as "
     "#DIV/0! (cells {cells}); they were treated as not recorded. Correct the formulas if the "
     "values matter.", "Fix the formulas that fail, or leave the cells empty."),
    ("xlsx.hidden_rows", "warning", "{where}: {n} row(s) are hidden in the spreadsheet but "
     "were read like the others{rows}. Delete them in the spreadsheet if they should be left "
     "out.", "Hidden rows are often excluded patients: decide, and delete them if so."),
    ("xlsx.hidden_columns", "note", "{where}: column(s) {columns} are hidden in the "
     "spreadsheet but were read like the others.",
     "Nothing to do unless they should be left out."),
    ("xlsx.uncalculated", "warning", "{where}: {n} formula cell(s) have no saved result "
     "(cells {cells}); they were read as not recorded. Open the workbook in the spreadsheet "
     "program, let it calculate, save it and open it again.",
     "Files written by other programs may hold formulas that were never calculated."),
    ("xlsx.formulas", "note", "{where}: column(s) {columns} hold formulas; their saved "
     "results were read.", "Nothing to do; the results as last calculated were used."),
    ("values.thousands", "note", "{n} value(s) in {column} written with thousands separators "
     "(e.g. {example!r}){rows} were read as plain numbers.", "Nothing to do."),
    ("values.decimal_comma", "note", "{n} value(s) in {column} written with a decimal comma "
     "(e.g. {example!r}){rows} were read as decimals.", "Nothing to do."),
    ("values.limits", "warning", "{n} value(s) in {column} written as limits (e.g. "
     "{example!r}){rows} were read as the limit itself; check that this is acceptable for "
     "{column}.",
     "'<5' is read as 5 and '>100' as 100. If that is not acceptable, replace them with "
     "agreed values or leave the column out."),
    ("values.percent", "note", "{n} value(s) in {column} written with a % sign (e.g. "
     "{example!r}){rows} were read as the number before it.", "Nothing to do."),
    ("values.units", "warning", "{column}: units were written in the cells ({unit}){rows}, "
     "e.g. {example!r}; {n} value(s) were read as numbers in {unit}.",
     "Check that every value of the column is in {unit}; a column header such as "
     "'Temperature (°C)' keeps the unit out of the cells."),
    ("values.mixed_units", "warning", "{column} writes its values in different units "
     "({units}) in {n} cell(s){rows}; Prunella does not convert units, so the column is read "
     "as text and left out. Convert them to one unit (or one column per unit) to use it.",
     "Convert every value to one unit in the spreadsheet, then open it again."),
    ("values.unit_disagrees", "refused", "{column}: the cells write {found}, but the "
     "column's unit is {unit}, and Prunella does not convert units; convert the values to "
     "{unit} (or correct the column's unit in the data dictionary) and try again.",
     "Write every value in the unit the tree was grown with."),
    ("values.infinite", "warning", "{n} infinite value(s) in {column}{rows} were treated as "
     "not recorded; correct them in the spreadsheet if they stand for real values.",
     "Infinite values usually come from a division by zero in a formula."),
    ("values.huge", "warning", "{n} value(s) in {column}{rows} are too large to compute with "
     "(beyond ±3.4e38) and were treated as not recorded; correct them in the spreadsheet.",
     "Such numbers are usually typing or export errors."),
    ("values.not_numbers", "warning", "{n} cell(s) in {column} are not numbers (e.g. "
     "{examples}){rows} and were treated as not recorded; correct them or add them to the "
     "column's missing-value codes.",
     "Correct the cells, or list the words as missing-value codes in the data dictionary."),
    ("values.unknown_levels", "warning", "{n} cell(s) in {column} hold values that are not "
     "among its levels ({examples}){rows}; they were treated as not recorded. Add them to the "
     "levels in the data dictionary if they are real categories.",
     "Add the values to the column's levels, or correct their spelling."),
]
