package crystal

import (
	"bytes"
	"os"
	"path/filepath"
	"strconv"
	"testing"
	"time"
)

func TestZZSlowCorpus(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(os.Getenv("HOME"), ".cache/go-build/fuzz/faultline/crystal/FuzzParseCIF/*"))
	for _, f := range files {
		b, _ := os.ReadFile(f)
		lines := bytes.SplitN(b, []byte("\n"), 2)
		s := string(bytes.TrimSpace(lines[1]))
		s = s[len("[]byte(") : len(s)-1]
		data, err := strconv.Unquote(s)
		if err != nil { t.Log(f, err); continue }
		t0 := time.Now()
		c, err := ParseCIF(bytes.NewReader([]byte(data)), "")
		if d := time.Since(t0); d > 5*time.Millisecond {
			n := 0
			if c != nil { n = len(c.Atoms) }
			t.Logf("%s: %v atoms=%d err=%v", filepath.Base(f), d, n, err)
		}
	}
}
