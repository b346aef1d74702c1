package answersheet

import (
	"crypto/sha256"
	"encoding/hex"
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
