// Package clocale keeps the POSIX "C" locale from reaching Fyne. Fyne reads
// the user's locale from LC_ALL, LC_MESSAGES and LANG while its packages
// initialise, and logs an error for "C" or "POSIX" (not a language tag),
// which is the locale of most containers and CI machines; the desktop
// program would then print Fyne's three log lines before anything else,
// even for a plain "error: ..." exit. Such values are replaced by US
// English here, which is what Fyne falls back to anyway.
//
// The package imports nothing outside the standard library, so it is
// initialised before Fyne's (packages whose dependencies are ready are
// initialised in the order of their import paths, and "faultline/..."
// sorts before "fyne.io/..."); the desktop main imports it for that
// effect only.
package clocale

import "os"

func init() {
	for _, k := range []string{"LC_ALL", "LC_MESSAGES", "LANG"} {
		switch v := os.Getenv(k); v {
		case "C", "POSIX", "C.UTF-8", "C.utf8":
			if k == "LANG" {
				os.Setenv(k, "en_US.UTF-8")
			} else {
				os.Unsetenv(k)
			}
		}
	}
}
