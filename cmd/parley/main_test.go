package main

import (
	"bytes"
	"strings"
	"testing"
)

// Flags with no command go to serve: `parley --addr X` is `parley serve --addr X`.
func TestDispatchFlagsOnlyMeanServe(t *testing.T) {
	var out, errb bytes.Buffer
	// A bad serve flag value proves the flags reached serve's own parser.
	code := dispatch([]string{"--tls-cert", "only-one.pem"}, strings.NewReader(""), &out, &errb)
	if code != exitBadInput || !strings.Contains(errb.String(), "parley serve") {
		t.Fatalf("flags alone: exit %d, stderr %q; want serve's own refusal", code, errb.String())
	}
}

func TestDispatchHelpAndUnknown(t *testing.T) {
	for _, args := range [][]string{{"help"}, {"-h"}, {"--help"}} {
		var out, errb bytes.Buffer
		if code := dispatch(args, strings.NewReader(""), &out, &errb); code != 0 || !strings.Contains(out.String(), "calibrate") {
			t.Errorf("%v: exit %d, usage %q", args, code, out.String())
		}
	}
	var out, errb bytes.Buffer
	if code := dispatch([]string{"fitt"}, strings.NewReader(""), &out, &errb); code != exitBadInput || !strings.Contains(errb.String(), `unknown command "fitt"`) {
		t.Errorf("unknown command: exit %d, stderr %q", code, errb.String())
	}
}
