package main

import (
	"strconv"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The study page, the report and the record show workshop.StudyUpdate;
// for the same prior and data totals it gives `parley update`'s numbers,
// every one of them, whether the data came in one batch or several.
func TestUpdateAgreesWithTheStudyPage(t *testing.T) {
	q := workshop.Question{ID: 1, Lower: 0, Upper: 1}
	for _, c := range []struct {
		alpha, beta string
		batches     [][2]int
	}{
		{"2.1", "48", [][2]int{{3, 120}}},
		{"2.9505311711722633", "55.560337312905354", [][2]int{{3, 120}, {5, 80}}},
		{"0.5", "0.5", [][2]int{{0, 10}, {0, 7}}},
		{"30", "3", [][2]int{{1, 40}}}, // data in conflict with the prior
	} {
		var data []workshop.StudyData
		s, n := 0, 0
		for _, b := range c.batches {
			data = append(data, workshop.StudyData{QuestionID: 1, Successes: b[0], Trials: b[1]})
			s, n = s+b[0], n+b[1]
		}
		cli, err := updateCommand(c.alpha, c.beta, itoa(s), itoa(n), "0.95", "json")
		if err != nil {
			t.Fatal(err)
		}
		u, err := workshop.StudyUpdate(q, workshop.AgreedPrior{Dist: elicit.Unit(cli.Prior)}, data)
		if err != nil {
			t.Fatal(err)
		}
		if u.Posterior.Alpha != cli.Alpha || u.Posterior.Beta != cli.Beta || u.Mean != cli.Mean || u.SD != cli.SD ||
			u.Interval != cli.Interval || u.HDI != cli.HDI || cli.Conflict == nil || u.Conflict != *cli.Conflict || u.Level != cli.Level {
			t.Errorf("Beta(%s, %s) with %v: study page %+v, parley update %+v", c.alpha, c.beta, c.batches, u, cli)
		}
	}
}

func itoa(n int) string { return strconv.Itoa(n) }
