// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strconv"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/csvnum"
	"crease.dev/crease/trace"
)

// newFlagSet returns a flag set for a subcommand whose errors and help go
// to stderr. Usage is "crease name synopsis".
func newFlagSet(name, synopsis string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: crease %s %s\n", name, synopsis)
		fs.PrintDefaults()
	}
	return fs
}

// deprecate registers old as a deprecated alias of the flag new, kept
// for one release: setting it sets new and warns on warn.
func deprecate(fs *flag.FlagSet, old, new string, warn io.Writer) {
	fs.Var(&alias{target: fs.Lookup(new).Value, old: old, new: "--" + new, warn: warn}, old, "deprecated: use --"+new)
}

// deprecateNegation registers the boolean old as a deprecated alias of
// the negation of the boolean flag new (--whole=false is --skip-whole).
func deprecateNegation(fs *flag.FlagSet, old, new string, warn io.Writer) {
	fs.Var(&alias{target: fs.Lookup(new).Value, old: old, new: "--" + new, warn: warn, negate: true}, old, "deprecated: use --"+new+" (its negation)")
}

// alias is the flag.Value of a deprecated flag name.
type alias struct {
	target   flag.Value
	old, new string
	warn     io.Writer
	negate   bool
}

func (a *alias) String() string { return "" }

func (a *alias) Set(s string) error {
	fmt.Fprintf(a.warn, "crease: --%s is deprecated; use %s\n", a.old, a.new)
	if a.negate {
		b, err := strconv.ParseBool(s)
		if err != nil {
			return err
		}
		s = strconv.FormatBool(!b)
	}
	return a.target.Set(s)
}

// IsBoolFlag makes an alias of a boolean flag a boolean flag.
func (a *alias) IsBoolFlag() bool {
	b, ok := a.target.(interface{ IsBoolFlag() bool })
	return ok && b.IsBoolFlag()
}

// parseFlags parses args with fs, allowing flags after positional
// arguments (crease barcode points.csv --maxdim 2). It returns the
// positional arguments.
func parseFlags(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, errHelp
			}
			return nil, fmt.Errorf("usage: %w", err)
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		if args[0] == "--" {
			return append(pos, args[1:]...), nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

// readPoints reads the numeric table arg ("-" is stdin) into a matrix,
// one row per line. It returns the name to use in messages.
//
// With a label column (labels not empty: a header name or a 1-based
// column number, as for crease trace) it reads the labeled CSV of crease
// trace and drops that column; header is trace's --header.
func readPoints(arg string, stdin io.Reader, labels, header string) (*mat.Dense, string, error) {
	r, closeIn, name, err := openInput(arg, stdin)
	if err != nil {
		return nil, name, err
	}
	if labels != "" {
		s, err := trace.ReadCSV(r, name, &trace.CSVSettings{Label: labels, Header: header})
		closeIn()
		if err != nil {
			return nil, name, err
		}
		return s.X, name, nil
	}
	data, width, err := csvnum.Read(r, name, nil)
	closeIn()
	if err != nil {
		return nil, name, err
	}
	return mat.NewDense(len(data)/width, width, data), name, nil
}
