package workshop

import (
	"maps"
	"slices"
	"testing"
)

// Current keeps each expert's highest-id revision of each question within
// a round cut-off, worked by hand on an invented history of three experts
// and two questions, given out of order.
func TestCurrent(t *testing.T) {
	revs := []Revision{
		{ID: 4, QuestionID: 1, ExpertID: 10, Round: 2},
		{ID: 1, QuestionID: 1, ExpertID: 10, Round: 1},
		{ID: 2, QuestionID: 1, ExpertID: 20, Round: 1},
		{ID: 3, QuestionID: 1, ExpertID: 10, Round: 1}, // 10 revises within round 1
		{ID: 5, QuestionID: 1, ExpertID: 30, Round: 2}, // 30 first answers in round 2
		{ID: 6, QuestionID: 1, ExpertID: 20, Round: 3},
		{ID: 7, QuestionID: 2, ExpertID: 10, Round: 1}, // another question
	}
	ids := func(m map[Key]Revision) []int64 {
		var out []int64
		for _, r := range m {
			out = append(out, r.ID)
		}
		slices.Sort(out)
		return out
	}
	for through, want := range map[int][]int64{1: {2, 3, 7}, 2: {2, 4, 5, 7}, 3: {4, 5, 6, 7}, 0: {4, 5, 6, 7}} {
		if got := ids(Current(revs, Through(through))); !slices.Equal(got, want) {
			t.Errorf("Current(Through(%d)) = %v, want %v", through, got, want)
		}
	}
	all := Current(revs, nil)
	if got := ids(all); !slices.Equal(got, []int64{4, 5, 6, 7}) {
		t.Errorf("Current(nil) = %v, want [4 5 6 7]", got)
	}
	if keys := slices.SortedFunc(maps.Keys(all), func(a, b Key) int { return int(a.Question*100 + a.Expert - b.Question*100 - b.Expert) }); !slices.Equal(keys,
		[]Key{{1, 10}, {1, 20}, {1, 30}, {2, 10}}) {
		t.Errorf("keys %v", keys)
	}
	if got := ids(Current(revs, func(rv Revision) bool { return rv.ID <= 3 })); !slices.Equal(got, []int64{2, 3}) {
		t.Errorf("Current(id ≤ 3) = %v, want [2 3]", got)
	}
}

// A withdrawn revision is nobody's answer: the expert's earlier revision
// is current again, and an expert with no other drops out; a withdrawn
// earlier revision leaves the current one as it was. Worked by hand.
func TestCurrentPassesOverWithdrawn(t *testing.T) {
	revs := []Revision{
		{ID: 1, QuestionID: 1, ExpertID: 10, Round: 1},
		{ID: 2, QuestionID: 1, ExpertID: 20, Round: 1, Withdrawn: true}, // 20's only answer
		{ID: 3, QuestionID: 1, ExpertID: 10, Round: 1, Withdrawn: true}, // 10's latest, withdrawn
		{ID: 4, QuestionID: 1, ExpertID: 30, Round: 1, Withdrawn: true}, // 30's earlier one
		{ID: 5, QuestionID: 1, ExpertID: 30, Round: 2},
	}
	cur := Current(revs, nil)
	if len(cur) != 2 || cur[Key{1, 10}].ID != 1 || cur[Key{1, 30}].ID != 5 {
		t.Errorf("Current = %v, want expert 10 at revision 1 and expert 30 at 5", cur)
	}
	if _, ok := cur[Key{1, 20}]; ok {
		t.Errorf("expert 20, whose one answer is withdrawn, has a current answer")
	}
	if got := Current(revs, Through(1)); len(got) != 1 || got[Key{1, 10}].ID != 1 {
		t.Errorf("Current(Through(1)) = %v, want only expert 10 at revision 1", got)
	}
}
