package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The exit statuses of the design (0 success, 2 bad input, 1 internal),
// in process: each failure is one "error:" line on stderr.
func TestRunExitStatus(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte(`{"version": 1, "crystal": {"material": "Cu"}, "colour": 1}`), 0o644)
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{nil, exitBadInput, "usage:"},
		{[]string{"help"}, exitOK, ""},
		{[]string{"frobnicate"}, exitBadInput, `error: unknown command "frobnicate"`},
		{[]string{"plan", bad}, exitBadInput, "error: plan is not built yet"},
		{[]string{"render", bad, "-o", dir}, exitBadInput, "error: colour: unknown field"},
		{[]string{"render", bad}, exitBadInput, "error: render: give the output directory with -o DIR"},
		{[]string{"reflections", bad, bad}, exitBadInput, "error: reflections: give one scene file (got 2 arguments)"},
		{[]string{"profile", filepath.Join(dir, "none.json")}, exitBadInput, "error: scene file"},
	} {
		var stdout, stderr bytes.Buffer
		code := run(context.Background(), c.args, &stdout, &stderr)
		if code != c.code || !strings.HasPrefix(stderr.String(), c.want) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", c.args, code, stderr.String(), c.code, c.want)
		}
		if code == exitBadInput && strings.HasPrefix(c.want, "error:") && strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%v: %d lines on stderr, want one", c.args, strings.Count(stderr.String(), "\n"))
		}
	}
}

func TestOneLine(t *testing.T) {
	if got := oneLine("a\n  b\tc "); got != "a b c" {
		t.Errorf("oneLine = %q", got)
	}
}
