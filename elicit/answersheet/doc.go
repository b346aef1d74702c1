// Package answersheet reads an answer sheet: a CSV of experts' judgements that
// the facilitator imports on their behalf (parley import-answers, and the
// upload on the workshop's pages), checked row by row against a
// workshop's questions and panel by the expert form's own rules.
//
// It is a package of its own, beside record, rather than part of
// workshop: like the record, a sheet is a file format over the workshop's
// types (its columns, its rows as a spreadsheet numbers them, its
// messages naming a row and a column), which the workshop itself never
// needs. The number rules it shares with the expert's form are
// workshop's (ParseAnswerNumber, ParseConfidence, KeptInPercent). It does
// no I/O beyond the reader it is given: saving the rows is the store's,
// and RefusalAtRow names the row a store's refusal concerns.
package answersheet
