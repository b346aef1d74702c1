package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/calibsheet"
)

func init() {
	command("calibrate", "score experts on calibration questions and weight them (--input FILE.csv, --alpha, --overshoot, --leave-one-out, --format)", runCalibrate)
}

func runCalibrate(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("calibrate", stderr)
	input := fs.String("input", "", "CSV `file` with header expert,question,realization,q05,q50,q95, optionally lower,upper after realization and background (uniform or log-uniform) before the quantiles (- for standard input)")
	alpha := fs.String("alpha", "", "fixed calibration cut-off in [0, 1] (default: the one that maximises the performance-weighted pool's score as if it were an expert)")
	overshoot := fs.String("overshoot", "", "widening k of each question's intrinsic range (default 0.1)")
	format := fs.String("format", "text", "text or json")
	loo := fs.Bool("leave-one-out", false, "also rerun without each calibration question and each expert and report the shift of the pooled 5/50/95 percentiles on the calibration questions")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if err := checkFormat(*format); err != nil {
		return fail(stderr, "calibrate", err)
	}
	var opt elicit.ModelOptions
	if *alpha != "" {
		a, err := number("alpha", *alpha)
		if err != nil {
			return fail(stderr, "calibrate", err)
		}
		opt.Alpha = &a
	}
	if *overshoot != "" {
		k, err := number("overshoot", *overshoot)
		if err != nil {
			return fail(stderr, "calibrate", err)
		}
		if !(k > 0) {
			return fail(stderr, "calibrate", badInput("overshoot", "must be greater than 0, got %v", k))
		}
		opt.Overshoot = k
	}
	if *input == "" {
		return fail(stderr, "calibrate", badInput("input", "a CSV file is required"))
	}
	r := stdin
	if *input != "-" {
		f, err := os.Open(*input)
		if err != nil {
			return fail(stderr, "calibrate", badInput("input", "%v", err))
		}
		defer f.Close()
		r = f
	}
	seeds, err := calibsheet.Read(r)
	if err != nil {
		var ie *elicit.InputError
		if !errors.As(err, &ie) {
			err = badInput("input", "%v", err) // the file's own, such as a folder's "is a directory"
		}
		return fail(stderr, "calibrate", err)
	}
	if note := seeds.CommentNote(); note != "" {
		fmt.Fprintf(stderr, "parley calibrate: note: %s\n", note)
	}
	opt.LogScale = seeds.LogScale
	s, err := elicit.ClassicalModel(seeds.Assessments, seeds.Realisations, seeds.Bounds, opt)
	if err != nil {
		return fail(stderr, "calibrate", seeds.RowError(err))
	}
	var rob *elicit.LeaveOneOutReport
	if *loo {
		r, err := elicit.LeaveOneOut(seeds.Assessments, seeds.Realisations, seeds.Bounds, opt, nil)
		if err != nil {
			return fail(stderr, "calibrate", seeds.RowError(err))
		}
		rob = &r
	}
	if err := writeCalibration(stdout, *format, s, rob, opt.Alpha == nil); err != nil {
		return fail(stderr, "calibrate", err)
	}
	return exitOK
}

// writeCalibration prints the scores (and the leave-one-out report when
// rob is not nil) as text or JSON. As a last defence it prints nothing
// when any number is NaN or ±Inf: the text would show it to the reader,
// and JSON has no literal for it.
func writeCalibration(w io.Writer, format string, s elicit.Scores, rob *elicit.LeaveOneOutReport, optimised bool) error {
	if !finite(calibrationNumbers(s, rob)...) {
		return errors.New("the calibration produced a non-finite number; nothing printed")
	}
	if format == "json" {
		out := calibrateOutput{Scores: s}
		if rob != nil {
			// The notes the text prints, and how many reruns were done:
			// over none, "max_shift": 0 is no shift measured, and the
			// note was the library's "wrong number of entries".
			r := leaveOneOutJSON{LeaveOneOutReport: *rob}
			r.Cases = append([]elicit.LeaveOneOutCase(nil), rob.Cases...)
			kinds := rerunKinds(rob.Cases)
			for i := range r.Cases {
				if r.Cases[i].Error == "" {
					r.RerunsDone++
				} else {
					r.Cases[i].Error = rerunNote(r.Cases[i], kinds)
				}
			}
			out.LeaveOneOut = &r
		}
		return writeJSON(w, out)
	}
	if err := writeScoresTable(w, s, optimised); err != nil {
		return err
	}
	if rob != nil {
		return writeLeaveOneOut(w, *rob, s)
	}
	return nil
}

// calibrationNumbers lists every number the scores and the report print.
func calibrationNumbers(s elicit.Scores, rob *elicit.LeaveOneOutReport) []float64 {
	nums := append([]float64{s.Alpha, s.Overshoot, s.Pooled.Calibration, s.Pooled.Information, s.Pooled.Combined}, s.Probs...)
	for _, e := range s.Experts {
		nums = append(nums, e.Calibration, e.Information, e.Combined, e.Weight)
	}
	for _, q := range s.Questions {
		nums = append(append(nums, q.Realisation, q.Lower, q.Upper), q.Pooled...)
	}
	if rob == nil {
		return nums
	}
	nums = append(nums, rob.MaxShift)
	for _, f := range rob.Full {
		nums = append(nums, f...)
	}
	for _, c := range rob.Cases {
		nums = append(append(nums, c.Alpha, c.Shift), c.Shifts...)
		for _, w := range c.Weights {
			nums = append(nums, w)
		}
		for _, p := range c.Percentiles {
			nums = append(nums, p...)
		}
	}
	return nums
}

// calibrateOutput is the JSON output: the scores' keys (alpha, probs,
// experts, pooled, questions, ...) and, with --leave-one-out, the
// robustness report under "leave_one_out".
type calibrateOutput struct {
	elicit.Scores
	LeaveOneOut *leaveOneOutJSON `json:"leave_one_out,omitempty"`
}

// leaveOneOutJSON is the report's keys and reruns_done, how many of its
// cases could be rerun: with none, max_shift is 0 and measures nothing.
type leaveOneOutJSON struct {
	elicit.LeaveOneOutReport
	RerunsDone int `json:"reruns_done"`
}

// rerunKinds counts the cases of each kind (a question or an expert
// left out).
func rerunKinds(cases []elicit.LeaveOneOutCase) map[string]int {
	kinds := map[string]int{}
	for _, c := range cases {
		kinds[c.LeftOut]++
	}
	return kinds
}

// rerunNote says why a case could not be rerun. Without the only
// question or the only expert nothing is left to score; the library's
// words for it ("wrong number of entries") say less (the calibration
// page's rerunError).
func rerunNote(c elicit.LeaveOneOutCase, kinds map[string]int) string {
	switch {
	case c.Error != "" && c.LeftOut == elicit.LeaveOutQuestion && kinds[c.LeftOut] == 1:
		return "leaving out the only calibration question leaves nothing to score"
	case c.Error != "" && c.LeftOut == elicit.LeaveOutExpert && kinds[c.LeftOut] == 1:
		return "leaving out the only expert leaves no one to score"
	}
	return c.Error
}

// writeScoresTable prints the scores as a table.
func writeScoresTable(w io.Writer, s elicit.Scores, optimised bool) error {
	how := "fixed"
	if optimised {
		how = "chosen to maximise the performance-weighted pool's calibration × information, scored as if it were an expert"
	}
	probs := make([]string, len(s.Probs))
	for i, p := range s.Probs {
		probs[i] = strconv.FormatFloat(p, 'g', -1, 64)
	}
	fmt.Fprintf(w, "Calibration questions: %d; probabilities %s; intrinsic range widened by %g\n",
		len(s.Questions), strings.Join(probs, ", "), s.Overshoot)
	var logged []string
	for _, q := range s.Questions {
		if q.LogScale {
			logged = append(logged, q.Question)
		}
	}
	if len(logged) > 0 {
		fmt.Fprintf(w, "Information against the log-uniform background (range and overshoot on ln x): %s\n", strings.Join(logged, ", "))
	}
	// A fixed cut-off is printed as typed: to four figures, 0.53370129
	// would read 0.5337, below a score of 0.5337 it leaves out.
	alpha := strconv.FormatFloat(s.Alpha, 'g', 4, 64)
	if !optimised {
		alpha = strconv.FormatFloat(s.Alpha, 'g', -1, 64)
	}
	below := s.LogAlpha != nil
	if below {
		alpha = elicit.FormatExp(*s.LogAlpha, 4)
	}
	fmt.Fprintf(w, "Cut-off alpha = %s (%s)\n\n", alpha, how)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "expert\tanswered\tcalibration\tinformation\tcal × inf\tweight")
	for _, e := range s.Experts {
		// A score below the cut-off keeps its side of it: 0.080386, not
		// 0.08039 beside a cut-off of 0.08039 that left it out.
		digits := 4
		if e.Calibration < s.Alpha {
			digits = elicit.SideDigits(e.Calibration, s.Alpha, 4)
		}
		cal, comb := scoreTexts(e.Calibration, e.LogCalibration, e.Information, e.Combined, digits)
		below = below || elicit.BelowDouble(e.Calibration, e.LogCalibration)
		fmt.Fprintf(tw, "%s\t%d\t%s\t%.4f\t%s\t%.4g\n", e.Expert, e.N, cal, e.Information, comb, e.Weight)
	}
	p := s.Pooled
	cal, comb := scoreTexts(p.Calibration, p.LogCalibration, p.Information, p.Combined, 4)
	below = below || elicit.BelowDouble(p.Calibration, p.LogCalibration)
	fmt.Fprintf(tw, "%s\t%d\t%s\t%.4f\t%s\t\n", "pooled (performance weights)", p.N, cal, p.Information, comb)
	if err := tw.Flush(); err != nil {
		return err
	}
	if below {
		_, err := fmt.Fprintln(w, "\nScores below 2.2e-308, the smallest a double holds at full precision, are worked in logarithms and written from them.")
		return err
	}
	return nil
}

// scoreTexts writes a calibration score and calibration × information,
// from the score's logarithm where the score is below the smallest
// double (elicit.FormatExp): never a 0 that is not the score.
func scoreTexts(c, logC, info, combined float64, digits int) (string, string) {
	if !elicit.BelowDouble(c, logC) {
		return strconv.FormatFloat(c, 'g', digits, 64), strconv.FormatFloat(combined, 'g', 4, 64)
	}
	comb := "0"
	if info > 0 {
		comb = elicit.FormatExp(logC+math.Log(info), 4)
	}
	return elicit.FormatExp(logC, 4), comb
}

// writeLeaveOneOut prints the robustness report as a table.
func writeLeaveOneOut(w io.Writer, r elicit.LeaveOneOutReport, s elicit.Scores) error {
	logNote := ""
	for _, c := range s.Questions {
		if c.LogScale {
			logNote = "; against the log-uniform background, of ln x against its intrinsic range on ln x"
		}
	}
	// How many reruns of each kind there are, and how many were done: a
	// largest shift of 0 over no rerun would claim a steadiness nothing
	// tested.
	kinds, done := rerunKinds(r.Cases), 0
	for _, c := range r.Cases {
		if c.Error == "" {
			done++
		}
	}
	largest := fmt.Sprintf("%.4g", r.MaxShift)
	if done == 0 {
		largest = "none, as no rerun could be done"
	}
	fmt.Fprintf(w, "\nLeave one out: largest shift of the pooled 5/50/95 percentiles on any calibration question, as a fraction of its range (its bounds where given, else its intrinsic range%s): %s\n\n", logNote, largest)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "left out\tname\talpha\tlargest shift\tnote")
	for _, c := range r.Cases {
		note := rerunNote(c, kinds)
		if note == "" && len(c.Unpooled) > 0 {
			note = "no weighted expert on " + strings.Join(c.Unpooled, ", ")
		}
		if c.Error != "" {
			fmt.Fprintf(tw, "%s\t%s\t\t\t%s\n", c.LeftOut, c.Name, note)
			continue
		}
		alpha := strconv.FormatFloat(c.Alpha, 'g', 4, 64)
		if c.LogAlpha != nil {
			alpha = elicit.FormatExp(*c.LogAlpha, 4) // not 0, which is not the cut-off
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.4g\t%s\n", c.LeftOut, c.Name, alpha, c.Shift, note)
	}
	return tw.Flush()
}
