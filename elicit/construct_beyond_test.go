package elicit

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// TestLogTinyQuantileAgainstR: where a Beta quantile is tiny but still a
// double (1e-300 to 1e-100), ln x from the leading term at 0 (DLMF 8.17.8)
// agrees with R 4.2.2's log(qbeta(p, α, β))
// (testdata/r/tiny_quantile_reference.R), so it can be trusted below the
// double range, where R's qbeta too gives 0.
func TestLogTinyQuantileAgainstR(t *testing.T) {
	rows := referenceTable(t, "../testdata/r/tiny_quantile_reference.csv", "# R version", 4)
	for _, c := range rows {
		var v [4]float64
		for i := range v {
			var err error
			if v[i], err = strconv.ParseFloat(c[i], 64); err != nil {
				t.Fatal(err)
			}
		}
		d, p, want := Beta{Alpha: v[0], Beta: v[1]}, v[2], v[3]
		// 1e-9 relative, the envelope's quantile accuracy in log x.
		if got := logTinyQuantile(d, p); math.Abs(got-want) > 1e-9*math.Abs(want) {
			t.Errorf("Beta(%v, %v) at %v: ln x = %v, R %v", d.Alpha, d.Beta, p, got, want)
		}
	}
	if len(rows) < 20 {
		t.Fatalf("only %d rows", len(rows))
	}
}

// TestPercentilesBeyondDoubleAreSaid: mean 0.5 and sd 0.4999 make
// Beta(2.0006e-4, 2.0006e-4), whose 5% point is about 3.2e-4999 (log10
// −4998.5002 by DLMF 8.17.8's leading term, evaluated in R 4.2.2 as
// (log(0.05) + log(a) + lbeta(a, a))/a/log(10)) and its 95% point 1 minus
// that. A double holds them as 0 and 1; the construction says so, with
// the values. An ordinary U-shaped prior, Beta(0.117, 0.117), says
// nothing of the kind; nor does one on wider bounds whose points are
// held.
func TestPercentilesBeyondDoubleAreSaid(t *testing.T) {
	c, err := Construct(ConstructionInput{Method: MethodMeanSD, Mean: 0.5, SD: 0.4999, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if q := c.Dist.Quantile(0.05); q != 0 {
		t.Fatalf("5%% point %v: the case no longer underflows", q)
	}
	m := warningMessage(c.Warnings, WarnBeyondDouble)
	for _, want := range []string{"5% point is about 3.2e-4999", "95% point is about 1 − 3.2e-4999", "shown as its bound"} {
		if !strings.Contains(m, want) {
			t.Errorf("warning %q lacks %q", m, want)
		}
	}
	if strings.Contains(m, "50%") {
		t.Errorf("warning %q names the median, which is 0.5", m)
	}
	scaled, err := Construct(ConstructionInput{Method: MethodMeanSD, Mean: 50, SD: 49.99, Lower: 0, Upper: 100})
	if err != nil {
		t.Fatal(err)
	}
	if m := warningMessage(scaled.Warnings, WarnBeyondDouble); !strings.Contains(m, "of the range above the lower bound") {
		t.Errorf("scaled: warning %q", m)
	}
	plain, err := Construct(ConstructionInput{Method: MethodMeanSD, Mean: 0.5, SD: 0.45, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if m := warningMessage(plain.Warnings, WarnBeyondDouble); m != "" {
		t.Errorf("Beta(0.117, 0.117) warns %q", m)
	}
}

func warningMessage(ws []Warning, code WarningCode) string {
	for _, w := range ws {
		if w.Code == code {
			return w.Message
		}
	}
	return ""
}
