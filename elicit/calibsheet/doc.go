// Package calibsheet reads a calibration sheet: a CSV of experts'
// quantiles for calibration questions with each question's true value,
// which `parley calibrate` scores by Cooke's classical model.
//
// It is a package of its own, beside answersheet, as a file format over
// elicit's types (its header, its rows as the file numbers them, its
// messages naming a row and a column), which the classical model itself
// never needs. Read takes an io.Reader and returns the assessments keyed
// as elicit.ClassicalModel takes them, or the first broken rule as an
// *elicit.InputError naming the row and the column; Sheet.RowError names
// the row and column of the model's own refusals. It reads a
// spreadsheet's CSV as the answer sheet does (answersheet.InUTF16,
// SpreadsheetLines, OtherSeparator, CommentRows) and does no I/O beyond
// the reader it is given.
package calibsheet
