// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"os/signal"
	"path/filepath"
	"regexp"
	"sort"
	"syscall"
)

// command is one subcommand of crease. Each subcommand lives in its own
// file and registers itself from an init function.
type command struct {
	name    string
	summary string
	// run executes the subcommand with the arguments after its name.
	// It returns an error wrapped by usageError or checkFailed to pick
	// the exit status; any other error exits with status 2.
	run func(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error
}

var commands = map[string]*command{}

func register(c *command) {
	if _, dup := commands[c.name]; dup {
		panic("crease: duplicate command " + c.name)
	}
	commands[c.name] = c
}

// errCheckFailed marks a check requested by the user that failed: exit 1.
var errCheckFailed = errors.New("check failed")

// checkFailed returns an error that makes crease exit with status 1.
func checkFailed(format string, args ...any) error {
	return fmt.Errorf("%w: %s", errCheckFailed, fmt.Sprintf(format, args...))
}

func main() {
	// SIGTERM stops a run like SIGINT: the work is cancelled, temporary
	// files are removed and crease exits with status 130.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	newFileMode() // read the umask before any goroutine creates a file
	code := creaseMain(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// Exit statuses of crease.
const (
	exitOK          = 0   // success
	exitCheckFailed = 1   // a check the user asked for failed
	exitBadInput    = 2   // bad input or usage
	exitInternal    = 3   // an internal error (a recovered panic)
	exitInterrupted = 130 // SIGINT or SIGTERM (128 + SIGINT's number, the shells' custom)
)

// creaseMain runs crease with args and returns the exit status (see
// the exit constants).
func creaseMain(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "crease: internal error: %v\nThis is a bug in crease; please report it with the command line and, if you can, the input files.\n", r)
			code = exitInternal
		}
	}()
	if len(args) > 1 && args[0] == "help" {
		// crease help CMD is crease CMD -h.
		args = []string{args[1], "-h"}
	}
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		usage(stderr)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	if args[0] == "version" || args[0] == "--version" {
		fmt.Fprintln(stdout, "crease", Version)
		return 0
	}
	c, ok := commands[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "crease: unknown command %q\n", args[0])
		usage(stderr)
		return 2
	}
	err := c.run(ctx, args[1:], stdin, stdout, stderr)
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, errHelp):
		return exitOK
	case ctx.Err() != nil && errors.Is(err, context.Canceled):
		fmt.Fprintf(stderr, "crease %s: interrupted\n", c.name)
		return exitInterrupted
	case errors.Is(err, errCheckFailed):
		fmt.Fprintf(stderr, "crease %s: %s\n", c.name, plain(err))
		return exitCheckFailed
	default:
		fmt.Fprintf(stderr, "crease %s: %s\n", c.name, plain(err))
		return exitBadInput
	}
}

// libraryPrefix matches the "package: " prefixes of the project's
// library errors (Go's convention), which say nothing to a user of the
// command, at the start of the message or of a wrapped part of it.
var libraryPrefix = regexp.MustCompile(`(^|: |\()(onnxload|homology|relu|overlap|trace|tracecheck|knn|csvnum|npy|demo): `)

// plain returns the message of err without the library prefixes.
func plain(err error) string {
	msg := err.Error()
	for {
		next := libraryPrefix.ReplaceAllString(msg, "$1")
		if next == msg {
			return msg
		}
		msg = next
	}
}

// Version is the tool version recorded in traces.
const Version = "0.1.0"

func usage(w io.Writer) {
	fmt.Fprintln(w, "usage: crease <command> [arguments]")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "commands:")
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-9s %s\n", n, commands[n].summary)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Run 'crease <command> -h' for a command's flags.")
}

// errHelp is returned by a command whose flags asked for help.
var errHelp = errors.New("help requested")

// openInput opens name for reading; "-" means stdin. The returned
// closer is never nil.
func openInput(name string, stdin io.Reader) (io.Reader, func() error, string, error) {
	if name == "-" {
		return stdin, func() error { return nil }, "<stdin>", nil
	}
	f, err := os.Open(name)
	if err != nil {
		return nil, nil, name, err
	}
	return f, f.Close, name, nil
}

// prepareOutput makes sure path can be written before any work starts:
// it creates the missing parent folders and checks that a file can be
// made beside path, so a run does not compute for minutes and then fail
// on its output. It leaves nothing behind but the folders.
func prepareOutput(path string) error {
	if fi, err := os.Stat(path); err == nil && fi.IsDir() {
		return fmt.Errorf("%s: is a directory, want a file name", path)
	}
	dir := filepath.Dir(path)
	if err := os.MkdirAll(dir, 0o777); err != nil {
		return fmt.Errorf("%s: cannot create its folder: %v", path, pathErr(err))
	}
	f, err := os.CreateTemp(dir, ".crease-*.tmp")
	if err != nil {
		return fmt.Errorf("%s: cannot write in %s: %v", path, dir, pathErr(err))
	}
	f.Close()
	return os.Remove(f.Name())
}

// pathErr returns the reason of a *fs.PathError without its path (which
// may name a temporary file the user never asked for).
func pathErr(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// output is one file a command writes: its path and what to write.
type output struct {
	path  string
	write func(io.Writer) error
}

// writeFileAtomic writes one file through writeOutputs.
func writeFileAtomic(ctx context.Context, path string, write func(io.Writer) error) error {
	return writeOutputs(ctx, []output{{path, write}})
}

// writeOutputs writes every output to a temporary file in its folder
// and, only once all are written, synced and closed and ctx is not done,
// renames them into place: the outputs of a run are committed together
// or not at all, and a reader never sees a partial file. On an error, a
// cancelled ctx (SIGINT, SIGTERM) or a panic, the temporary files are
// removed and the files replaced are left as they were. A replaced file
// keeps its mode; a new one gets the mode os.Create would give it (0666
// less the umask). Errors name the output, never the temporary file.
func writeOutputs(ctx context.Context, outs []output) (err error) {
	var tmps []string
	committed := false
	defer func() {
		if !committed {
			for _, t := range tmps {
				os.Remove(t)
			}
		}
	}()
	for _, o := range outs {
		dir := filepath.Dir(o.path)
		f, err := os.CreateTemp(dir, ".crease-*.tmp")
		if err != nil {
			return fmt.Errorf("%s: cannot write in %s: %v", o.path, dir, pathErr(err))
		}
		tmps = append(tmps, f.Name())
		if err := writeTemp(f, o); err != nil {
			f.Close()
			return fmt.Errorf("%s: %v", o.path, pathErr(err))
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	for i, o := range outs {
		if err := os.Rename(tmps[i], o.path); err != nil {
			return fmt.Errorf("%s: %v", o.path, pathErr(err))
		}
	}
	committed = true
	return nil
}

// writeTemp writes o into the temporary file f, gives it its mode,
// syncs and closes it.
func writeTemp(f *os.File, o output) error {
	if err := o.write(f); err != nil {
		return err
	}
	mode := newFileMode()
	if fi, err := os.Stat(o.path); err == nil && fi.Mode().IsRegular() {
		mode = fi.Mode().Perm()
	}
	if err := f.Chmod(mode); err != nil {
		return err
	}
	if err := f.Sync(); err != nil {
		return err
	}
	return f.Close()
}
