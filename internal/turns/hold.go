package turns

import "context"

// Hold is a request's turn, which its handler may step away from while it
// waits on something other than a CPU.
type Hold struct {
	t    *Turns
	p    Priority
	held bool // the turn is held
	away bool // the turn was given back by StepAway
}

// Take waits for a turn at priority p, as Acquire does, and returns it
// as a Hold; ok is false, and nothing held, when ctx is done first.
func (t *Turns) Take(ctx context.Context, p Priority) (h *Hold, ok bool) {
	if !t.Acquire(ctx, p) {
		return nil, false
	}
	return &Hold{t: t, p: p, held: true}, true
}

// Done gives back whatever the hold still has: its turn, or the place of
// a save still away at the database.
func (h *Hold) Done() {
	if h.held {
		h.t.Release(h.p)
		h.held = false
	}
	if h.away {
		h.t.Back(h.p)
		h.away = false
	}
}

type holdKey struct{}

// WithHold returns ctx carrying h, for StepAway and StepBack.
func WithHold(ctx context.Context, h *Hold) context.Context {
	return context.WithValue(ctx, holdKey{}, h)
}

// StepAway gives the turn held in ctx back while the handler waits on
// something other than a CPU (a database write waits on the disk and on
// other writers). Meanwhile other previews and saves may take the turn;
// pages may not, since the expert whose save this is will be back. A
// handler that has stepped away calls StepBack before it draws anything.
// Without a hold in ctx both do nothing.
func StepAway(ctx context.Context) {
	if h, _ := ctx.Value(holdKey{}).(*Hold); h != nil && h.held {
		h.t.Leave(h.p)
		h.held, h.away = false, true
	}
}

// StepBack takes a turn again at the hold's priority. It reports false,
// holding no turn, when ctx is done first; the handler should then stop.
func StepBack(ctx context.Context) bool {
	h, _ := ctx.Value(holdKey{}).(*Hold)
	if h == nil || h.held {
		return true
	}
	h.t.Back(h.p)
	h.away = false
	h.held = h.t.Acquire(ctx, h.p)
	return h.held
}
