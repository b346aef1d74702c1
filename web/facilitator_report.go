package web

import (
	"net/http"
	"strconv"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// reportView is the printable record of a workshop, drawn from the same
// record.Record the JSON and CSV exports carry.
type reportView struct {
	Record  record.Record
	Experts map[int64]workshop.Expert
	Charts  map[int64]picture
	Sheets  map[int64]workshop.SheetSource // which answer sheet and row a judgement came from
	// Chain is the record's fingerprint chain, printed with the log.
	Chain fingerprint.Chain
	// Percent holds the revisions typed in percentages, whose values the
	// report writes as typed (9%, not 0.09).
	Percent map[int64]bool
	// Withdrawn are the withdrawal events of the withdrawn revisions.
	Withdrawn map[int64]workshop.Event
}

func (s *Server) report(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	rec, err := s.record(r.Context(), ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v := reportView{Record: rec, Experts: map[int64]workshop.Expert{}, Charts: map[int64]picture{},
		Chain: fingerprint.Of(rec.Facts()), Withdrawn: workshop.Withdrawals(rec.Events)}
	for _, e := range rec.Experts {
		v.Experts[e.ID] = e
	}
	revs := make([]workshop.Revision, len(rec.Revisions))
	v.Percent = map[int64]bool{}
	for i, rv := range rec.Revisions {
		revs[i] = rv.Revision
		if rv.Answer.Percent {
			v.Percent[rv.ID] = true
		}
	}
	v.Sheets = workshop.SheetSources(rec.Events, revs)
	for _, q := range rec.Questions {
		v.Charts[q.ID] = reportChart(q, v.Experts, rec.Weights.Scheme)
	}
	m := facilitatorMeta(ws, "Report: "+ws.Title, "report")
	m.Caution = true
	s.renderPage(w, r, http.StatusOK, m, reportPage(v))
}

// reportChart draws a question's pooled experts' current fits (every
// active expert's where there is no pool), their linear pool (elicit.LinearPool with the record's normalised weights) and
// the agreed prior; a large panel gets the strip of intervals (picture).
// scheme names the pool.
func reportChart(q record.Question, experts map[int64]workshop.Expert, scheme workshop.WeightScheme) picture {
	frame := chart.PanelView{ID: "report-q" + strconv.FormatInt(q.ID, 10) + "-chart", Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper}
	fits := map[int64]elicit.ScaledBeta{}
	for _, cf := range q.CurrentFits {
		if cf.Fit != nil {
			fits[cf.ExpertID] = cf.Fit.Dist
		}
	}
	var names []string
	var dists []elicit.ScaledBeta
	var summary []chart.Curve
	if q.Pool != nil {
		var weights []float64
		for _, ew := range q.Pool.Weights {
			d, ok := fits[ew.ExpertID]
			if !ok {
				continue
			}
			names, dists, weights = append(names, experts[ew.ExpertID].Name), append(dists, d), append(weights, ew.Weight)
		}
		if pool, err := elicit.LinearPool(dists, weights); err == nil {
			summary = append(summary, chart.Curve{Label: scheme.PoolName(), Role: chart.RolePool, Dist: chart.Pool{Pool: pool}})
		}
	}
	if q.Pool == nil {
		// No pool (every answerer at weight 0): the answers are still
		// drawn, as the panel draws them.
		for _, cf := range q.CurrentFits {
			if e, ok := experts[cf.ExpertID]; ok && cf.Fit != nil && !e.Revoked {
				names, dists = append(names, e.Name), append(dists, cf.Fit.Dist)
			}
		}
	}
	if a := q.AgreedPrior; a != nil {
		summary = append(summary, chart.Curve{Label: "Agreed prior", Role: chart.RoleAgreed, Dist: a.Dist})
	}
	return panelPicture(frame, names, dists, summary)
}

// poolError says why question q has no pool. The record keeps the
// reason as the error's text; when it is workshop.ErrNoWeight the report
// names the experts whose weight is 0, as the panel does (noWeightText).
func (v reportView) poolError(q record.Question) string {
	if q.PoolError != workshop.ErrNoWeight.Error() {
		return "The pool cannot be formed: " + q.PoolError
	}
	var names []string
	for _, cf := range q.CurrentFits {
		if e := v.Experts[cf.ExpertID]; cf.Fit != nil && !e.Revoked {
			names = append(names, v.name(cf.ExpertID))
		}
	}
	return noWeightText(names, v.Record.Weights.Scheme, q.Question.Frozen())
}

// reportProvenance is a facilitator's entry as the report's history says
// it beside the expert's name: "entered by the facilitator, from a paper
// form; answer sheet answers.csv, row 3".
func reportProvenance(rv workshop.Revision, sheets map[int64]workshop.SheetSource) string {
	p := "entered by the " + provenance(rv)
	if src, ok := sheets[rv.ID]; ok {
		p += "; " + sheetRowLabel(src)
	}
	return p
}
