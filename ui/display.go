package ui

import (
	"errors"
	"net"
	"runtime"
	"strconv"
	"strings"
	"time"
)

// errNoDisplay is the one line the program prints when it cannot open a
// window.
var errNoDisplay = errors.New("no display: use the faultline command, or a virtual display")

// checkDisplay reports errNoDisplay when the window could not open: on the
// X11 systems Fyne's desktop driver uses there (not macOS, Windows or a
// mobile system), the DISPLAY variable is unset or names an X server that
// does not answer. Finding this before the driver starts spares the user
// the driver's panic trace. getenv is os.Getenv outside tests.
func checkDisplay(getenv func(string) string) error {
	switch runtime.GOOS {
	case "darwin", "windows", "android", "ios", "js":
		return nil
	}
	d := getenv("DISPLAY")
	if d == "" {
		return errNoDisplay
	}
	network, addr, ok := xServerAddress(d)
	if !ok {
		return errNoDisplay
	}
	conn, err := net.DialTimeout(network, addr, 2*time.Second)
	if err != nil {
		return errNoDisplay
	}
	conn.Close()
	return nil
}

// xServerAddress returns where the X server of display name d listens, by
// the X Window System's display-name rule ([host]:display[.screen]): a
// local display :N on the Unix socket /tmp/.X11-unix/XN, host:N on TCP
// port 6000 + N.
func xServerAddress(d string) (network, addr string, ok bool) {
	colon := strings.LastIndex(d, ":")
	if colon < 0 {
		return "", "", false
	}
	host, num := d[:colon], d[colon+1:]
	if dot := strings.IndexByte(num, '.'); dot >= 0 {
		num = num[:dot]
	}
	n, err := strconv.Atoi(num)
	if err != nil || n < 0 {
		return "", "", false
	}
	switch {
	case strings.HasPrefix(host, "/"):
		// A launchd-style socket path (host is the socket's directory).
		return "unix", d, true
	case host == "" || host == "unix":
		return "unix", "/tmp/.X11-unix/X" + num, true
	}
	return "tcp", net.JoinHostPort(host, strconv.Itoa(6000+n)), true
}
