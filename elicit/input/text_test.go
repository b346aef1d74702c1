package input

import "testing"

// A text area's line breaks arrive as CR LF (HTML's form encoding) and
// are kept and counted as one newline each, as the page counts them.
func TestTextLineBreaksAreOneCharacter(t *testing.T) {
	got, err := Text("reason", " two\r\nlines\r\n ", 9, false)
	if err != nil || got != "two\nlines" {
		t.Fatalf("Text of CR LF lines: %q, %v", got, err)
	}
	if _, err := Text("reason", "ab\r\ncd", 5, false); err != nil {
		t.Errorf("five characters with a CR LF line break are refused at a limit of 5: %v", err)
	}
}
