// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
)

// Limits of Run and ReadJSON: a model, sample or trace larger than these
// is refused, so that a small hostile file cannot make a run, compare or
// report take long or write a huge report.
const (
	// MaxJSONBytes is the largest trace file read (256 MiB, the limit
	// of a model file and of a CSV sample too; a trace of 10^5 points
	// at ten stages takes about 50 MB).
	MaxJSONBytes = 256 << 20
	// MaxStages is the most stages a trace may record, the input
	// included (a deep MLP has a few hundred).
	MaxStages = 1024
	// MaxClasses is the most classes a sample or trace may hold.
	MaxClasses = 1000
	// MaxTraceBars is the most bars a trace may hold over all its
	// groups and stages.
	MaxTraceBars = 10_000_000
)

// readJSONBytes reads at most MaxJSONBytes of r. A regular file larger
// than that is refused before it is read (its size comes from Stat), and
// input whose first byte other than white space is not '{' (a device, a
// binary file) is refused before the rest is read, so neither a huge
// file nor an endless stream costs memory.
func readJSONBytes(r io.Reader) ([]byte, error) {
	tooBig := fmt.Errorf("trace: the file is larger than %d bytes (MaxJSONBytes)", MaxJSONBytes)
	var buf bytes.Buffer
	sized := false // the size is known and the buffer holds it
	if s, ok := r.(interface{ Stat() (fs.FileInfo, error) }); ok {
		if fi, err := s.Stat(); err == nil && fi.Mode().IsRegular() {
			if fi.Size() > MaxJSONBytes {
				return nil, tooBig
			}
			buf.Grow(int(fi.Size()) + bytes.MinRead)
			sized = true
		}
	}
	br := bufio.NewReader(io.LimitReader(r, MaxJSONBytes+1))
	for {
		c, err := br.ReadByte()
		if err == io.EOF {
			return buf.Bytes(), nil
		}
		if err != nil {
			return nil, fmt.Errorf("trace: %w", err)
		}
		buf.WriteByte(c)
		if !isJSONSpace(c) {
			if c != '{' {
				data := buf.Bytes()
				return nil, atOffset(data, int64(len(data)), fmt.Errorf("byte %q where a trace starts with '{'", c))
			}
			break
		}
		if buf.Len() > maxLeadingSpace {
			return nil, fmt.Errorf("trace: no '{' in the first %d bytes, only white space", maxLeadingSpace)
		}
	}
	if sized {
		if _, err := br.WriteTo(&buf); err != nil {
			return nil, fmt.Errorf("trace: %w", err)
		}
		if buf.Len() > MaxJSONBytes {
			return nil, tooBig
		}
		return buf.Bytes(), nil
	}
	// A stream is read in chunks of 1 MiB, so refusing one costs at most
	// MaxJSONBytes, and joined once it has ended.
	chunks := [][]byte{bytes.Clone(buf.Bytes())}
	n := buf.Len()
	for {
		c := make([]byte, 1<<20)
		k, err := io.ReadFull(br, c)
		n += k
		if n > MaxJSONBytes {
			return nil, tooBig
		}
		chunks = append(chunks, c[:k])
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("trace: %w", err)
		}
	}
	return bytes.Join(chunks, nil), nil
}

// maxLeadingSpace is the most white space read before a trace's '{'.
const maxLeadingSpace = 64 << 10

// isJSONSpace reports whether c is white space in JSON.
func isJSONSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r'
}

// jsonError adds the line and column of a decoding error's offset.
func jsonError(data []byte, err error) error {
	var off int64 = -1
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		off = se.Offset
	case errors.As(err, &te):
		off = te.Offset
	}
	return atOffset(data, off, err)
}

// atOffset adds to err the line and column of the byte that ends the
// first off bytes of data (the offsets of encoding/json count the bytes
// read, the offending one included).
func atOffset(data []byte, off int64, err error) error {
	if off <= 0 || off > int64(len(data)) {
		return fmt.Errorf("trace: %w", err)
	}
	off--
	line := 1 + bytes.Count(data[:off], []byte{'\n'})
	col := int(off) - bytes.LastIndexByte(data[:off], '\n')
	return fmt.Errorf("trace: line %d, column %d: %w", line, col, err)
}

// validate checks what WriteJSON never writes: counts out of range,
// lengths that disagree, and sizes beyond the limits.
func (t *Trace) validate() error {
	s := &t.Settings
	switch {
	case s.MaxDim < 0 || s.MaxDim > 3:
		return fmt.Errorf("trace: settings.top_dim %d outside 0..3", s.MaxDim)
	case len(t.Stages) > MaxStages:
		return fmt.Errorf("trace: %d stages, above the limit of %d (MaxStages)", len(t.Stages), MaxStages)
	case len(t.Sample.Classes) > MaxClasses:
		return fmt.Errorf("trace: %d classes, above the limit of %d (MaxClasses)", len(t.Sample.Classes), MaxClasses)
	case len(t.Sample.Labels) != len(t.Sample.Indices):
		return fmt.Errorf("trace: sample has %d labels for %d rows", len(t.Sample.Labels), len(t.Sample.Indices))
	case t.Sample.Rows < 0 || t.Sample.Width < 0:
		return fmt.Errorf("trace: sample rows %d, width %d: negative", t.Sample.Rows, t.Sample.Width)
	}
	for i, l := range t.Sample.Labels {
		if l < 0 || l >= len(t.Sample.Classes) {
			return fmt.Errorf("trace: sample.labels[%d] = %d outside 0..%d", i, l, len(t.Sample.Classes)-1)
		}
	}
	if u := t.Sample.Units; u != nil && u.Units != nil {
		if len(u.Units) != len(t.Sample.Classes) {
			return fmt.Errorf("trace: sample.units has %d units for %d classes", len(u.Units), len(t.Sample.Classes))
		}
		for c, v := range u.Units {
			if v < 0 || v >= len(u.Units) {
				return fmt.Errorf("trace: sample.units.units[%d] = %d outside 0..%d", c, v, len(u.Units)-1)
			}
		}
	}
	bars := 0
	for i := range t.Stages {
		st := &t.Stages[i]
		if st.Width < 0 || st.In < 0 {
			return fmt.Errorf("trace: stage %d: negative width", i)
		}
		if g := st.Glued; g != nil && (g.Within < 0 || g.Cross < 0 || g.Total != g.Within+g.Cross) {
			return fmt.Errorf("trace: stage %d: glued counts total %d, within %d, cross %d do not add up", i, g.Total, g.Within, g.Cross)
		}
		groups := []*Group{&st.Whole}
		for c := range st.Classes {
			groups = append(groups, &st.Classes[c])
		}
		for gi, g := range groups {
			name := "whole sample"
			if gi > 0 {
				name = fmt.Sprintf("class %q", g.Label)
			}
			if err := g.validate(s.MaxDim); err != nil {
				return fmt.Errorf("trace: stage %d, %s: %w", i, name, err)
			}
			for _, b := range g.Bars {
				bars += len(b)
			}
			if bars > MaxTraceBars {
				return fmt.Errorf("trace: more than %d bars (MaxTraceBars)", MaxTraceBars)
			}
		}
	}
	return nil
}

// validate checks one group against the trace's maxdim.
func (g *Group) validate(maxDim int) error {
	n := len(g.Betti)
	switch {
	case g.Count < 0:
		return fmt.Errorf("count %d is negative", g.Count)
	case n != 0 && n != maxDim+1:
		return fmt.Errorf("%d Betti numbers for maxdim %d", n, maxDim)
	case len(g.BettiConfident) != n:
		return fmt.Errorf("%d betti_confident flags for %d Betti numbers", len(g.BettiConfident), n)
	case len(g.Evidence) != 0 && len(g.Evidence) != n:
		return fmt.Errorf("%d evidence entries for %d Betti numbers", len(g.Evidence), n)
	case len(g.Bars) != 0 && len(g.Bars) != maxDim+1:
		return fmt.Errorf("bars of %d dimensions for maxdim %d", len(g.Bars), maxDim)
	}
	for d, b := range g.Betti {
		// Each counted class is a bar of the group's barcode.
		if b < 0 {
			return fmt.Errorf("betti[%d] = %d is negative", d, b)
		}
		if len(g.Bars) > d && b > len(g.Bars[d]) {
			return fmt.Errorf("betti[%d] = %d, above the %d bars of that dimension", d, b, len(g.Bars[d]))
		}
	}
	for d, bars := range g.Bars {
		for k, b := range bars {
			if !(b.Birth >= 0) || math.IsInf(b.Birth, 0) || !(b.Death >= b.Birth) {
				return fmt.Errorf("bars[%d][%d] = [%v, %v) is not a bar", d, k, b.Birth, b.Death)
			}
		}
	}
	return nil
}
