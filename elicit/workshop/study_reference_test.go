package workshop

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// studyReference reads testdata/scipy/posterior_summary_reference.csv,
// written by testdata/scipy/posterior_summary_reference.py with Debian's
// python3-scipy 1.10.1 (its first line names the version): for each
// invented case, its prior, its batches and SciPy's value of each number
// the study page shows.
type studyCase struct {
	name    string
	prior   elicit.Beta
	batches []StudyData
	want    map[string]float64
}

func studyReference(t *testing.T) []*studyCase {
	t.Helper()
	const path = "../../testdata/scipy/posterior_summary_reference.csv"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var cases []*studyCase
	byName := map[string]*studyCase{}
	sc := bufio.NewScanner(f)
	for line := 1; sc.Scan(); line++ {
		text := sc.Text()
		if line == 1 {
			if !strings.HasPrefix(text, "# scipy 1.10.1") {
				t.Fatalf("%s: the first line should name SciPy's version, got %q", path, text)
			}
			continue
		}
		c := strings.Split(text, ",")
		if len(c) != 6 {
			t.Fatalf("%s:%d: %d columns, want 6", path, line, len(c))
		}
		if line == 2 || c[0] == "planned study" {
			continue // the header; the planned-study rows are elicit's (TestPredictiveMomentsAgainstExact)
		}
		num := func(s string) float64 {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("%s:%d: %v", path, line, err)
			}
			return v
		}
		sc := byName[c[0]]
		if sc == nil {
			sc = &studyCase{name: c[0], prior: elicit.Beta{Alpha: num(c[1]), Beta: num(c[2])}, want: map[string]float64{}}
			for _, b := range strings.Split(c[3], "|") {
				s, n, _ := strings.Cut(b, ":")
				sv, err1 := strconv.Atoi(s)
				nv, err2 := strconv.Atoi(n)
				if err1 != nil || err2 != nil {
					t.Fatalf("%s:%d: batch %q", path, line, b)
				}
				sc.batches = append(sc.batches, StudyData{QuestionID: 7, Successes: sv, Trials: nv})
			}
			byName[c[0]] = sc
			cases = append(cases, sc)
		}
		sc.want[c[4]] = num(c[5])
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return cases
}

// TestStudyUpdateAgainstSciPy checks every number of the posterior summary
// the study page, the report, the record and `parley update` show
// (StudyUpdate) against SciPy 1.10.1 for invented priors and batches
// (testdata/scipy/posterior_summary_reference.py): the posterior by the
// conjugate update (BDA3 §2.4; the script checks its mean against
// quadrature of prior times likelihood), its mean and sd
// (scipy.stats.beta), the 95% equal-tailed interval (beta.ppf), the 95%
// highest-density interval (the shortest interval by
// scipy.optimize, or the interval from the bound for a density falling
// from it), and the conflict check's tails (scipy.stats.betabinom's cdf
// and the fsum of its pmf). Tolerances: the shapes exactly (sums of
// whole numbers and the prior's shapes), mean and sd 1e-12 relative, the
// equal-tailed ends 1e-9 relative (the envelope's quantile accuracy), the
// highest-density ends 1e-7 relative (the envelope's, see DEVELOPERS.md),
// the tails 1e-9 relative.
func TestStudyUpdateAgainstSciPy(t *testing.T) {
	cases := studyReference(t)
	if len(cases) < 8 {
		t.Fatalf("%d cases in the reference table", len(cases))
	}
	q := Question{ID: 7, Lower: 0, Upper: 1}
	for _, c := range cases {
		u, err := StudyUpdate(q, AgreedPrior{QuestionID: 7, Dist: elicit.Unit(c.prior)}, c.batches)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		check := func(kind string, got, tol float64) {
			t.Helper()
			want, ok := c.want[kind]
			if !ok {
				t.Fatalf("%s: no %s in the reference table", c.name, kind)
			}
			if math.Abs(got-want) > tol*math.Abs(want) {
				t.Errorf("%s: %s %.17g, SciPy %.17g", c.name, kind, got, want)
			}
		}
		check("post_alpha", u.Posterior.Alpha, 0)
		check("post_beta", u.Posterior.Beta, 0)
		check("mean", u.Mean, 1e-12)
		check("sd", u.SD, 1e-12)
		check("eqt_lo", u.Interval[0], 1e-9)
		check("eqt_hi", u.Interval[1], 1e-9)
		check("hdi_lo", u.HDI[0], 1e-7)
		check("hdi_hi", u.HDI[1], 1e-7)
		check("conflict_lower", u.Conflict.Lower, 1e-9)
		check("conflict_upper", u.Conflict.Upper, 1e-9)
		check("conflict_two_sided", u.Conflict.TwoSided, 1e-9)
	}
}

// TestSensitivityAgainstSciPy: the study page's comparison of priors
// (elicit.Sensitivity over ComparedPriors) gives each prior's posterior
// summary; for each invented case of
// testdata/scipy/posterior_summary_reference.py, with the batches' totals
// as the data, its row must be SciPy's, with the tolerances of
// TestStudyUpdateAgainstSciPy, and the data's share of the posterior mean
// must be n/(α + β + n) (the posterior mean is that mixture of the prior
// mean and s/n, BDA3 §2.4).
func TestSensitivityAgainstSciPy(t *testing.T) {
	cases := studyReference(t)
	var priors []elicit.NamedPrior
	for _, c := range cases {
		priors = append(priors, elicit.NamedPrior{Name: c.name, Prior: c.prior})
	}
	for _, c := range cases {
		s, n, _ := DataTotals(c.batches, 7)
		rows, err := elicit.Sensitivity(priors, s, n, UpdateLevel)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		var r *elicit.SensitivityRow
		for i := range rows {
			if rows[i].Name == c.name {
				r = &rows[i]
			}
		}
		if r == nil {
			t.Fatalf("%s: no row", c.name)
		}
		for _, v := range []struct {
			kind string
			got  float64
			tol  float64
		}{
			{"post_alpha", r.Posterior.Alpha, 0}, {"post_beta", r.Posterior.Beta, 0},
			{"mean", r.Mean, 1e-12}, {"sd", r.SD, 1e-12},
			{"eqt_lo", r.Interval[0], 1e-9}, {"eqt_hi", r.Interval[1], 1e-9},
			{"hdi_lo", r.HDI[0], 1e-7}, {"hdi_hi", r.HDI[1], 1e-7},
		} {
			if want := c.want[v.kind]; math.Abs(v.got-want) > v.tol*math.Abs(want) {
				t.Errorf("%s: %s %.17g, SciPy %.17g", c.name, v.kind, v.got, want)
			}
		}
		if want := float64(n) / (c.prior.Alpha + c.prior.Beta + float64(n)); math.Abs(r.DataShare-want) > 1e-15 {
			t.Errorf("%s: data share %v, want %v", c.name, r.DataShare, want)
		}
	}
}
