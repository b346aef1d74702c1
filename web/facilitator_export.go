package web

import (
	"bytes"
	"context"
	"fmt"
	"net/http"
	"time"

	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// recordSourcer is implemented by stores that read a workshop's whole
// state in one consistent transaction (store.DB does).
type recordSourcer interface {
	Source(ctx context.Context, workshopID int64) (workshop.Snapshot, error)
}

// record builds the export record of ws with record.Build: every
// fit and pool recomputed from the stored judgements.
func (s *Server) record(ctx context.Context, ws workshop.Workshop) (record.Record, error) {
	return s.buildRecord(ctx, ws, record.Build)
}

// buildRecord reads the workshop's snapshot and builds it with build
// (record.Build, or record.BuildHistory where no panel is needed).
func (s *Server) buildRecord(ctx context.Context, ws workshop.Workshop, build func(workshop.Snapshot, time.Time) (record.Record, error)) (record.Record, error) {
	src, err := s.snapshot(ctx, ws)
	if err != nil {
		return record.Record{}, err
	}
	return build(src, s.now())
}

// exportRecord downloads the workshop's record, or one question's, as
// JSON (the whole record), CSV (one row per revision) or the priors CSV
// (one row per question with an agreed prior).
func (s *Server) exportRecord(format string, perQuestion bool) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		ws, ok := s.loadWorkshop(w, r)
		if !ok {
			return
		}
		name := fmt.Sprintf("parley-workshop-%d", ws.ID)
		// The revision CSV and the priors CSV need no panel: no pool is
		// formed for them.
		build := record.Build
		if format != "json" {
			build = record.BuildHistory
		}
		rec, err := s.buildRecord(r.Context(), ws, build)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		if perQuestion {
			q, ok := s.loadQuestion(w, r, ws)
			if !ok {
				return
			}
			if rec, err = rec.ForQuestion(q.ID); err != nil {
				s.fail(w, r, err)
				return
			}
			if format == "csv" {
				// The JSON keeps the calibration answers behind
				// performance weights; the CSV lists this question's
				// revisions only.
				var own []record.Revision
				for _, rv := range rec.Revisions {
					if rv.QuestionID == q.ID {
						own = append(own, rv)
					}
				}
				rec.Revisions = own
			}
			name += fmt.Sprintf("-question-%d", q.ID)
		}
		var buf bytes.Buffer
		ctype, ext := "application/json", format
		switch format {
		case "csv":
			ctype = "text/csv; charset=utf-8"
			err = rec.WriteCSV(&buf)
		case "priors":
			ctype, ext = "text/csv; charset=utf-8", "csv"
			name += "-priors"
			err = rec.WritePriorsCSV(&buf)
		default:
			err = rec.WriteJSON(&buf)
		}
		if err != nil {
			s.fail(w, r, err)
			return
		}
		w.Header().Set("Content-Type", ctype)
		w.Header().Set("Content-Disposition", fmt.Sprintf(`attachment; filename="%s.%s"`, name, ext))
		_, _ = buf.WriteTo(w)
	}
}
