// Command faultline simulates diffraction-contrast images of crystal
// defects from a scene file, with no display: render, profile and
// reflections. See the README for the scene file and the commands.
package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strings"

	"faultline/match"
	"faultline/micrograph"
	"faultline/scene"
)

// Exit statuses.
const (
	exitOK       = 0
	exitInternal = 1
	exitBadInput = 2
)

// usageError is bad use of the command line itself.
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

const usage = `usage:
  faultline render SCENE -o DIR        write bf.png, df.png, figure.png, bf.tiff, df.tiff
  faultline profile SCENE [--y-nm Y]   CSV x_nm,bf,df along the pixel row nearest y = Y nm
  faultline reflections SCENE [--json] g and the reflections of the zone
  faultline identify SET [--json] [-o DIR]
                                       rank candidate Burgers vectors (or a loop's
                                       nature, a fault's kind) against a g·b series
  faultline fit SCENE --micrograph IMG [--nm-per-px P] [--g-angle-deg A]
                [--kind bf|df] [--defect K] [--blur-nm S] [--json]
                                       fit thickness, s and the defect's depth

render and profile take --set PATH=VALUE (repeatable): a field of the
scene by its path, the value in JSON, e.g. --set foil.thickness_nm=80
--set 'diffraction.g=[1,1,-1]' --set 'defects[0].b="1/2[1 0 1]"'
`

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes one command and returns the exit status. No panic escapes:
// an internal failure is reported in one line with status 1.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "error: internal failure: %v (please report this with the scene file)\n", r)
			code = exitInternal
		}
	}()
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return exitBadInput
	}
	var err error
	switch args[0] {
	case "render":
		err = cmdRender(ctx, args[1:], stderr)
	case "profile":
		err = cmdProfile(ctx, args[1:], stdout)
	case "reflections":
		err = cmdReflections(args[1:], stdout)
	case "identify":
		err = cmdIdentify(ctx, args[1:], stdout, stderr)
	case "fit":
		err = cmdFit(ctx, args[1:], stdout, stderr)
	case "plan":
		err = usageError{fmt.Sprintf("%s is not built yet; this version has render, profile, reflections, identify and fit", args[0])}
	case "-h", "--help", "help":
		fmt.Fprint(stdout, usage)
		return exitOK
	default:
		err = usageError{fmt.Sprintf("unknown command %q; the commands are render, profile, reflections", args[0])}
	}
	if err == nil {
		return exitOK
	}
	fmt.Fprintln(stderr, "error: "+oneLine(err.Error()))
	var ue usageError
	switch {
	case errors.As(err, &ue), errors.Is(err, scene.ErrInvalid), errors.Is(err, os.ErrNotExist),
		errors.Is(err, match.ErrSeries), errors.Is(err, micrograph.ErrInvalid):
		return exitBadInput
	case errors.Is(err, context.Canceled):
		return exitInternal
	}
	return exitInternal
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// parse reads one positional argument (the scene file) and the flags of fs,
// in any order.
func parse(fs *flag.FlagSet, args []string) (string, error) {
	fs.SetOutput(io.Discard)
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return "", usageError{fmt.Sprintf("%s: %v", fs.Name(), err)}
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	if len(pos) != 1 {
		return "", usageError{fmt.Sprintf("%s: give one scene file (got %d arguments)", fs.Name(), len(pos))}
	}
	return pos[0], nil
}

// overrides collects the --set PATH=VALUE flags of a command.
type overrides []scene.Edit

func (o *overrides) String() string { return "" }

// Set takes one PATH=VALUE; the value is JSON text.
func (o *overrides) Set(text string) error {
	path, value, ok := strings.Cut(text, "=")
	if !ok || path == "" {
		return fmt.Errorf("%q: write PATH=VALUE, e.g. foil.thickness_nm=80", text)
	}
	*o = append(*o, scene.Edit{Path: path, Value: json.RawMessage(value)})
	return nil
}

// setFlag adds the repeatable --set flag to fs.
func setFlag(fs *flag.FlagSet) *overrides {
	o := &overrides{}
	fs.Var(o, "set", "PATH=VALUE: override a field of the scene (JSON value; repeatable)")
	return o
}

// load reads a scene file, applies the overrides in order and builds it.
func load(path string, set ...scene.Edit) (*scene.Setup, []byte, error) {
	sc, err := scene.Load(path)
	if err != nil {
		return nil, nil, err
	}
	for _, e := range set {
		if err := scene.SetJSON(sc, e.Path, string(e.Value.(json.RawMessage))); err != nil {
			return nil, nil, fmt.Errorf("--set %w", err)
		}
	}
	st, err := scene.Build(sc, filepath.Dir(path))
	if err != nil {
		return nil, nil, err
	}
	data, err := scene.Marshal(sc)
	if err != nil {
		return nil, nil, err
	}
	return st, data, nil
}
