package sweep

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime/debug"
	"strconv"
	"strings"
	"sync"

	"faultline/internal/atomicfile"
	"faultline/scene"
)

// Record is one line of a shard's manifest: what became of job K.
type Record struct {
	K         int          `json:"k"`
	Shard     string       `json:"shard"`
	Sweep     string       `json:"sweep_sha256"`
	Overrides []Override   `json:"overrides"`
	Files     []FileRecord `json:"files,omitempty"`
	// Status is "ok" or "failed".
	Status  string  `json:"status"`
	Error   string  `json:"error,omitempty"`
	Seconds float64 `json:"seconds"`
	Version string  `json:"version"`
	// Replayed is true when the job's image was replayed from its
	// group's field samples (see replay.go) rather than rendered.
	Replayed bool `json:"replayed,omitempty"`
}

// FileRecord is one file a job wrote, relative to the job's directory.
type FileRecord struct {
	Name   string `json:"name"`
	SHA256 string `json:"sha256"`
	Bytes  int64  `json:"bytes"`
}

// Status values of a Record.
const (
	StatusOK     = "ok"
	StatusFailed = "failed"
)

// PlanName is the file in an output directory that says which sweep it
// belongs to.
const PlanName = "sweep.json"

// ManifestName is the manifest file of shard i.
func ManifestName(i int) string { return fmt.Sprintf("manifest-%d.jsonl", i) }

// JobDir is the directory of job k, relative to the output directory.
func JobDir(k int) string { return filepath.Join("jobs", strconv.Itoa(k)) }

// Version is the Faultline version recorded with every job: the module
// version and, where the build recorded it, the source revision.
func Version() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "faultline (unknown build)"
	}
	v := "faultline " + bi.Main.Version
	var rev, dirty string
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			if s.Value == "true" {
				dirty = "+modified"
			}
		}
	}
	if rev != "" {
		v += " " + rev[:min(12, len(rev))] + dirty
	}
	return v
}

// plan is the content of PlanName: the sweep and its base scene, so merge
// needs nothing but the directory.
type plan struct {
	Version  int          `json:"version"`
	Hash     string       `json:"sweep_sha256"`
	Jobs     int          `json:"jobs"`
	Sweep    File         `json:"sweep"`
	Scene    *scene.Scene `json:"scene"`
	SceneDir string       `json:"scene_dir"`
}

// claimDir makes dir the output directory of sw: it writes PlanName, or
// checks that the one there is of the same sweep.
func claimDir(dir string, sw *Sweep) error {
	if err := os.MkdirAll(filepath.Join(dir, "jobs"), 0o755); err != nil {
		return fmt.Errorf("-o %s: %w", dir, err)
	}
	path := filepath.Join(dir, PlanName)
	if data, err := os.ReadFile(path); err == nil {
		var p plan
		if err := json.Unmarshal(data, &p); err != nil || p.Hash == "" {
			return errf("-o", "%s holds a %s that is not a sweep plan; use another directory", dir, PlanName)
		}
		if p.Hash != sw.Hash {
			return errf("-o", "%s belongs to a different sweep (sweep_sha256 %.12s…, this one is %.12s…); use another directory", dir, p.Hash, sw.Hash)
		}
		return nil
	} else if !errors.Is(err, os.ErrNotExist) {
		return fmt.Errorf("-o %s: %w", dir, err)
	}
	data, err := json.MarshalIndent(plan{Version: 1, Hash: sw.Hash, Jobs: sw.Jobs, Sweep: sw.File, Scene: sw.Base, SceneDir: sw.SceneDir}, "", "  ")
	if err != nil {
		return err
	}
	return atomicfile.WriteFile(path, append(data, '\n'))
}

// OpenDir reads the sweep an output directory belongs to.
func OpenDir(dir string) (*Sweep, error) {
	data, err := os.ReadFile(filepath.Join(dir, PlanName))
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, errf("", "%s: no %s: not the output directory of a sweep", dir, PlanName)
		}
		return nil, err
	}
	var p plan
	if err := json.Unmarshal(data, &p); err != nil || p.Scene == nil {
		return nil, errf("", "%s: not a sweep plan", filepath.Join(dir, PlanName))
	}
	// Checked when the plan was written; only expanded here.
	sw, err := expand(p.Sweep, p.Scene, p.SceneDir, true)
	if err != nil {
		return nil, err
	}
	if sw.Hash != p.Hash {
		return nil, errf("", "%s: the plan's sweep_sha256 does not match the sweep, its scene and the CIF files they name (one edited since the sweep ran?)", filepath.Join(dir, PlanName))
	}
	return sw, nil
}

// readManifest reads the records of a manifest. A last line without its
// newline (a shard killed while appending) is reported as torn and left
// out; any other line that is not a record is an error.
func readManifest(path string) (recs []Record, torn bool, err error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, false, err
	}
	lines := bytes.Split(data, []byte("\n"))
	last := len(lines) - 1
	if len(lines[last]) > 0 {
		torn = true
	}
	for n, line := range lines[:last] {
		if len(bytes.TrimSpace(line)) == 0 {
			continue
		}
		var r Record
		dec := json.NewDecoder(bytes.NewReader(line))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&r); err != nil {
			return nil, torn, fmt.Errorf("%s: line %d is not a job record: %v", path, n+1, err)
		}
		recs = append(recs, r)
	}
	return recs, torn, nil
}

// verify checks that every file of an ok record is in the job's
// directory with its recorded size and hash. It returns "" or what is
// wrong.
func verify(dir string, r Record) string {
	jd := filepath.Join(dir, JobDir(r.K))
	for _, f := range r.Files {
		sum, n, err := hashFile(filepath.Join(jd, f.Name))
		switch {
		case errors.Is(err, os.ErrNotExist):
			return f.Name + " is missing"
		case err != nil:
			return f.Name + ": " + err.Error()
		case n != f.Bytes || sum != f.SHA256:
			return f.Name + " does not match its sha256"
		}
	}
	return ""
}

func hashFile(path string) (string, int64, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", 0, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, bufio.NewReader(f))
	if err != nil {
		return "", 0, err
	}
	return hex.EncodeToString(h.Sum(nil)), n, nil
}

// manifestWriter appends records to a shard's manifest, one line per
// record in one write, synced, so a kill leaves at most a torn last line.
type manifestWriter struct {
	mu sync.Mutex
	f  *os.File
}

func openManifest(path string) (*manifestWriter, error) {
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_APPEND|os.O_CREATE, 0o644)
	if err != nil {
		return nil, err
	}
	return &manifestWriter{f: f}, nil
}

func (m *manifestWriter) append(r Record) error {
	line, err := json.Marshal(r)
	if err != nil {
		return err
	}
	line = append(line, '\n')
	m.mu.Lock()
	defer m.mu.Unlock()
	if _, err := m.f.Write(line); err != nil {
		return err
	}
	return m.f.Sync()
}

func (m *manifestWriter) close() error { return m.f.Close() }

// encodeRecords is the text of a manifest holding recs.
func encodeRecords(recs []Record) ([]byte, error) {
	var b bytes.Buffer
	for _, r := range recs {
		line, err := json.Marshal(r)
		if err != nil {
			return nil, err
		}
		b.Write(line)
		b.WriteByte('\n')
	}
	return b.Bytes(), nil
}

// oneLine joins the lines of an error message.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }
