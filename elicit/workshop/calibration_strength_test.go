package workshop_test

import (
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

func warningSet(ws []elicit.Warning) map[elicit.WarningCode]string {
	m := map[elicit.WarningCode]string{}
	for _, w := range ws {
		m[w.Code] = w.Message
	}
	return m
}

func TestCalibrationWarnings(t *testing.T) {
	ex := func(name string, answered int, weight float64) workshop.PerformanceExpert {
		return workshop.PerformanceExpert{Name: name, Answered: answered, Weight: weight}
	}
	cases := []struct {
		name    string
		scored  int
		experts []workshop.PerformanceExpert
		want    []elicit.WarningCode
	}{
		{"ten questions, shared weight, equal answers", 10, []workshop.PerformanceExpert{ex("Ann", 10, 0.5), ex("Ben", 10, 0.5)}, nil},
		{"nine questions", 9, []workshop.PerformanceExpert{ex("Ann", 9, 0.5), ex("Ben", 9, 0.5)}, []elicit.WarningCode{workshop.WarnFewCalibrationQuestions}},
		{"one question", 1, []workshop.PerformanceExpert{ex("Ann", 1, 0.5), ex("Ben", 1, 0.5)}, []elicit.WarningCode{workshop.WarnFewCalibrationQuestions}},
		{"exactly 90% is not more than 90%", 12, []workshop.PerformanceExpert{ex("Ann", 12, 0.9), ex("Ben", 12, 0.1)}, nil},
		{"just above 90%", 12, []workshop.PerformanceExpert{ex("Ann", 12, 0.9000001), ex("Ben", 12, 0.0999999)}, []elicit.WarningCode{workshop.WarnOneExpertDominates}},
		{"all the weight", 12, []workshop.PerformanceExpert{ex("Ann", 12, 0), ex("Ben", 12, 1)}, []elicit.WarningCode{workshop.WarnOneExpertDominates}},
		{"unequal answers", 12, []workshop.PerformanceExpert{ex("Ann", 12, 0.5), ex("Ben", 11, 0.5)}, []elicit.WarningCode{workshop.WarnUnequalCalibrationAnswers}},
		{"an expert who answered none", 12, []workshop.PerformanceExpert{ex("Ann", 12, 1), ex("Ben", 0, 0)},
			[]elicit.WarningCode{workshop.WarnOneExpertDominates, workshop.WarnUnequalCalibrationAnswers}},
		{"a panel of one", 3, []workshop.PerformanceExpert{ex("Ann", 3, 1)}, []elicit.WarningCode{workshop.WarnFewCalibrationQuestions, workshop.WarnOneExpertDominates}},
	}
	for _, c := range cases {
		got := workshop.CalibrationWarnings(c.scored, c.experts)
		set := warningSet(got)
		if len(got) != len(c.want) {
			t.Errorf("%s: %v, want codes %v", c.name, got, c.want)
			continue
		}
		for _, code := range c.want {
			if set[code] == "" {
				t.Errorf("%s: no %s warning in %v", c.name, code, got)
			}
		}
	}
}

func TestCalibrationWarningsSayTheFigures(t *testing.T) {
	got := warningSet(workshop.CalibrationWarnings(4, []workshop.PerformanceExpert{
		{Name: "Ines", Answered: 4, Weight: 1}, {Name: "Tomas", Answered: 3}, {Name: "Priya", Answered: 3}, {Name: "Ole", Answered: 4},
	}))
	for code, want := range map[elicit.WarningCode][]string{
		workshop.WarnFewCalibrationQuestions:   {"Only 4 calibration questions were scored", "Cooke & Goossens (2008) recommend about 10"},
		workshop.WarnOneExpertDominates:        {"Ines has 100% of the weight (more than 90%)"},
		workshop.WarnUnequalCalibrationAnswers: {"(Ines 4, Tomas 3, Priya 3, Ole 4)", "4 scored calibration questions"},
	} {
		for _, w := range want {
			if !strings.Contains(got[code], w) {
				t.Errorf("%s: %q lacks %q", code, got[code], w)
			}
		}
	}
	if m := warningSet(workshop.CalibrationWarnings(1, []workshop.PerformanceExpert{{Name: "A", Answered: 1, Weight: 0.5}, {Name: "B", Answered: 1, Weight: 0.5}})); !strings.Contains(m[workshop.WarnFewCalibrationQuestions], "Only 1 calibration question was scored") {
		t.Errorf("one question: %q", m[workshop.WarnFewCalibrationQuestions])
	}
	if m := warningSet(workshop.CalibrationWarnings(12, []workshop.PerformanceExpert{{Name: "A", Answered: 12, Weight: 0.9049}, {Name: "B", Answered: 12, Weight: 0.0951}})); !strings.Contains(m[workshop.WarnOneExpertDominates], "A has 90.5% of the weight") {
		t.Errorf("90.49%%: %q", m[workshop.WarnOneExpertDominates])
	}
}

// TestScorePerformanceStatesItsStrength: the invented valve workshop has
// three scored questions, so its scores carry the few-questions warning;
// with the optimised cut-off its best-calibrated expert takes all the
// weight, and everyone answered all three.
func TestScorePerformanceStatesItsStrength(t *testing.T) {
	src := workshoptest.ValveWear(true)
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	p, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		t.Fatal(err)
	}
	got := warningSet(p.Warnings)
	if !strings.Contains(got[workshop.WarnFewCalibrationQuestions], "Only 3 calibration questions") {
		t.Errorf("warnings %v", p.Warnings)
	}
	if _, ok := got[workshop.WarnUnequalCalibrationAnswers]; ok {
		t.Errorf("every expert answered all three: %v", p.Warnings)
	}
	top := 0.0
	for _, e := range p.Experts {
		top = max(top, e.Weight)
	}
	if _, ok := got[workshop.WarnOneExpertDominates]; ok != (top > workshop.DominantWeight) {
		t.Errorf("largest weight %v, dominance warning %v", top, ok)
	}
	// Without one expert's answer on one seed, the counts differ.
	var rs []workshop.Revision
	for _, rv := range src.Revisions {
		if !(rv.ExpertID == 3 && rv.QuestionID == 104) {
			rs = append(rs, rv)
		}
	}
	p, err = workshop.ScorePerformance(workshop.NewCalibrationSet(src.Questions, src.Experts, rs, false), nil)
	if err != nil {
		t.Fatal(err)
	}
	if m := warningSet(p.Warnings)[workshop.WarnUnequalCalibrationAnswers]; !strings.Contains(m, "(A 3, B 3, C 2)") {
		t.Errorf("unequal answers: %q", m)
	}
}

// A share is written with the figures that keep it on its own side of
// the threshold it is compared with, and short of 100% when it is short
// of all the weight (elicit.SideDigits): "90% of the weight (more than
// 90%)" contradicted itself, and "100%" beside a table that gives the
// others a share said something the numbers do not.
func TestDominanceWarningKeepsItsSide(t *testing.T) {
	for _, c := range []struct {
		weight float64
		want   string
	}{
		{0.9000001, "A has 90.00001% of the weight (more than 90%)"},
		{0.9004, "A has 90.04% of the weight (more than 90%)"},
		{0.9049, "A has 90.5% of the weight (more than 90%)"},
		{0.99996, "A has 99.996% of the weight (more than 90%)"},
		{1, "A has 100% of the weight (more than 90%)"},
	} {
		m := warningSet(workshop.CalibrationWarnings(12, []workshop.PerformanceExpert{
			{Name: "A", Answered: 12, Weight: c.weight}, {Name: "B", Answered: 12, Weight: 1 - c.weight}}))[workshop.WarnOneExpertDominates]
		if !strings.Contains(m, c.want) {
			t.Errorf("weight %v: %q lacks %q", c.weight, m, c.want)
		}
	}
}

// A panel of one has no other experts whose answers could barely count:
// the warning said they did. It says the pool is that expert's judgement
// alone, as the only expert on the panel. (Our wording, no source.)
func TestDominanceWarningOfAPanelOfOne(t *testing.T) {
	m := warningSet(workshop.CalibrationWarnings(3, []workshop.PerformanceExpert{{Name: "Ann", Answered: 3, Weight: 1}}))
	got := m[workshop.WarnOneExpertDominates]
	if strings.Contains(got, "other experts") {
		t.Errorf("a panel of one: %q speaks of other experts", got)
	}
	if !strings.Contains(got, "Ann is the only expert scored, so the performance-weighted pool is Ann's judgement alone") {
		t.Errorf("a panel of one: %q", got)
	}
}
