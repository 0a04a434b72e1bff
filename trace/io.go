// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"
)

// WriteJSON writes t as indented JSON. The output depends only on t, so
// equal traces give byte-identical output.
func (t *Trace) WriteJSON(w io.Writer) error {
	b, err := json.MarshalIndent(t, "", " ")
	if err != nil {
		return fmt.Errorf("trace: %w", err)
	}
	b = append(b, '\n')
	_, err = w.Write(b)
	return err
}

// ReadJSON reads a trace written by WriteJSON. It rejects an unknown
// schema version, unknown fields, a stage list that breaks the layout
// (input first, indices in order, classes matching the sample), counts
// out of range or disagreeing lengths, and traces beyond MaxJSONBytes,
// MaxStages, MaxClasses or MaxTraceBars; decoding errors give the line
// and column.
func ReadJSON(r io.Reader) (*Trace, error) {
	data, err := readJSONBytes(r)
	if err != nil {
		return nil, err
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, errors.New("trace: the file is empty, want a trace in JSON")
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var w traceWire
	if err := dec.Decode(&w); err != nil {
		return nil, jsonError(data, err)
	}
	t := *w.trace()
	if t.Schema != SchemaVersion && t.Schema != 1 {
		return nil, fmt.Errorf("trace: schema version %d, this build reads 1 and %d", t.Schema, SchemaVersion)
	}
	if err := t.validate(); err != nil {
		return nil, err
	}
	for i := range t.Stages {
		s := &t.Stages[i]
		switch {
		case s.Index != i:
			return nil, fmt.Errorf("trace: stage %d has index %d", i, s.Index)
		case (i == 0) != (s.Kind == KindInput):
			return nil, fmt.Errorf("trace: stage %d has kind %q; only stage 0 is %q", i, s.Kind, KindInput)
		case len(s.Classes) != len(t.Sample.Classes):
			return nil, fmt.Errorf("trace: stage %d has %d classes, the sample %d", i, len(s.Classes), len(t.Sample.Classes))
		}
		for c := range s.Classes {
			if s.Classes[c].Label != t.Sample.Classes[c] {
				return nil, fmt.Errorf("trace: stage %d class %d is %q, want %q", i, c, s.Classes[c].Label, t.Sample.Classes[c])
			}
		}
	}
	return &t, nil
}

// WriteCSV writes t in long form with the header
// stage,kind,class,measure,value: one row per stage, group and measure
// (see Stage.Value for names). The class is empty for the whole sample
// and for stage measures.
func (t *Trace) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"stage", "kind", "class", "measure", "value"}); err != nil {
		return err
	}
	names := t.MeasureNames()
	for i := range t.Stages {
		s := &t.Stages[i]
		classes := append([]string{""}, t.Sample.Classes...)
		for _, c := range classes {
			for _, m := range names {
				if c != "" && isStageMeasure(m) {
					if _, own := s.Group(c).Measures[m]; !own {
						continue
					}
				}
				v, ok := s.Value(c, m)
				if !ok {
					continue
				}
				rec := []string{strconv.Itoa(s.Index), string(s.Kind), c, m, strconv.FormatFloat(v, 'g', -1, 64)}
				if err := cw.Write(rec); err != nil {
					return err
				}
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// isStageMeasure reports whether the measure belongs to the stage, not
// a group.
func isStageMeasure(m string) bool {
	switch {
	case m == "count" || m == "diameter" || m == "scale" || m == "threshold":
		return false
	case strings.HasPrefix(m, "betti.") || strings.HasPrefix(m, "bars."):
		return false
	}
	return true
}

// Table returns the per-stage table that WriteTable prints and the
// report shows, as a header and one row of cells per stage: stage,
// kind, width, the whole sample's Betti numbers, each class's Betti
// numbers, the glued pair counts, and the separation of the classes:
// leave-one-out k-NN accuracy ("knn.accuracy"), linear-probe accuracy
// ("probe.accuracy") and the margin ratio ("margin.ratio"), "-" where
// not measured.
func (t *Trace) Table() (header []string, rows [][]string) {
	header = append([]string{"stage", "kind", "width", "whole"}, t.Sample.Classes...)
	header = append(header, "glued within", "glued cross", "knn", "probe", "margin")
	for i := range t.Stages {
		s := &t.Stages[i]
		row := []string{strconv.Itoa(s.Index), string(s.Kind), strconv.Itoa(s.Width), s.Whole.BettiString()}
		for c := range s.Classes {
			row = append(row, s.Classes[c].BettiString())
		}
		if s.Glued != nil {
			row = append(row, strconv.Itoa(s.Glued.Within), strconv.Itoa(s.Glued.Cross))
		} else {
			row = append(row, "-", "-")
		}
		for _, m := range [...]struct {
			name, format string
		}{{"knn.accuracy", "%.3f"}, {"probe.accuracy", "%.3f"}, {"margin.ratio", "%.3g"}} {
			if v, ok := s.Measures[m.name]; ok {
				row = append(row, fmt.Sprintf(m.format, v))
			} else {
				row = append(row, "-")
			}
		}
		rows = append(rows, row)
	}
	return header, rows
}

// WriteTable writes Table, aligned in columns.
func (t *Trace) WriteTable(w io.Writer) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	header, rows := t.Table()
	fmt.Fprintln(tw, strings.Join(header, "\t"))
	for _, r := range rows {
		fmt.Fprintln(tw, strings.Join(r, "\t"))
	}
	return tw.Flush()
}

// bettiString formats Betti numbers as (b0, b1, ...), "-" when absent.
func bettiString(b []int) string { return readingString(b, nil) }

// readingString formats Betti numbers as (b0, b1, ...), each followed
// by "?" where conf says the dimension is undetermined; "-" when absent.
// A nil conf marks nothing.
func readingString(b []int, conf []bool) string {
	if len(b) == 0 {
		return "-"
	}
	parts := make([]string, len(b))
	for i, v := range b {
		parts[i] = strconv.Itoa(v)
		if conf != nil && (i >= len(conf) || !conf[i]) {
			parts[i] += "?"
		}
	}
	return "(" + strings.Join(parts, ",") + ")"
}

// BettiString formats the group's Betti numbers as (b0,b1,…), with "?"
// after each undetermined dimension, e.g. "(1,2,?)" reads "(1,2,1?)".
func (g *Group) BettiString() string {
	if g.BettiConfident == nil {
		return bettiString(g.Betti)
	}
	return readingString(g.Betti, g.BettiConfident)
}

// RuleText describes how the Betti numbers of a trace with these
// (resolved) settings were read, for tables and reports.
func (s Settings) RuleText() string {
	var p string
	switch s.Rule {
	case ScaleRatio:
		p = fmt.Sprintf("α = %g, k = %d", s.Alpha, s.K)
	case ScaleRelative:
		p = fmt.Sprintf("ε = %g × diameter", s.Scale)
	case ScalePersistence:
		p = fmt.Sprintf("persistence ≥ %g × diameter", s.Persistence)
	case ScaleHops:
		p = fmt.Sprintf("k = %d, %d hops", s.K, s.Hops)
	}
	return fmt.Sprintf("rule %s (%s): %s; \"?\" marks a dimension the sample cannot decide", s.Rule, p, s.Rule.Describe())
}

// String returns the per-stage table of WriteTable.
func (t *Trace) String() string {
	var b strings.Builder
	t.WriteTable(&b)
	return b.String()
}

// settingsV1 holds the settings keys of schema version 1, read for one
// release beside the current ones.
type settingsV1 struct {
	MaxDim       *int     `json:"maxdim"`
	Scale        *float64 `json:"scale"`
	Persistence  *float64 `json:"persistence"`
	MaxThreshold *float64 `json:"max_threshold"`
	K            *int     `json:"k"`
	Cap          *int     `json:"cap"`
}

// traceWire is a Trace as ReadJSON decodes it: its settings may use
// the keys of schema version 1. (The Settings field, shallower than the
// embedded one, takes its key.)
type traceWire struct {
	tracePlain
	Settings struct {
		settingsPlain
		settingsV1
	} `json:"settings"`
}

type (
	tracePlain    Trace
	settingsPlain Settings
)

// trace returns the decoded trace, old settings keys moved to their
// current fields.
func (w *traceWire) trace() *Trace {
	t := Trace(w.tracePlain)
	t.Settings = Settings(w.Settings.settingsPlain)
	s, old := &t.Settings, &w.Settings.settingsV1
	for _, f := range []struct{ from, to *int }{{old.MaxDim, &s.MaxDim}, {old.K, &s.K}, {old.Cap, &s.Cap}} {
		if f.from != nil {
			*f.to = *f.from
		}
	}
	for _, f := range []struct{ from, to *float64 }{{old.Scale, &s.Scale}, {old.Persistence, &s.Persistence}, {old.MaxThreshold, &s.MaxThreshold}} {
		if f.from != nil {
			*f.to = *f.from
		}
	}
	return &t
}
