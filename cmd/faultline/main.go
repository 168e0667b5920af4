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
	"regexp"
	"strings"
	"syscall"

	"faultline/internal/atomicfile"
	"faultline/match"
	"faultline/micrograph"
	"faultline/scene"
	"faultline/sweep"
)

// Exit statuses.
const (
	exitOK          = 0
	exitInternal    = 1
	exitBadInput    = 2
	exitInterrupted = 130 // 128 + SIGINT, as shells report it
)

// usageError is bad use of the command line itself.
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

// outputError is a failure to write the results where -o points: the
// environment's fault (a file in the way, no permission, a full disk), so
// bad input, not an internal failure.
type outputError struct {
	dir string
	err error
}

func (e outputError) Error() string {
	var ae *atomicfile.Error
	if errors.As(e.err, &ae) {
		if ae.Path == e.dir {
			if ae.Op == "write into" {
				return fmt.Sprintf("-o %s: %s", e.dir, ae.Err)
			}
			return fmt.Sprintf("-o %s: cannot %s: %s", e.dir, ae.Op, ae.Err)
		}
		return fmt.Sprintf("-o %s: cannot %s %s: %s", e.dir, ae.Op, strings.TrimPrefix(strings.TrimPrefix(ae.Path, e.dir), string(os.PathSeparator)), ae.Err)
	}
	return fmt.Sprintf("-o %s: %v", e.dir, e.err)
}

func (e outputError) Unwrap() error { return e.err }

const usage = `usage:
  faultline render SCENE -o DIR [--all-beams]
                                          write bf.png, df.png, figure.png, bf.tiff, df.tiff
                                          (df: the g beam); --all-beams adds beam_N.tiff
        [--format mrc] [--figure-width-mm W] [--dpi D] [--figure-format pdf|svg]
  faultline profile SCENE [--y-nm Y]      CSV x_nm,bf,df along the pixel row nearest y = Y nm
  faultline profile SCENE --from X,Y --to X,Y
                                          CSV distance_nm,x_nm,y_nm,bf,df along a line
  faultline reflections SCENE [--json]    g and the reflections of the zone
  faultline plan SCENE -o DIR [--thickness-nm A:B:STEP] [--s-per-nm A:B:STEP] [--candidates 1/2<110>]
                                          thickness, rocking, visibility and weak-beam
                                          curves, g·b table, suggested conditions
  faultline inspect IMG[#N] [--json]      what a micrograph file holds (PNG, TIFF, DM3, DM4, MRC)
  faultline identify SET [--json] [-o DIR]
                                          rank candidate Burgers vectors (or a loop's
                                          nature, a fault's kind) against a g·b series
  faultline fit SCENE --micrograph IMG [--nm-per-px P] [--g-angle-deg A]
                [--kind bf|df] [--defect K] [--blur-nm S] [--json]
                                          fit thickness, s and the defect's depth
  faultline sweep SWEEP -o DIR [--shard I/N | --shards N] [--workers K] [--force]
                                          run the jobs of a sweep (or of one shard of it)
  faultline sweep merge DIR               check a sweep's jobs, write index.csv and a contact sheet
  faultline sweep slurm SWEEP -o DIR --tasks N [--partition P] [--time HH:MM:SS]
                        [--cpus-per-task C] [--submit]
                                          write (and submit) a Slurm job array and its merge job
  faultline COMMAND --help                the options of a command

render, profile and reflections take --set PATH=VALUE (repeatable): a
field of the scene by its path, the value in JSON, e.g. --set
foil.thickness_nm=80 --set 'diffraction.g=[1,1,-1]' --set
'defects[0].b="1/2[1 0 1]"'
`

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes one command and returns the exit status. No panic escapes:
// an internal failure is reported in one line with status 1. A failure is
// one line on stderr, the last one written.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintln(stderr, errorLine(fmt.Errorf("internal failure: %v (please report this with the scene file)", r)))
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
		err = cmdRender(ctx, args[1:], stdout, stderr)
	case "profile":
		err = cmdProfile(ctx, args[1:], stdout, stderr)
	case "inspect":
		err = cmdInspect(args[1:], stdout)
	case "reflections":
		err = cmdReflections(args[1:], stdout)
	case "identify":
		err = cmdIdentify(ctx, args[1:], stdout, stderr)
	case "fit":
		err = cmdFit(ctx, args[1:], stdout, stderr)
	case "plan":
		err = cmdPlan(ctx, args[1:], stdout, stderr)
	case "sweep":
		err = cmdSweep(ctx, args[1:], stdout, stderr)
	case "-h", "--help", "-help", "help":
		fmt.Fprint(stdout, usage)
		return exitOK
	default:
		err = usageError{fmt.Sprintf("unknown command %s; the commands are render, profile, reflections, inspect, plan, identify, fit, sweep", cutQuoted(fmt.Sprintf("%q", args[0])))}
	}
	if err == nil || errors.Is(err, errHelp) {
		return exitOK
	}
	if errors.Is(err, context.Canceled) {
		fmt.Fprintln(stderr, "error: interrupted")
		return exitInterrupted
	}
	fmt.Fprintln(stderr, errorLine(err))
	var ue usageError
	var oe outputError
	switch {
	case errors.As(err, &ue), errors.As(err, &oe), errors.Is(err, scene.ErrInvalid), errors.Is(err, os.ErrNotExist),
		errors.Is(err, match.ErrSeries), errors.Is(err, micrograph.ErrInvalid), errors.Is(err, sweep.ErrInvalid):
		return exitBadInput
	case isJobsFailed(err):
		return exitJobsFailed
	}
	return exitInternal
}

// maxLine bounds an error line, in bytes.
const maxLine = 600

// errorLine is the one line that reports err: "error: " and the message on
// one line, quoted values cut to a readable length, the whole bounded.
func errorLine(err error) string {
	s := cutQuoted(oneLine(err.Error()))
	if len(s) > maxLine {
		s = strings.ToValidUTF8(s[:maxLine], "") + "…"
	}
	return "error: " + s
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// maxQuoted is the longest quoted value an error line repeats in full.
const maxQuoted = 60

var quoted = regexp.MustCompile(`"(?:[^"\\]|\\.)*"`)

// cutQuoted shortens every quoted value longer than maxQuoted characters
// to its start and an ellipsis, saying how long it was.
func cutQuoted(s string) string {
	return quoted.ReplaceAllStringFunc(s, func(q string) string {
		r := []rune(q)
		if len(r) <= maxQuoted+2 {
			return q
		}
		return fmt.Sprintf("%s…\" (%d characters)", string(r[:maxQuoted*2/3]), len(r)-2)
	})
}

// overrides collects the --set PATH=VALUE flags of a command.
type overrides []scene.Edit

func (o *overrides) String() string { return "" }

// Set takes one PATH=VALUE; the value is JSON text.
func (o *overrides) Set(text string) error {
	path, value, ok := strings.Cut(text, "=")
	if !ok || path == "" {
		return fmt.Errorf("%s: write PATH=VALUE, e.g. foil.thickness_nm=80", cutQuoted(fmt.Sprintf("%q", text)))
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
