// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Kind is the kind of a stage.
type Kind int

// Stage kinds.
const (
	Affine      Kind = iota + 1 // y = W·x + B
	ReLU                        // max(x, 0)
	LeakyReLU                   // x if x ≥ 0, else Alpha·x
	ELU                         // x if x > 0, else Alpha·(eˣ − 1)
	Softplus                    // log(1 + eˣ)
	Sigmoid                     // 1 / (1 + e⁻ˣ)
	Tanh                        // tanh x
	Softmax                     // eˣⁱ / Σⱼ eˣʲ over each row
	LogSoftmax                  // xᵢ − log Σⱼ eˣʲ over each row
	Reshape                     // rows unchanged (Flatten, Reshape to (N, −1))
	GELU                        // x·Φ(x) = x·(1 + erf(x/√2))/2 (PyTorch's Erf pattern)
	SiLU                        // x·σ(x) (PyTorch's Sigmoid·Mul pattern)
	ReLU6                       // min(max(x, 0), 6) (Clip with bounds 0 and 6)
	Hardtanh                    // min(max(x, Alpha), Beta) (Clip with other bounds)
	PReLU                       // x if x ≥ 0, else Slope[j]·x for unit j
	HardSigmoid                 // max(0, min(1, Alpha·x + Beta))
	HardSwish                   // x·max(0, min(1, x/6 + 1/2)) (HardSwish, or PyTorch's HardSigmoid·Mul pattern)
	SELU                        // Beta·x if x > 0, else Beta·Alpha·(eˣ − 1)
	CELU                        // x if x > 0, else Alpha·(e^(x/Alpha) − 1)
	Mish                        // x·tanh(log(1 + eˣ)) (PyTorch's Softplus·Tanh·Mul pattern)
	GELUTanh                    // x·(1 + tanh(√(2/π)·(x + 0.044715·x³)))/2 (PyTorch's approximate="tanh" pattern)
)

var kindNames = [...]string{"", "affine", "relu", "leaky-relu", "elu", "softplus", "sigmoid", "tanh", "softmax", "log-softmax", "reshape", "gelu", "silu",
	"relu6", "hardtanh", "prelu", "hardsigmoid", "hardswish", "selu", "celu", "mish", "gelu-tanh"}

// String returns the kind's name, such as "leaky-relu".
func (k Kind) String() string {
	if k > 0 && int(k) < len(kindNames) {
		return kindNames[k]
	}
	return "kind(" + itoa(int64(k)) + ")"
}

// Stage is one step of a model's forward pass: an affine map or a
// row-wise nonlinearity. A Stage is not changed by Apply and is safe for
// concurrent use.
type Stage struct {
	Kind Kind
	// In and Out are the input and output widths.
	In, Out int
	// Name is the module name derived from the origin node names (for
	// "/fc1/Gemm" it is "fc1"); fused stages join names with "+".
	Name string
	// Nodes are the names of the ONNX nodes the stage came from, in graph
	// order. Identity and Dropout nodes are listed with the stage that
	// produced their input; nodes that computed a constant (Constant,
	// Transpose of a weight, shape arithmetic) with the stage using it.
	Nodes []string
	// W is the Out×In weight matrix of an affine stage; nil otherwise.
	W *mat.Dense
	// B is the bias of an affine stage, of length Out; nil otherwise.
	B []float64
	// Alpha and Beta are the scalar parameters of an activation; kinds
	// without parameters leave them zero:
	//
	//	leaky-relu   Alpha is the slope for x < 0
	//	elu, celu    Alpha is the scale (celu: Alpha ≠ 0)
	//	relu6        Alpha = 0 and Beta = 6, the bounds
	//	hardtanh     Alpha and Beta are the lower and upper bounds (±Inf: none)
	//	hardsigmoid  Alpha is the slope and Beta the offset
	//	selu         Alpha is the scale of the negative part and Beta the
	//	             overall scale (ONNX's gamma)
	Alpha, Beta float64
	// Slope holds the slope for x < 0 of each unit of a prelu stage, of
	// length In (the ONNX slope broadcast to one sample); nil otherwise.
	Slope []float64
}

// Pieces returns the breakpoints of a piecewise-linear activation
// stage, strictly increasing and finite, and whether the stage is
// constant on each of the len(breaks)+1 pieces (−∞, breaks[0]],
// (breaks[0], breaks[1]], …, (breaks[last], ∞). ok is false for the
// other kinds, and for a clamp whose bounds leave no piece (Hardtanh
// with lo ≥ hi, Hardsigmoid with Alpha 0).
func (s *Stage) Pieces() (breaks []float64, flat []bool, ok bool) {
	switch s.Kind {
	case ReLU:
		return []float64{0}, []bool{true, false}, true
	case LeakyReLU, PReLU:
		return []float64{0}, []bool{false, false}, true
	case ReLU6, Hardtanh, HardSigmoid:
		lo, hi := s.Alpha, s.Beta
		switch s.Kind {
		case ReLU6:
			lo, hi = 0, 6
		case HardSigmoid:
			// max(0, min(1, αx + β)) is flat where αx + β ∉ (0, 1).
			if s.Alpha == 0 {
				return nil, nil, false
			}
			lo, hi = -s.Beta/s.Alpha, (1-s.Beta)/s.Alpha
			lo, hi = min(lo, hi), max(lo, hi)
		}
		if !(lo < hi) {
			return nil, nil, false
		}
		if !math.IsInf(lo, -1) {
			breaks, flat = append(breaks, lo), append(flat, true)
		}
		flat = append(flat, false)
		if !math.IsInf(hi, 1) {
			breaks, flat = append(breaks, hi), append(flat, true)
		}
		return breaks, flat, len(breaks) > 0
	}
	return nil, nil, false
}

// Apply writes the stage applied to each row of x into dst. x must be
// n×s.In; dst must be empty (it is then allocated) or n×s.Out, and must
// not overlap x. Apply panics if the sizes do not match.
func (s *Stage) Apply(dst *mat.Dense, x mat.Matrix) {
	n, c := x.Dims()
	if c != s.In {
		panic("onnxload: stage input width mismatch")
	}
	if dst.IsEmpty() {
		dst.ReuseAs(n, s.Out)
	} else if r, cc := dst.Dims(); r != n || cc != s.Out {
		panic(mat.ErrShape)
	}
	s.apply(dst, x, nil)
}

// apply is Apply without the size checks. panels, if not nil, holds
// affinePanels(s.W) for an affine stage (Forward packs them once for
// all its row blocks); nil packs them here when the tile kernel runs.
func (s *Stage) apply(dst *mat.Dense, x mat.Matrix, panels []float64) {
	n, _ := x.Dims()
	if s.Kind == Affine {
		if xd, ok := x.(*mat.Dense); ok && useTile && dst != xd {
			if panels == nil {
				panels = affinePanels(s.W)
			}
			affineInto(dst, xd, s.W, panels, s.B)
			return
		}
		dst.Mul(x, s.W.T())
		for i := 0; i < n; i++ {
			row := dst.RawRowView(i)
			for j, b := range s.B {
				row[j] += b
			}
		}
		return
	}
	if s.In != s.Out {
		panic("onnxload: bad stage widths")
	}
	if dst != x {
		dst.Copy(x)
	}
	for i := 0; i < n; i++ {
		applyRow(s, dst.RawRowView(i))
	}
}

// geluTanhC is the cubic coefficient of the tanh approximation of GELU
// (Hendrycks and Gimpel 2016, as in PyTorch's approximate="tanh").
const geluTanhC = 0.044715

// applyRow applies the activation of s in place to one row. For prelu
// the row must be s.Slope's length.
func applyRow(s *Stage, row []float64) {
	k, alpha := s.Kind, s.Alpha
	switch k {
	case ReLU:
		for j, v := range row {
			if v < 0 {
				row[j] = 0
			}
		}
	case LeakyReLU:
		for j, v := range row {
			if v < 0 {
				row[j] = alpha * v
			}
		}
	case ELU:
		for j, v := range row {
			if v <= 0 {
				row[j] = alpha * math.Expm1(v)
			}
		}
	case Softplus:
		for j, v := range row {
			row[j] = math.Max(v, 0) + math.Log1p(math.Exp(-math.Abs(v)))
		}
	case Sigmoid:
		for j, v := range row {
			if v >= 0 {
				row[j] = 1 / (1 + math.Exp(-v))
			} else {
				e := math.Exp(v)
				row[j] = e / (1 + e)
			}
		}
	case Tanh:
		for j, v := range row {
			row[j] = math.Tanh(v)
		}
	case GELU:
		for j, v := range row {
			row[j] = 0.5 * v * math.Erfc(-v/math.Sqrt2)
		}
	case SiLU:
		for j, v := range row {
			if v >= 0 {
				row[j] = v / (1 + math.Exp(-v))
			} else {
				e := math.Exp(v)
				row[j] = v * e / (1 + e)
			}
		}
	case ReLU6, Hardtanh:
		lo, hi := alpha, s.Beta
		if k == ReLU6 {
			lo, hi = 0, 6
		}
		for j, v := range row {
			row[j] = min(max(v, lo), hi)
		}
	case PReLU:
		for j, v := range row {
			if v < 0 {
				row[j] = s.Slope[j] * v
			}
		}
	case HardSigmoid:
		for j, v := range row {
			row[j] = max(0, min(1, alpha*v+s.Beta))
		}
	case HardSwish:
		for j, v := range row {
			row[j] = v * max(0, min(1, v/6+0.5))
		}
	case SELU:
		for j, v := range row {
			if v <= 0 {
				v = alpha * math.Expm1(v)
			}
			row[j] = s.Beta * v
		}
	case CELU:
		for j, v := range row {
			if v <= 0 {
				row[j] = alpha * math.Expm1(v/alpha)
			}
		}
	case Mish:
		for j, v := range row {
			sp := math.Max(v, 0) + math.Log1p(math.Exp(-math.Abs(v)))
			row[j] = v * math.Tanh(sp)
		}
	case GELUTanh:
		c := math.Sqrt(2 / math.Pi)
		for j, v := range row {
			row[j] = 0.5 * v * (1 + math.Tanh(c*(v+geluTanhC*v*v*v)))
		}
	case Softmax, LogSoftmax:
		m := math.Inf(-1)
		for _, v := range row {
			m = math.Max(m, v)
		}
		var sum float64
		for _, v := range row {
			sum += math.Exp(v - m)
		}
		if k == Softmax {
			for j, v := range row {
				row[j] = math.Exp(v-m) / sum
			}
		} else {
			ls := math.Log(sum)
			for j, v := range row {
				row[j] = v - m - ls
			}
		}
	case Reshape:
	default:
		panic("onnxload: unknown stage kind")
	}
}
