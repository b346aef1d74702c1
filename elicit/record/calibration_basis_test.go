package record

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// basisWorkshop is the invented valve workshop with performance weights
// applied (set 1, with their basis), a prior agreed from the pool under
// them, then custom weights as typed (set 2, in force).
func basisWorkshop(t *testing.T, revealed bool) (workshop.Snapshot, workshop.WeightBasis) {
	t.Helper()
	src := workshoptest.ValveWear(revealed)
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
	p, err := workshop.ScorePerformance(set, nil)
	if err != nil {
		t.Fatal(err)
	}
	b := workshop.NewWeightBasis(set, p)
	perf := workshop.Weights{ID: 1, WorkshopID: 9, Scheme: workshop.WeightsPerformance, ByExpert: p.WeightsByExpert(), Reason: "scored", At: t0, Basis: &b}
	custom := workshop.Weights{ID: 2, WorkshopID: 9, Scheme: workshop.WeightsCustom, ByExpert: map[int64]float64{1: 2, 2: 0.5, 3: 1}, Reason: "as typed", At: t0.Add(time.Minute)}
	src.WeightHistory = []workshop.Weights{perf, custom}
	src.Weights = custom
	src.Priors = []workshop.AgreedPrior{{ID: 1, QuestionID: 101, Source: workshop.PriorFromPool, Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 9}), Rationale: "pool", Round: 1, WeightSetID: 1, At: t0}}
	return src, b
}

func TestWeightBasisReproducesItsWeights(t *testing.T) {
	src, b := basisWorkshop(t, true)
	if b.Method != workshop.BasisClassicalModel || b.Overshoot != elicit.DefaultOvershoot || len(b.Questions) != 3 || len(b.CalibrationAnswers) != 9 {
		t.Fatalf("basis %+v", b)
	}
	// Each stored answer is the latest revision the scores used: A's
	// second answer to seed 1 (revision 2), not the first.
	for _, a := range b.CalibrationAnswers {
		if a.ExpertID == 1 && a.QuestionID == 102 && (a.RevisionID != 2 || !slices.Equal(a.Quantiles, []float64{0.10, 0.25, 0.50})) {
			t.Errorf("A's answer to seed 1: %+v", a)
		}
		if a.ExpertID == 4 {
			t.Error("the revoked expert's answer is in the basis")
		}
	}
	as, real, bounds, opt, err := b.ModelInput()
	if err != nil {
		t.Fatal(err)
	}
	sc, err := elicit.ClassicalModel(as, real, bounds, opt)
	if err != nil {
		t.Fatal(err)
	}
	w := b.WeightsByExpert()
	for _, e := range sc.Experts {
		var id int64
		for _, x := range b.Experts {
			if workshop.SeedExpertKey(x.ExpertID) == e.Expert {
				id = x.ExpertID
			}
		}
		if math.Abs(e.Weight-w[id]) > 1e-12 || math.Abs(e.Weight-src.WeightHistory[0].ByExpert[id]) > 1e-12 {
			t.Errorf("expert %s: recomputed weight %v, basis %v", e.Expert, e.Weight, w[id])
		}
	}
	if sc.Alpha != b.Alpha {
		t.Errorf("cut-off %v, basis %v", sc.Alpha, b.Alpha)
	}
	rec, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	if err := rec.Validate(); err != nil {
		t.Fatalf("record with a weight history: %v", err)
	}
	if err := compileSchema(t).Validate(asJSONValue(t, rec)); err != nil {
		t.Fatalf("record with a weight history does not match the schema: %v", err)
	}
}

func TestRecordWithholdsUnrevealedTruthsInABasis(t *testing.T) {
	src, _ := basisWorkshop(t, false)
	rec, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	b := rec.WeightHistory[0].Basis
	for _, q := range b.Questions {
		if q.TrueValue != nil || !q.TrueValueWithheld {
			t.Errorf("question %d: true value %v shown before the reveal", q.QuestionID, q.TrueValue)
		}
	}
	if _, _, _, _, err := b.ModelInput(); err == nil {
		t.Error("a basis with withheld true values gave a model input")
	}
	// The source's own basis is untouched.
	if src.WeightHistory[0].Basis.Questions[0].TrueValue == nil {
		t.Error("building the record withheld the stored true value")
	}
	if err := rec.Validate(); err != nil {
		t.Fatal(err)
	}
	if err := compileSchema(t).Validate(asJSONValue(t, rec)); err != nil {
		t.Fatalf("record with withheld truths does not match the schema: %v", err)
	}
}

func TestValidateRefusesABrokenWeightHistory(t *testing.T) {
	cases := []struct {
		name, field string
		edit        func(r *Record)
	}{
		{"answer of an unknown revision", "weight_history[0].basis.calibration_answers[0].revision_id", func(r *Record) {
			r.WeightHistory[0].Basis.CalibrationAnswers[0].RevisionID = 999
		}},
		{"answer from another expert's revision", "weight_history[0].basis.calibration_answers[0].revision_id", func(r *Record) {
			r.WeightHistory[0].Basis.CalibrationAnswers[0].RevisionID = 5
		}},
		{"quantiles that the revision did not save", "weight_history[0].basis.calibration_answers[0].quantiles", func(r *Record) {
			r.WeightHistory[0].Basis.CalibrationAnswers[0].Quantiles = []float64{0.1, 0.2, 0.3}
		}},
		{"a target question scored", "weight_history[0].basis.calibration_questions[0].question_id", func(r *Record) {
			r.WeightHistory[0].Basis.Questions[0].QuestionID = 101
		}},
		{"an unknown expert", "weight_history[0].basis.experts[0].expert_id", func(r *Record) {
			r.WeightHistory[0].Basis.Experts[0].ExpertID = 77
		}},
		{"weights that are not the basis's", "weight_history[0].basis.experts[0].weight", func(r *Record) {
			r.WeightHistory[0].ByExpert = map[int64]float64{1: 1, 2: 1, 3: 1}
		}},
		{"a basis on custom weights", "weight_history[1].basis", func(r *Record) {
			r.WeightHistory[1].Basis = r.WeightHistory[0].Basis
		}},
		{"a cut-off rule unknown", "weight_history[0].basis.alpha_rule", func(r *Record) {
			r.WeightHistory[0].Basis.AlphaRule = "best"
		}},
		{"history out of order", "weight_history[1].id", func(r *Record) {
			r.WeightHistory[0], r.WeightHistory[1] = r.WeightHistory[1], r.WeightHistory[0]
		}},
		{"weights in force not the last set", "weights.id", func(r *Record) { r.Weights.ID = 1 }},
		{"a set named but no history", "weights.id", func(r *Record) { r.WeightHistory = nil }},
		{"a prior under an unknown set", "questions[0].prior_history[0].weight_set_id", func(r *Record) {
			r.Questions[0].PriorHistory[0].WeightSetID = 5
		}},
	}
	for _, c := range cases {
		src, _ := basisWorkshop(t, true)
		rec, err := Build(src, t0)
		if err != nil {
			t.Fatal(err)
		}
		// Edit deep copies, so one case cannot leak into the next.
		b := *rec.WeightHistory[0].Basis
		b.CalibrationAnswers = append([]workshop.BasisAnswer(nil), b.CalibrationAnswers...)
		b.Questions = append([]workshop.BasisQuestion(nil), b.Questions...)
		b.Experts = append([]workshop.PerformanceExpert(nil), b.Experts...)
		rec.WeightHistory[0].Basis = &b
		c.edit(&rec)
		err = rec.Validate()
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("%s: got %v, want an error at %s", c.name, err, c.field)
		}
	}
	// A basis whose true value the record does not reveal is refused: the
	// record never carries a hidden truth.
	src, _ := basisWorkshop(t, false)
	rec, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	tv := 0.3
	rec.WeightHistory[0].Basis.Questions[0].TrueValue = &tv
	var ie *elicit.InputError
	if err := rec.Validate(); !errors.As(err, &ie) || !strings.HasSuffix(ie.Field, "calibration_questions[0].true_value") {
		t.Errorf("hidden truth in a basis: %v", err)
	}
}

// TestForQuestionKeepsTheEvidenceBehindItsWeights: one question's record
// under performance weights carries the calibration questions and the
// answers their basis scored, and is a valid record on its own.
func TestForQuestionKeepsTheEvidenceBehindItsWeights(t *testing.T) {
	src, b := basisWorkshop(t, true)
	// A scored answer's reason withheld, with its event: the narrowed
	// record keeps the event with the answer.
	for i, rv := range src.Revisions {
		if rv.ID == b.CalibrationAnswers[0].RevisionID {
			src.Revisions[i].Reason, src.Revisions[i].ReasonWithheld = "names a supplier (invented)", true
			src.Events = append(src.Events, workshop.Event{ID: 1, WorkshopID: 9, QuestionID: rv.QuestionID, Kind: workshop.EventReasonWithheld,
				At: t0, Reason: "names a supplier", Detail: fmt.Sprintf(`{"revision_id":%d}`, rv.ID)})
		}
	}
	rec, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	one, err := rec.ForQuestion(101)
	if err != nil {
		t.Fatal(err)
	}
	if err := one.Validate(); err != nil {
		t.Fatalf("one question's record is not valid on its own: %v", err)
	}
	ids := map[int64]bool{}
	for _, q := range one.Questions {
		ids[q.ID] = true
	}
	if len(one.Questions) != 6 || !ids[101] || !ids[102] || !ids[103] || !ids[104] || !ids[105] || !ids[106] {
		t.Errorf("questions %v, want the target, the three scored calibration questions and the two left out", ids)
	}
	target := 0
	for _, rv := range one.Revisions {
		if rv.QuestionID == 101 {
			target++
		}
	}
	if target != 3 || len(one.Revisions) != 3+len(b.CalibrationAnswers) {
		t.Errorf("%d revisions (%d on the target), want the target's 3 and the %d scored", len(one.Revisions), target, len(b.CalibrationAnswers))
	}
}

// A withdrawn answer to a calibration question the basis did not score:
// one question's record leaves the revision out, and its withdrawal's
// event with it, so the narrowed record still reads back (a withdrawal
// naming a revision the record lacks is refused).
func TestForQuestionLeavesOutTheWithdrawalOfARevisionItLeavesOut(t *testing.T) {
	src, b := basisWorkshop(t, true)
	scored := map[int64]bool{}
	for _, a := range b.CalibrationAnswers {
		scored[a.RevisionID] = true
	}
	var extra workshop.Revision
	var top int64
	for _, rv := range src.Revisions {
		top = max(top, rv.ID)
		if scored[rv.ID] && extra.ID == 0 {
			extra = rv
		}
	}
	extra.ID, extra.Withdrawn, extra.At, extra.Kept = top+1, true, extra.At.Add(time.Minute), nil
	src.Revisions = append(src.Revisions, extra)
	src.Events = append(src.Events, workshop.Event{ID: 1, WorkshopID: 9, QuestionID: extra.QuestionID, Kind: workshop.EventRevisionWithdrawn,
		At: extra.At.Add(time.Minute), Reason: "entered against the wrong expert (invented)",
		Detail: fmt.Sprintf(`{"revision_id":%d,"expert_id":%d,"round":%d}`, extra.ID, extra.ExpertID, extra.Round)})
	rec, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	if err := rec.CheckDefinitions(); err != nil {
		t.Fatalf("the whole record: %v", err)
	}
	one, err := rec.ForQuestion(101)
	if err != nil {
		t.Fatal(err)
	}
	for _, rv := range one.Revisions {
		if rv.ID == extra.ID {
			t.Fatalf("one question's record keeps the withdrawn revision %d, which its basis did not score", extra.ID)
		}
	}
	if err := one.CheckDefinitions(); err != nil {
		t.Fatalf("one question's record: %v", err)
	}
	if err := one.Validate(); err != nil {
		t.Fatalf("one question's record is not valid on its own: %v", err)
	}
}
