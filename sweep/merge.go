package sweep

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"faultline/internal/atomicfile"
)

// IndexName and ContactSheetName are the files merge writes.
const (
	IndexName        = "index.csv"
	ContactSheetName = "contact-sheet.png"
)

// Problem is one job that is not done: missing, failed, corrupt (a file
// absent or not matching its hash, or a record that does not belong to
// the sweep) or recorded more than once.
type Problem struct {
	K    int
	Kind string // "missing", "failed", "corrupt", "duplicate"
	Why  string
}

// MergeReport is what merge found and wrote.
type MergeReport struct {
	Jobs, OK int
	Problems []Problem
	// Index and ContactSheet are the files written ("" when not).
	Index, ContactSheet string
	// ContactNote says why no contact sheet was written, if none was.
	ContactNote string
}

// Summary is one line naming the problems (at most ten jobs of each
// kind).
func (r *MergeReport) Summary() string {
	if len(r.Problems) == 0 {
		return fmt.Sprintf("all %d jobs done and verified", r.Jobs)
	}
	kinds := map[string][]string{}
	var order []string
	for _, p := range r.Problems {
		if kinds[p.Kind] == nil {
			order = append(order, p.Kind)
		}
		kinds[p.Kind] = append(kinds[p.Kind], strconv.Itoa(p.K))
	}
	var parts []string
	for _, k := range order {
		ks := kinds[k]
		list := strings.Join(ks[:min(10, len(ks))], ", ")
		if len(ks) > 10 {
			list += fmt.Sprintf(" and %d more", len(ks)-10)
		}
		parts = append(parts, fmt.Sprintf("%d %s (jobs %s)", len(ks), k, list))
	}
	first := r.Problems[0]
	return fmt.Sprintf("%d of %d jobs done; %s; first: job %d %s: %s", r.OK, r.Jobs, strings.Join(parts, ", "), first.K, first.Kind, first.Why)
}

var manifestRe = regexp.MustCompile(`^manifest-(\d+)\.jsonl$`)

// Merge checks that every job of the sweep in dir is recorded exactly
// once, as done, with every file present and matching its sha256; writes
// index.csv (one row per job: k, status, the value of every axis, the
// files, the error; the time each job took is in the manifests, so the
// index of a sweep is the same however it was run) and, for a grid of one or two
// varied axes, a contact sheet of the bright-field images. Problems are
// listed in the report and make Merge return ErrJobsFailed, after the
// files are written.
func Merge(dir string) (*MergeReport, error) {
	sw, err := OpenDir(dir)
	if err != nil {
		return nil, err
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	rep := &MergeReport{Jobs: sw.Jobs}
	recs := make([]*Record, sw.Jobs)
	from := make([]string, sw.Jobs)
	var problems []Problem
	for _, e := range entries {
		if !manifestRe.MatchString(e.Name()) {
			continue
		}
		rs, _, err := readManifest(filepath.Join(dir, e.Name()))
		if err != nil {
			return nil, err
		}
		// A torn last line is a job that did not finish: it counts as
		// missing unless recorded elsewhere.
		for i := range rs {
			r := rs[i]
			switch {
			case r.Sweep != sw.Hash:
				return nil, errf("", "%s: job %d belongs to another sweep (%.12s…, this directory's is %.12s…)", e.Name(), r.K, r.Sweep, sw.Hash)
			case r.K < 0 || r.K >= sw.Jobs:
				return nil, errf("", "%s: job %d is outside the sweep's %d jobs", e.Name(), r.K, sw.Jobs)
			case recs[r.K] != nil:
				problems = append(problems, Problem{r.K, "duplicate", fmt.Sprintf("recorded in %s and %s", from[r.K], e.Name())})
				continue
			}
			recs[r.K] = &r
			from[r.K] = e.Name()
		}
	}
	status := make([]string, sw.Jobs)
	for k, r := range recs {
		switch {
		case r == nil:
			status[k] = "missing"
			problems = append(problems, Problem{k, "missing", "no record in any manifest"})
		case r.Status == StatusFailed:
			status[k] = StatusFailed
			problems = append(problems, Problem{k, "failed", r.Error})
		case r.Status != StatusOK:
			status[k] = "corrupt"
			problems = append(problems, Problem{k, "corrupt", fmt.Sprintf("status %q", r.Status)})
		default:
			if why := verify(dir, *r); why != "" {
				status[k] = "corrupt"
				problems = append(problems, Problem{k, "corrupt", why})
				continue
			}
			status[k] = StatusOK
			rep.OK++
		}
	}
	sort.SliceStable(problems, func(a, b int) bool { return problems[a].K < problems[b].K })
	rep.Problems = problems

	if err := writeIndex(dir, sw, recs, status); err != nil {
		return nil, err
	}
	rep.Index = filepath.Join(dir, IndexName)
	path, note, err := writeContactSheet(dir, sw, status)
	if err != nil {
		return nil, err
	}
	rep.ContactSheet, rep.ContactNote = path, note
	if len(problems) > 0 {
		return rep, fmt.Errorf("merge %s: %s: %w", dir, rep.Summary(), ErrJobsFailed)
	}
	return rep, nil
}

// writeIndex writes index.csv.
func writeIndex(dir string, sw *Sweep, recs []*Record, status []string) error {
	var fileNames []string
	seen := map[string]bool{}
	for _, r := range recs {
		if r == nil {
			continue
		}
		for _, f := range r.Files {
			if !seen[f.Name] {
				seen[f.Name] = true
				fileNames = append(fileNames, f.Name)
			}
		}
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := []string{"k", "status"}
	for _, a := range sw.File.Axes {
		head = append(head, a.Path)
	}
	for _, f := range fileNames {
		head = append(head, f)
	}
	head = append(head, "error")
	w.Write(head)
	row := make([]string, len(head))
	for k := 0; k < sw.Jobs; k++ {
		row = row[:0]
		row = append(row, strconv.Itoa(k), status[k])
		r := recs[k]
		var ov []Override
		if r != nil {
			ov = r.Overrides
		} else {
			ov = sw.Job(k)
		}
		for _, o := range ov {
			row = append(row, csvValue(o.Value))
		}
		have := map[string]bool{}
		if r != nil && status[k] == StatusOK {
			for _, f := range r.Files {
				have[f.Name] = true
			}
		}
		for _, f := range fileNames {
			if have[f] {
				row = append(row, filepath.ToSlash(filepath.Join(JobDir(k), f)))
			} else {
				row = append(row, "")
			}
		}
		msg := ""
		if r != nil {
			msg = r.Error
		}
		row = append(row, msg)
		w.Write(row)
	}
	w.Flush()
	if err := w.Error(); err != nil {
		return err
	}
	return atomicfile.WriteFile(filepath.Join(dir, IndexName), b.Bytes())
}

// csvValue writes an axis value for a CSV cell: a number or text as is,
// anything else as compact JSON.
func csvValue(v json.RawMessage) string {
	var x any
	if err := json.Unmarshal(v, &x); err == nil {
		if s, ok := x.(string); ok {
			return s
		}
	}
	return compact(v)
}
