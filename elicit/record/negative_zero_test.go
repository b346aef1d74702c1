package record

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// TestFitsOfANegativeZeroBoundAreOnZero: a record's question with
// "lower": -0, as a hand edit or another tool writes it, was kept 0 by
// the store, but its revisions' fits were made on [-0, 1], kept so and
// exported back as "lower": -0. The fits import keeps are on [0, 1]; the
// facts stay as read, since the chain tells -0 from 0.
func TestFitsOfANegativeZeroBoundAreOnZero(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "fingerprint", "pump_seals.json"))
	if err != nil {
		t.Fatal(err)
	}
	b = bytes.Replace(b, []byte(`"lower": 0,`), []byte(`"lower": -0,`), 1)
	c, err := ParseChecked(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Fits) == 0 {
		t.Fatal("no fits")
	}
	for i, f := range c.Fits {
		if math.Signbit(f.Dist.Lower) {
			t.Errorf("fit %d made on [%v, %v]", i, f.Dist.Lower, f.Dist.Upper)
		}
	}
}
