package chart

import (
	"bufio"
	"os"
	"strconv"
	"strings"
	"testing"
)

// TestTextEmIsNoNarrowerThanDejaVu: every character the font file lists
// (testdata/fonts/dejavu_advance_widths.txt, read from Debian's
// fonts-dejavu-core 2.37-6 by advance_widths.py) is at least as wide in
// TextEm as in the font, regular and bold, so a page laid out by it
// (the room's reasons) never finds its text wider than counted; and the
// punctuation of running text is counted at its own width, not a wide
// capital's, within 0.1 em.
func TestTextEmIsNoNarrowerThanDejaVu(t *testing.T) {
	f, err := os.Open("../../testdata/fonts/dejavu_advance_widths.txt")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	bold := false
	n := 0
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		switch {
		case strings.HasPrefix(line, "# DejaVuSans-Bold.ttf"):
			bold = true
			continue
		case strings.HasPrefix(line, "# DejaVuSans.ttf"):
			bold = false
			continue
		case strings.HasPrefix(line, "#") || line == "":
			continue
		}
		i := strings.LastIndexByte(line, ' ')
		// Python writes each character quoted: 'a', or "'".
		ch := line[1 : i-1]
		want, err := strconv.ParseFloat(line[i+1:], 64)
		if err != nil {
			t.Fatalf("%q: %v", line, err)
		}
		n++
		got := TextEm(ch, bold)
		if got < want {
			t.Errorf("TextEm(%q, bold %v) = %.4f, narrower than the font's %.4f", ch, bold, got, want)
		}
		if strings.ContainsAny(ch, `':;/()!?`) && got > want+0.1 {
			t.Errorf("TextEm(%q, bold %v) = %.4f, far wider than the font's %.4f", ch, bold, got, want)
		}
	}
	if n < 150 {
		t.Fatalf("read %d widths from the font file", n)
	}
}
