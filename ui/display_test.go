package ui

import (
	"net"
	"os"
	"path/filepath"
	"testing"
)

// The display-name rule of the X Window System: [host]:display[.screen].
func TestXServerAddress(t *testing.T) {
	for _, c := range []struct{ d, network, addr string }{
		{":0", "unix", "/tmp/.X11-unix/X0"},
		{":99.0", "unix", "/tmp/.X11-unix/X99"},
		{"unix:3", "unix", "/tmp/.X11-unix/X3"},
		{"localhost:10.0", "tcp", "localhost:6010"},
		{"192.168.1.5:1", "tcp", "192.168.1.5:6001"},
	} {
		n, a, ok := xServerAddress(c.d)
		if !ok || n != c.network || a != c.addr {
			t.Errorf("%q: %s %s %v, want %s %s", c.d, n, a, ok, c.network, c.addr)
		}
	}
	for _, d := range []string{"", "nonsense", ":x", ":-1"} {
		if _, _, ok := xServerAddress(d); ok {
			t.Errorf("%q accepted", d)
		}
	}
}

// No DISPLAY, or one that no server answers: the one-line message. A
// display whose socket answers passes.
func TestCheckDisplay(t *testing.T) {
	env := func(d string) func(string) string {
		return func(k string) string {
			if k == "DISPLAY" {
				return d
			}
			return ""
		}
	}
	for _, d := range []string{"", ":9876", "nonsense"} {
		if err := checkDisplay(env(d)); err != errNoDisplay {
			t.Errorf("DISPLAY=%q: %v, want %v", d, err, errNoDisplay)
		}
	}
	if got := errNoDisplay.Error(); got != "no display: use the faultline command, or a virtual display" {
		t.Errorf("message %q", got)
	}
	// A listening socket in the launchd form of a display name.
	dir, err := os.MkdirTemp("", "x")
	if err != nil {
		t.Fatal(err)
	}
	defer os.RemoveAll(dir)
	sock := filepath.Join(dir, "org.x:0")
	l, err := net.Listen("unix", sock)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	if err := checkDisplay(env(sock)); err != nil {
		t.Errorf("listening display %q: %v", sock, err)
	}
}
