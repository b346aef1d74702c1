package answersheet

import (
	"crypto/sha256"
	"encoding/hex"

	"github.com/parley-elicit/parley/elicit/input"
)

// MaxBytes is the largest answer sheet Parley reads, uploaded, pasted or
// given to parley import-answers: a sheet at the most rows of ordinary
// rows fits well within it.
const MaxBytes = 1 << 20

// File is an answer sheet as received: its name (empty when it was
// pasted or read from standard input) and its text, whose SHA-256 the
// record keeps (workshop.SheetImport).
type File struct {
	Name string
	Text string
}

// SHA256 is the hex SHA-256 of the sheet's bytes.
func (f File) SHA256() string {
	sum := sha256.Sum256([]byte(f.Text))
	return hex.EncodeToString(sum[:])
}

// CheckName refuses a file name the record cannot carry: the name is
// kept in the decision log and the export, whose import refuses any text
// that is not plain (input.CheckChars). A sheet from a file named with an
// invisible text-direction override (U+202E) was saved, and the
// workshop's record could then not be imported back.
func (f File) CheckName() error {
	return input.CheckChars("file", f.Name)
}
