// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Rule selects how Betti numbers are read from a sample's barcode.
type Rule int

const (
	// RuleRatio is the default. It counts a bar of dimension d ≥ 1 when
	// its death/birth ratio (which no rescaling changes) is significant
	// against the universal null distribution of O. Bobrowski and P.
	// Skraba, "A universal null-distribution for topological data
	// analysis", Scientific Reports 13 (2023), with a Bonferroni
	// correction over the bars of that dimension, and when it dies at
	// least 1.75 times its component's resolution (the 90th percentile
	// of the k-th neighbour distances), past the sample's own spacing.
	// Bars that the Benjamini–Hochberg procedure selects at a false
	// discovery rate of 50 % count too, as a best guess that leaves the
	// dimension undetermined. Components (H0) count when two groups of
	// points, each connected at its own scale, join only at a multiple
	// RatioH0 of that scale. When the cloud reads some class above H0
	// and is not close to isotropic, dimensions d ≥ 1 are counted again
	// on each component whitened along its principal axes (a linear
	// change of coordinates, which changes the Rips filtration but not
	// the topology), and that count is given. A dimension is
	// undetermined when a bar lies close to the significance bound, when
	// the sample gives no room for a cycle of that dimension to show, or
	// when the whitened count differs from the count in the cloud's own
	// coordinates. It is the zero value.
	RuleRatio Rule = iota
	// RuleRelative reads Betti numbers at ε = Scale × diameter.
	RuleRelative
	// RulePersistence counts bars with persistence ≥ Persistence ×
	// diameter.
	RulePersistence
	// RuleHops uses the k-NN hop-count metric and reads at ε = Hops.
	RuleHops
)

// String returns "ratio", "relative", "persistence" or "hops".
func (r Rule) String() string {
	switch r {
	case RuleRatio:
		return "ratio"
	case RuleRelative:
		return "relative"
	case RulePersistence:
		return "persistence"
	case RuleHops:
		return "hops"
	}
	return fmt.Sprintf("Rule(%d)", int(r))
}

// ParseRule parses the String form of a Rule.
func ParseRule(s string) (Rule, error) {
	for r := RuleRatio; r <= RuleHops; r++ {
		if r.String() == s {
			return r, nil
		}
	}
	return 0, fmt.Errorf("%w: unknown reading rule %q (want ratio, relative, persistence or hops)", ErrSettings, s)
}

// MarshalText implements encoding.TextMarshaler.
func (r Rule) MarshalText() ([]byte, error) { return []byte(r.String()), nil }

// UnmarshalText implements encoding.TextUnmarshaler.
func (r *Rule) UnmarshalText(b []byte) error {
	v, err := ParseRule(string(b))
	*r = v
	return err
}

// Describe returns one sentence saying how the rule reads a Betti
// number, for reports and command output.
func (r Rule) Describe() string {
	switch r {
	case RuleRatio:
		return "bars whose death/birth ratio is significant (Bobrowski–Skraba universal null, Bonferroni at 5 %; Benjamini–Hochberg at 50 % as a best guess) and that die past 1.75× the resolution (90th percentile of the 8th-neighbour distances); components that join only at 2.5× their own connection scale; cycles counted in each component's principal coordinates rescaled to unit spread, and left undetermined where that count differs from the raw one"
	case RuleRelative:
		return "bars alive at a fixed fraction of each cloud's diameter"
	case RulePersistence:
		return "bars at least a fixed fraction of each cloud's diameter long"
	case RuleHops:
		return "bars alive at a fixed hop count on the k-nearest-neighbour graph"
	}
	return r.String()
}

// Defaults of ReadSettings. Each value is ours unless its comment names
// a source; the textbook suite in hatcher_suite_test.go measures them.
const (
	// DefaultAlpha is the family-wise significance level of RuleRatio
	// (the usual 5 %, common practice).
	DefaultAlpha = 0.05
	// DefaultRelativeScale is the ε of RuleRelative as a fraction of the
	// diameter (common practice).
	DefaultRelativeScale = 0.1
	// DefaultPersistence is the persistence bound of RulePersistence as
	// a fraction of the diameter (common practice).
	DefaultPersistence = 0.1
	// DefaultK is the neighbour count of RuleHops and of the sampling
	// scale of RuleRatio.
	DefaultK = 8
	// DefaultHops is the hop count at which RuleHops reads.
	DefaultHops = 2
	// RatioH0 is the factor by which two groups of points must lie
	// farther apart than their own connection scales to count as two
	// components under RuleRatio; ratios within a factor of 1.5 of it
	// leave β₀ undetermined.
	RatioH0 = 2.5
	// ratioTau is the barcode threshold of RuleRatio in units of the
	// sampling scale (the largest k-th neighbour distance).
	ratioTau = 8
	// ratioHigh is the barcode threshold of RuleRatio for dimensions 2
	// and up, in units of the scale by which the 1-cycles of noise have
	// died.
	ratioHigh = 3
	// ratioRoom is the least ratio between the largest scale examined
	// and the scale at which d-cycles can first form for a zero reading
	// of dimension d to be confident (and at least the ratio a bar would
	// need to count).
	ratioRoom = 5
	// ratioGray widens the Bonferroni bound: a bar whose p-value is
	// below ratioGray × α / N but not below α / N leaves its dimension
	// undetermined.
	ratioGray = 30
	// ratioBest is the false discovery rate of the best reading: it
	// counts the bars that the Benjamini–Hochberg procedure selects at
	// this rate, marking the dimension undetermined where one of them is
	// above the Bonferroni bound. A lone bar then counts below
	// ratioBest / N, a p-value that a diagram of N noise bars is
	// expected to hold half a bar below: more likely signal than noise.
	ratioBest = 0.5
	// ratioOutlive and ratioResQuantile: a bar counts only if it dies
	// at least ratioOutlive times the resolution of its component, the
	// ratioResQuantile quantile of the distances from its points to
	// their k-th neighbours: cycles that fill in by then lie within the
	// sample's own spacing (measured on the textbook suite at H1: real
	// loops die at 1.78 times that scale or later, noise loops by 1.69
	// times, but for the Z/3 loop of RP², which dies at up to 2.1 times).
	ratioOutlive     = 1.75
	ratioResQuantile = 0.9
	// ratioReach and ratioReachSmall cap the barcode threshold of
	// dimensions 2 and up, as fractions of the enclosing radius, for
	// clouds of more than and at most ratioSmall points: the voids of a
	// sparse sample are born late, and a small cloud affords the room.
	ratioReach      = 0.6
	ratioReachSmall = 0.8
	ratioSmall      = 200
	// ratioMinPoints is the fewest points for a confident reading of a
	// dimension d ≥ 1 (on the textbook suite, samples of 60 points gave
	// confident wrong readings of H1).
	ratioMinPoints = 100
	// ratioPrior and ratioPriorWeight shrink the mean of log log(death /
	// birth) towards a typical value of Rips noise, so that a diagram of
	// one or a few bars can be tested (measured on the noise bars of the
	// textbook suite: the mean is about −2.6 in H1 and −3.4 in H2; the
	// prior is the less negative, so it errs towards "not significant").
	ratioPrior       = -2.4
	ratioPriorWeight = 4
)

// ReadSettings control Read. A nil *ReadSettings means H0 and H1 under
// RuleRatio over Z/2. Zero fields mean the documented defaults.
type ReadSettings struct {
	// Rule is the reading rule; the zero value is RuleRatio.
	Rule Rule
	// MaxDim is the highest dimension read, 0..3 (zero reads H0 only).
	MaxDim int
	// Field is the prime of the coefficients Z/p; zero means 2.
	Field int
	// Alpha is the family-wise significance level of RuleRatio; zero
	// means DefaultAlpha.
	Alpha float64
	// Scale is the ε of RuleRelative as a fraction of the diameter; zero
	// means DefaultRelativeScale.
	Scale float64
	// Persistence is the bound of RulePersistence as a fraction of the
	// diameter; zero means DefaultPersistence.
	Persistence float64
	// MaxThreshold, if positive, caps the barcode threshold of
	// RulePersistence at MaxThreshold × diameter; zero means the
	// enclosing radius.
	MaxThreshold float64
	// K is the neighbour count of RuleHops and of the sampling scale of
	// RuleRatio; zero means DefaultK (reduced to n−1 for small clouds).
	K int
	// Hops is the hop count of RuleHops; zero means DefaultHops.
	Hops int
	// MaxBytes bounds the memory of the barcode computation (see
	// Settings.MaxBytes); zero means DefaultMaxBytes.
	MaxBytes int64
	// Workers bounds the goroutines (see Settings.Workers).
	Workers int
	// Progress, if not nil, receives the barcode computation's progress.
	Progress func(Progress)
}

// Reading is a sample's Betti numbers with their evidence. It is
// immutable once returned and safe for concurrent reads.
type Reading struct {
	// Rule is the rule that made the reading.
	Rule Rule
	// Betti[d] is the best reading of β_d, d = 0..MaxDim.
	Betti []int
	// Confident[d] is true when Betti[d] is significant under the
	// rule's own criterion; false marks the dimension undetermined: the
	// sample cannot decide it, and Betti[d] is only the best guess.
	Confident []bool
	// Evidence[d] says why.
	Evidence []Evidence
	// Barcode is the barcode the reading was taken from, in the units
	// of Scale (hops for RuleHops, the cloud's own units otherwise).
	Barcode *Barcode
	// Scale is the scale the rule read at: ε for RuleRelative and
	// RuleHops, the least persistence counted for RulePersistence, and
	// the sampling scale (the largest k-th neighbour distance) for
	// RuleRatio.
	Scale float64
}

// Evidence is what a reading of one dimension rests on.
type Evidence struct {
	// Lo and Hi bound the scales, in the barcode's units, over which
	// the reading holds: every counted class is alive on [Lo, Hi) (for
	// RuleRelative and RuleHops, Betti_d is constant there). Hi is +Inf
	// when the counted classes outlive the computation; with nothing
	// counted, [Lo, Hi) is the range examined. Lo exceeds Hi when no
	// single scale shows every counted class (parts of the cloud at
	// different scales: a small and a large circle).
	Lo, Hi float64
	// Weakest is the significance of the weakest counted bar and
	// Strongest that of the strongest bar left out: p-values under
	// RuleRatio (smaller is stronger), else the bar's length or, for
	// the scale rules, the width of the stable window relative to ε.
	// Weakest is NaN with nothing counted; Strongest NaN with nothing
	// left out.
	Weakest, Strongest float64
	// Bound is the significance bound a counted bar had to pass (a
	// p-value bound for RuleRatio, RatioH0 for its H0, else the rule's
	// own bound).
	Bound float64
	// Why says why the dimension is undetermined; empty when confident.
	Why string
	// Whitened is true when the count was read on each component in its
	// principal coordinates rescaled to unit spread (RuleRatio on a
	// cloud that is not close to isotropic); Lo and Hi are then in units
	// of that spread.
	Whitened bool
}

// readResolved holds validated ReadSettings.
type readResolved struct {
	ReadSettings
}

func resolveRead(set *ReadSettings) (readResolved, error) {
	var r readResolved
	if set == nil {
		set = &ReadSettings{MaxDim: 1}
	}
	r.ReadSettings = *set
	if r.Rule < RuleRatio || r.Rule > RuleHops {
		return r, fmt.Errorf("%w: unknown reading rule %d", ErrSettings, int(r.Rule))
	}
	if r.Alpha == 0 {
		r.Alpha = DefaultAlpha
	}
	if r.Scale == 0 {
		r.Scale = DefaultRelativeScale
	}
	if r.Persistence == 0 {
		r.Persistence = DefaultPersistence
	}
	if r.K == 0 {
		r.K = DefaultK
	}
	if r.Hops == 0 {
		r.Hops = DefaultHops
	}
	switch {
	case !(r.Alpha > 0 && r.Alpha < 1):
		return r, fmt.Errorf("%w: alpha %v outside (0, 1)", ErrSettings, r.Alpha)
	case !(r.Scale > 0) || math.IsInf(r.Scale, 0):
		return r, fmt.Errorf("%w: relative scale %v must be positive", ErrSettings, r.Scale)
	case !(r.Persistence > 0) || math.IsInf(r.Persistence, 0):
		return r, fmt.Errorf("%w: persistence %v must be positive", ErrSettings, r.Persistence)
	case r.MaxThreshold < 0 || math.IsNaN(r.MaxThreshold):
		return r, fmt.Errorf("%w: max threshold %v must not be negative", ErrSettings, r.MaxThreshold)
	case r.K < 1:
		return r, fmt.Errorf("%w: k %d must be positive", ErrSettings, r.K)
	case r.Hops < 1:
		return r, fmt.Errorf("%w: hops %d must be positive", ErrSettings, r.Hops)
	}
	return r, nil
}

// Read computes the barcode of a point cloud (one point per row) and
// reads its Betti numbers by the rule of set (nil means H0–H1 under
// RuleRatio). Errors are those of Rips; a cloud whose points all
// coincide reads as one point, confidently.
func Read(ctx context.Context, points mat.Matrix, set *ReadSettings) (*Reading, error) {
	r, err := resolveRead(set)
	if err != nil {
		return nil, err
	}
	hs := r.homologySettings()
	ctx = withWorkers(ctx, hs)
	if _, err := resolve(hs); err != nil {
		return nil, err
	}
	c, err := cloudFromMatrix(points)
	if err != nil {
		return nil, err
	}
	if err := c.checkFinite(); err != nil {
		return nil, err
	}
	if c.n < 2 {
		return nil, fmt.Errorf("%w: got %d", ErrTooFewPoints, c.n)
	}
	switch r.Rule {
	case RuleRatio:
		return readRatio(ctx, c, r)
	}
	return readScale(ctx, c, r)
}

func (r readResolved) homologySettings() *Settings {
	return &Settings{MaxDim: r.MaxDim, Field: r.Field, MaxBytes: r.MaxBytes, Workers: r.Workers, Progress: r.Progress}
}

// point returns the reading of a cloud whose points coincide.
func point(r readResolved) *Reading {
	rd := &Reading{Rule: r.Rule, Barcode: &Barcode{
		Bars: make([][]Bar, r.MaxDim+1), MaxDim: r.MaxDim, Field: max(r.Field, 2),
	}}
	rd.Barcode.Bars[0] = []Bar{{0, math.Inf(1)}}
	for d := range r.MaxDim + 1 {
		if d > 0 {
			rd.Barcode.Bars[d] = []Bar{}
		}
		rd.Betti = append(rd.Betti, 0)
		rd.Confident = append(rd.Confident, true)
		rd.Evidence = append(rd.Evidence, Evidence{Lo: 0, Hi: math.Inf(1), Weakest: math.NaN(), Strongest: math.NaN()})
	}
	rd.Betti[0] = 1
	return rd
}

// readScale reads by one of the diameter or hop rules.
func readScale(ctx context.Context, c *cloud, r readResolved) (*Reading, error) {
	hr, _ := resolve(r.homologySettings())
	t, err := euclidean(ctx, c)
	if err != nil {
		return nil, err
	}
	_, diam := enclosingRadius(t)
	if diam == 0 {
		return point(r), nil
	}
	rd := &Reading{Rule: r.Rule}
	switch r.Rule {
	case RuleRelative:
		hr.threshold = r.Scale * diam
		rd.Scale = hr.threshold
	case RulePersistence:
		hr.threshold = math.Inf(1)
		if r.MaxThreshold > 0 {
			hr.threshold = r.MaxThreshold * diam
		}
		rd.Scale = r.Persistence * diam
	case RuleHops:
		hr.metric, hr.k = KNNGeodesic, min(r.K, c.n-1)
		hr.threshold = float64(r.Hops)
		rd.Scale = hr.threshold
		if t, err = knnGeodesic(ctx, t, hr.k); err != nil {
			return nil, err
		}
	}
	bc, err := ripsTriangle(ctx, t, hr)
	if err != nil {
		return nil, err
	}
	if r.Rule == RuleHops {
		bc.Metric, bc.K = KNNGeodesic, hr.k
	}
	rd.Barcode = bc
	for _, bars := range bc.Bars {
		var ev Evidence
		n := 0
		if r.Rule == RulePersistence {
			// Count bars of persistence ≥ P; bars within a factor of 2
			// of P leave the dimension undetermined.
			p := rd.Scale
			ev.Bound, ev.Lo, ev.Hi = p, 0, math.Inf(1)
			ev.Weakest, ev.Strongest = math.NaN(), math.NaN()
			gray := false
			for _, b := range bars {
				l := b.Persistence()
				if l >= p {
					n++
					ev.Lo, ev.Hi = max(ev.Lo, b.Birth), min(ev.Hi, b.Death)
					if math.IsNaN(ev.Weakest) || l < ev.Weakest {
						ev.Weakest = l
					}
					gray = gray || l < 2*p
				} else {
					if math.IsNaN(ev.Strongest) || l > ev.Strongest {
						ev.Strongest = l
					}
					gray = gray || l >= p/2
				}
			}
			if gray {
				ev.Why = "a bar lies within a factor of 2 of the persistence bound"
			}
		} else {
			// Count bars alive at ε; the reading is confident when it
			// stays the same from ε/2 to 2ε.
			eps := rd.Scale
			ev.Lo, ev.Hi = 0, math.Inf(1)
			for _, b := range bars {
				if b.Birth <= eps && eps < b.Death {
					n++
				}
				for _, x := range [2]float64{b.Birth, b.Death} {
					if x <= eps {
						ev.Lo = max(ev.Lo, x)
					} else {
						ev.Hi = min(ev.Hi, x)
					}
				}
			}
			ev.Bound = 2
			ev.Weakest, ev.Strongest = eps/ev.Lo, ev.Hi/eps
			if ev.Lo > eps/2 || ev.Hi < 2*eps {
				ev.Why = "the count changes within a factor of 2 of the scale read"
			}
		}
		rd.Betti = append(rd.Betti, n)
		rd.Confident = append(rd.Confident, ev.Why == "")
		rd.Evidence = append(rd.Evidence, ev)
	}
	return rd, nil
}

// readRatio reads by RuleRatio. It reads β₀ and the barcode in the
// cloud's own coordinates, then, unless the cloud is close to isotropic
// already, reads each dimension d ≥ 1 again on each component in its
// principal coordinates rescaled to unit spread (whiten) and gives that
// count, the sum over the components. A linear map of the sample
// changes its Rips filtration (a stretched circle is an ellipse, whose
// Rips complexes are 2-spheres at some scales: Adamaszek, Adams and
// Reddy, J. Topol. Anal. 11, 2019), but not the topology of the space
// the sample comes from; whitening undoes a stretch, so the count does
// not depend on one. A dimension is confident only when both readings
// are and agree: a count that a linear change of coordinates overturns
// is not one the sample decides. Where the whitening needs more than
// its largest gain (whitenMaxGain), the cloud is thin in its own right
// and keeps its own count, undetermined where the two differ. A cloud
// that reads no class above H0 in its own coordinates, and has no
// significant loop that the resolution (ratioOutlive) left out, keeps
// its reading of H1: a stretch raises the resolution, but whitening
// also stretches the thin directions of arcs and blobs, and on the
// textbook suite it found loops there that are not there. Its voids are
// read again all the same: a stretch flattens a sphere into an
// ellipsoid whose void fills at the scale of its shortest axis, before
// the loops of the sample's noise have died, so that the cloud's own
// coordinates see no class at all.
func readRatio(ctx context.Context, c *cloud, r readResolved) (*Reading, error) {
	rd, groups, err := ratioCore(ctx, c, r)
	if err != nil || r.MaxDim < 1 || groups == nil {
		return rd, err
	}
	// lo is the lowest dimension read again. A dimension with a bar
	// below the bound that the resolution left out (Strongest < Bound)
	// is read again too: a stretch raises the resolution.
	lo := 1
	seen := func(d int) bool { return rd.Betti[d] > 0 || rd.Evidence[d].Strongest < rd.Evidence[d].Bound }
	if !seen(1) && !slices.ContainsFunc(rd.Betti[2:], func(b int) bool { return b > 0 }) {
		if r.MaxDim < 2 {
			return rd, nil
		}
		lo = 2
	}
	var parts []*cloud
	cond := 1.0
	for _, g := range groups {
		w, k := whiten(c, g)
		if w == nil {
			continue
		}
		parts = append(parts, w)
		cond = max(cond, k)
	}
	if cond < whitenMinCond || len(parts) == 0 {
		return rd, nil
	}
	capped := cond >= whitenMaxGain*(1-1e-9)
	reads := make([]*Reading, len(parts))
	for i, w := range parts {
		if reads[i], _, err = ratioCore(ctx, w, r); err != nil {
			return nil, err
		}
	}
	for d := lo; d <= r.MaxDim; d++ {
		raw, rawSure := rd.Betti[d], rd.Confident[d]
		rawWhy := rd.Evidence[d].Why
		sum, sure := 0, true
		ev := Evidence{Lo: 0, Hi: math.Inf(1), Weakest: math.NaN(), Strongest: math.NaN(), Bound: math.Inf(1), Whitened: true}
		for _, wr := range reads {
			sum += wr.Betti[d]
			sure = sure && wr.Confident[d]
			we := wr.Evidence[d]
			ev.Lo, ev.Hi = max(ev.Lo, we.Lo), min(ev.Hi, we.Hi)
			ev.Bound = min(ev.Bound, we.Bound)
			if !math.IsNaN(we.Weakest) && (math.IsNaN(ev.Weakest) || we.Weakest > ev.Weakest) {
				ev.Weakest = we.Weakest
			}
			if !math.IsNaN(we.Strongest) && (math.IsNaN(ev.Strongest) || we.Strongest < ev.Strongest) {
				ev.Strongest = we.Strongest
			}
			if ev.Why == "" {
				ev.Why = we.Why
			}
		}
		switch {
		case sum != raw && capped:
			// The whitening needed more than its largest gain: the
			// cloud is thin along some axes in its own right, not a
			// stretched copy of a rounder one, and blowing those axes
			// up shows its spacing, not its shape. The cloud's own
			// count stands.
			ev = rd.Evidence[d]
			ev.Why = fmt.Sprintf("anisotropy: H%d reads %d in the cloud's own coordinates, the count given, and %d in each component's principal coordinates, which needed more than the largest gain of %g", d, raw, sum, float64(whitenMaxGain))
			rd.Confident[d] = false
			rd.Evidence[d] = ev
			continue
		case sum != raw:
			ev.Why = fmt.Sprintf("anisotropy: H%d reads %d in each component's principal coordinates (condition number %.3g), the count given, and %d in the cloud's own", d, sum, cond, raw)
		case ev.Why == "" && !rawSure:
			ev.Why = rawWhy
		}
		rd.Betti[d] = sum
		rd.Confident[d] = sure && rawSure && sum == raw
		rd.Evidence[d] = ev
	}
	return rd, nil
}

// ratioCore makes the reading of RuleRatio without the anisotropy
// guard. It also returns the points of each component counted in β₀
// (nil for a cloud whose points coincide).
func ratioCore(ctx context.Context, c *cloud, r readResolved) (*Reading, [][]int, error) {
	hr, _ := resolve(r.homologySettings())
	t, err := euclidean(ctx, c)
	if err != nil {
		return nil, nil, err
	}
	n := c.n
	k := min(r.K, n-1)
	// s, the sampling scale, is the largest distance from a point to its
	// k-th nearest neighbour.
	kth := kthDistances(t, nil, k)
	s := slices.Max(kth)
	enc, _ := enclosingRadius(t)
	thr := min(enc, ratioTau*s)
	if !(thr > 0) {
		return point(r), nil, nil
	}
	hr.threshold = thr
	low := hr
	low.maxDim = min(hr.maxDim, 1)
	bc, err := ripsTriangle(ctx, t, low)
	if err != nil {
		return nil, nil, err
	}
	b0, ev0, conn, groups := readComponents(t, r)
	// res holds each counted component's own resolution, ascending
	// (groupScale): the scale against which a bar is judged.
	var res []float64
	for _, g := range groups {
		res = append(res, groupScale(t, g, k, kth))
	}
	if len(res) == 0 {
		res = append(res, s)
	}
	slices.Sort(res)
	thrs := []float64{thr, thr}
	if r.MaxDim >= 2 {
		// Cycles of dimension 2 and up form only once the 1-cycles of
		// the sample's own noise have died: read them up to ratioHigh
		// times that scale, on the collapsed edges.
		_, _, fill1, _ := readCycles(bc.Bars[1], thr, bc.Truncated, r.Alpha, res)
		reach := ratioReach
		if n <= ratioSmall {
			reach = ratioReachSmall
		}
		t2 := min(thr, ratioHigh*max(fill1, conn), reach*enc)
		sp, err := CollapseEdges(ctx, t, t2)
		if err != nil {
			return nil, nil, err
		}
		high := hr
		high.threshold = t2
		hb, err := ripsSparse(ctx, sp, high)
		if err != nil {
			return nil, nil, err
		}
		bc.Bars = append(bc.Bars, hb.Bars[2:]...)
		bc.MaxDim = r.MaxDim
		for d := 2; d <= r.MaxDim; d++ {
			thrs = append(thrs, t2)
		}
	}
	rd := &Reading{Rule: RuleRatio, Barcode: bc, Scale: s}
	rd.Betti = append(rd.Betti, b0)
	rd.Confident = append(rd.Confident, ev0.Why == "")
	rd.Evidence = append(rd.Evidence, ev0)
	// fill is the scale by which cycles of the dimension below have
	// formed and the noise among them has died.
	fill := conn
	for d := 1; d <= r.MaxDim; d++ {
		nb, ev, f, need := readCycles(bc.Bars[d], thrs[d], thrs[d] < enc, r.Alpha, res)
		if ev.Why == "" && n < ratioMinPoints {
			ev.Why = fmt.Sprintf("too few points: %d, want at least %d for a confident reading of H%d", n, ratioMinPoints, d)
		}
		// A zero is confident only if a class born where d-cycles can
		// first form, at fill, and alive to the largest scale examined
		// would have counted, with room to spare (ratioRoom).
		room, want := thrs[d]/fill, max(need, ratioRoom)
		if ev.Why == "" && nb == 0 && room < want {
			ev.Why = fmt.Sprintf("no room: the largest scale examined is %.2g× the scale at which %d-cycles can form (want %.2g×)", room, d, want)
		}
		rd.Betti = append(rd.Betti, nb)
		rd.Confident = append(rd.Confident, ev.Why == "")
		rd.Evidence = append(rd.Evidence, ev)
		if f > 0 {
			fill = max(fill, f)
		}
	}
	return rd, groups, nil
}

// eulerGamma is the Euler–Mascheroni constant.
const eulerGamma = 0.5772156649015329

// readCycles reads one dimension d ≥ 1 by the ratio rule. It returns
// the count, the evidence, the largest death among the bars left out
// (the scale by which the noise of this dimension has died) and the
// least death/birth ratio one more bar would need to count.
func readCycles(bars []Bar, thr float64, truncated bool, alpha float64, res []float64) (int, Evidence, float64, float64) {
	ev := Evidence{Lo: 0, Hi: thr, Weakest: math.NaN(), Strongest: math.NaN()}
	n := len(bars)
	if n == 0 {
		ev.Bound = alpha
		return 0, ev, 0, ratioNeed(ratioPrior, alpha)
	}
	ll := make([]float64, n)
	open := make([]bool, n) // alive at the threshold
	var sum float64
	for i, b := range bars {
		death := b.Death
		if math.IsInf(death, 1) {
			death, open[i] = thr, truncated
			if !truncated {
				// An essential class of a complete computation.
				death = math.Inf(1)
			}
		}
		pi := death / b.Birth
		switch {
		case b.Birth <= 0 || math.IsInf(pi, 1):
			ll[i] = 10 // far beyond any bound (log log of e^e^10)
		default:
			ll[i] = max(math.Log(math.Log(pi)), -40)
		}
		sum += ll[i]
	}
	bound := alpha / float64(n)
	ev.Bound = bound
	ps := make([]float64, n)
	short := make([]bool, n) // dies within ratioOutlive × its resolution
	for i, b := range bars {
		// Leave-one-out mean, shrunk towards the prior.
		mean := (sum - ll[i] + ratioPrior*ratioPriorWeight) / float64(n-1+ratioPriorWeight)
		ps[i] = math.Exp(-math.Exp(ll[i] - mean - eulerGamma))
		short[i] = min(b.Death, thr) < ratioOutlive*resolution(res, b.Birth)
	}
	// The best reading counts the bars that outlive ratioOutlive × their
	// resolution and that the Benjamini–Hochberg procedure selects at
	// false discovery rate max(α, ratioBest) among all N bars.
	cut := stepUpCut(ps, short, max(alpha, ratioBest))
	count, gray := 0, ""
	var fill float64
	ev.Lo, ev.Hi = 0, math.Inf(1)
	for i, b := range bars {
		p := ps[i]
		if !short[i] && p <= cut {
			count++
			if p >= bound && gray == "" {
				gray = fmt.Sprintf("a bar [%.3g, %.3g) has p = %.2g, above the bound %.2g; counted as the best guess", b.Birth, b.Death, p, bound)
			}
			ev.Lo = max(ev.Lo, b.Birth)
			ev.Hi = min(ev.Hi, b.Death)
			if math.IsNaN(ev.Weakest) || p > ev.Weakest {
				ev.Weakest = p
			}
			continue
		}
		if math.IsNaN(ev.Strongest) || p < ev.Strongest {
			ev.Strongest = p
		}
		if !math.IsInf(b.Death, 1) {
			fill = max(fill, b.Death)
		}
		switch {
		case short[i] && p < bound && gray == "":
			gray = fmt.Sprintf("a bar [%.3g, %.3g) has p = %.2g, below the bound %.2g, but dies within %.3g× the resolution %.3g (a quantile of the neighbour distances)", b.Birth, b.Death, p, bound, ratioOutlive, resolution(res, b.Birth))
		case open[i]:
			gray = fmt.Sprintf("a bar born at %.3g is still alive at the threshold %.3g and its significance is not settled", b.Birth, thr)
		case p < ratioGray*bound && gray == "":
			gray = fmt.Sprintf("a bar [%.3g, %.3g) has p = %.2g, close to the bound %.2g", b.Birth, b.Death, p, bound)
		}
	}
	if count == 0 {
		ev.Lo, ev.Hi = 0, thr
	}
	ev.Why = gray
	mean := (sum + ratioPrior*ratioPriorWeight) / float64(n+ratioPriorWeight)
	return count, ev, fill, ratioNeed(mean, alpha/float64(n+1))
}

// stepUpCut returns the largest p-value that the step-up procedure of
// Benjamini and Hochberg (J. R. Stat. Soc. B 57, 1995) selects at false
// discovery rate q among the N = len(ps) p-values, those marked skip
// taking p = 1: p₍ₖ₎ for the largest k with p₍ₖ₎ < k q / N, or −Inf.
func stepUpCut(ps []float64, skip []bool, q float64) float64 {
	sorted := make([]float64, 0, len(ps))
	for i, p := range ps {
		if !skip[i] {
			sorted = append(sorted, p)
		}
	}
	slices.Sort(sorted)
	cut := math.Inf(-1)
	for k, p := range sorted {
		if p < float64(k+1)*q/float64(len(ps)) {
			cut = p
		}
	}
	return cut
}

// ratioNeed returns the least death/birth ratio π at which a bar passes
// the bound under the universal null: exp(−e^ℓ) < bound with
// ℓ = log log π − mean − γ.
func ratioNeed(mean, bound float64) float64 {
	return math.Exp(math.Exp(mean + eulerGamma + math.Log(-math.Log(bound))))
}

// readComponents reads β₀ by the ratio rule from the minimum spanning
// tree of the distances. It returns the count, the evidence, the
// connection scale (the longest tree edge that joins noise, the scale
// by which the cloud's pieces are each connected) and the points of
// each counted component.
func readComponents(t *LowerTriangular, r readResolved) (int, Evidence, float64, [][]int) {
	n := t.N
	edges := mst(t)
	minSize := max(5, n/25)
	parent := make([]int32, n)
	size := make([]int, n)
	scale := make([]float64, n) // connection scale of each root
	for i := range parent {
		parent[i], size[i] = int32(i), 1
	}
	var find func(i int32) int32
	find = func(i int32) int32 {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	ev := Evidence{Lo: 0, Hi: math.Inf(1), Weakest: math.NaN(), Strongest: math.NaN(), Bound: RatioH0}
	count := 1
	var conn float64
	cut := make([]bool, len(edges))
	for ei, e := range edges {
		a, b := find(e.a), find(e.b)
		if size[a] < size[b] {
			a, b = b, a
		}
		f := max(scale[a], scale[b])
		ratio := math.Inf(1)
		if f > 0 {
			ratio = e.d / f
		}
		big := min(size[a], size[b]) >= minSize
		switch {
		case big && ratio >= RatioH0:
			count++
			cut[ei] = true
			ev.Lo = max(ev.Lo, f)
			ev.Hi = min(ev.Hi, e.d)
			if math.IsNaN(ev.Weakest) || ratio < ev.Weakest {
				ev.Weakest = ratio
			}
			if ratio < 1.5*RatioH0 && ev.Why == "" {
				ev.Why = fmt.Sprintf("two groups of %d and %d points join at %.3g, only %.2g× their connection scale", size[b], size[a], e.d, ratio)
			}
			scale[a] = f
		default:
			if big {
				if math.IsNaN(ev.Strongest) || ratio > ev.Strongest {
					ev.Strongest = ratio
				}
				if ratio >= RatioH0/1.5 && ev.Why == "" {
					ev.Why = fmt.Sprintf("two groups of %d and %d points join at %.3g, %.2g× their connection scale, close to the bound %v", size[b], size[a], e.d, ratio, RatioH0)
				}
			}
			scale[a] = max(f, e.d)
			conn = max(conn, e.d)
		}
		parent[b] = a
		size[a] += size[b]
	}
	if count == 1 {
		ev.Lo, ev.Hi = conn, math.Inf(1)
	}
	// The components: the tree without its counted edges.
	for i := range parent {
		parent[i] = int32(i)
	}
	for ei, e := range edges {
		if !cut[ei] {
			parent[find(e.a)] = find(e.b)
		}
	}
	index := make(map[int32]int, count)
	groups := make([][]int, 0, count)
	for i := range n {
		root := find(int32(i))
		g, ok := index[root]
		if !ok {
			g = len(groups)
			index[root] = g
			groups = append(groups, nil)
		}
		groups[g] = append(groups[g], i)
	}
	return count, ev, conn, groups
}

type mstEdge struct {
	d    float64
	a, b int32
}

// mst returns the edges of a minimum spanning tree of the distances
// (Prim's algorithm on the dense matrix), sorted by length.
func mst(t *LowerTriangular) []mstEdge {
	n := t.N
	in := make([]bool, n)
	best := make([]float64, n)
	from := make([]int32, n)
	for i := range best {
		best[i] = math.Inf(1)
	}
	edges := make([]mstEdge, 0, n-1)
	cur := 0
	in[0] = true
	for len(edges) < n-1 {
		next, nd := -1, math.Inf(1)
		for j := range n {
			if in[j] {
				continue
			}
			if d := t.Dist(cur, j); d < best[j] {
				best[j], from[j] = d, int32(cur)
			}
			if next < 0 || best[j] < nd {
				next, nd = j, best[j]
			}
		}
		in[next] = true
		edges = append(edges, mstEdge{nd, from[next], int32(next)})
		cur = next
	}
	slices.SortStableFunc(edges, func(x, y mstEdge) int {
		switch {
		case x.d < y.d:
			return -1
		case x.d > y.d:
			return 1
		}
		return 0
	})
	return edges
}

// kthDistances returns, for each point idx[i] of t (every point when
// idx is nil), the distance to its k-th nearest neighbour among the
// points idx; k < the number of points.
func kthDistances(t *LowerTriangular, idx []int, k int) []float64 {
	m := t.N
	if idx != nil {
		m = len(idx)
	}
	at := func(i int) int {
		if idx == nil {
			return i
		}
		return idx[i]
	}
	row := make([]float64, 0, m)
	kth := make([]float64, m)
	for i := range m {
		row = row[:0]
		a := at(i)
		for j := range m {
			if j != i {
				row = append(row, t.Dist(a, at(j)))
			}
		}
		kth[i] = quickselect(row, k-1)
	}
	return kth
}

// groupScale returns the resolution of the points g of t: the
// ratioResQuantile quantile of the distances from each of them to its
// k-th nearest neighbour among them. Unlike the largest such distance,
// a few outlying points do not move it. k is reduced to √len(g) (the
// usual bound of k-nearest-neighbour density estimates, k ≪ n; common
// practice): the 8th neighbours of a 24-point circle are a third of the
// way round, past the scale at which its loop fills. all, if not nil,
// holds kthDistances(t, nil, k), reused when g is every point and k is
// not reduced.
func groupScale(t *LowerTriangular, g []int, k int, all []float64) float64 {
	kg := min(k, int(math.Sqrt(float64(len(g)))), len(g)-1)
	if kg < 1 {
		return 0
	}
	var kth []float64
	if all != nil && kg == k && len(g) == t.N {
		kth = slices.Clone(all)
	} else {
		kth = kthDistances(t, g, kg)
	}
	return quickselect(kth, int(ratioResQuantile*float64(len(kth)-1)+0.5))
}

// resolution returns the scale against which a bar born at birth is
// judged: of the components' own resolutions res (ascending), the one
// nearest to birth by ratio. A cycle is born at about the spacing of
// the component it lies in, so a bar of a dense component is not
// judged at the scale of a sparse one.
func resolution(res []float64, birth float64) float64 {
	i, _ := slices.BinarySearch(res, birth)
	switch {
	case i == len(res):
		return res[i-1]
	case i > 0 && birth*birth > res[i-1]*res[i]:
		// birth is nearer res[i] by ratio; fall through to it.
	case i > 0:
		return res[i-1]
	}
	return res[i]
}

// quickselect returns the k-th smallest element (0-based) of a,
// reordering a.
func quickselect(a []float64, k int) float64 {
	lo, hi := 0, len(a)-1
	for lo < hi {
		p := a[(lo+hi)/2]
		i, j := lo, hi
		for i <= j {
			for a[i] < p {
				i++
			}
			for a[j] > p {
				j--
			}
			if i <= j {
				a[i], a[j] = a[j], a[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return a[k]
		}
	}
	return a[k]
}
