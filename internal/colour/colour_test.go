// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package colour

import (
	"math"
	"testing"
)

// TestLab checks CIELAB facts (CIE 15:2004): white is L* = 100 with
// a* = b* = 0, black is L* = 0, so ΔE*ab between them is 100; sRGB mid
// grey (0.5) has L* ≈ 53.4 (a value from common practice).
func TestLab(t *testing.T) {
	white, black := [3]float64{1, 1, 1}, [3]float64{0, 0, 0}
	if l, a, b := Lab(Normal, 1, 1, 1); math.Abs(l-100) > 1e-3 || math.Abs(a) > 1e-2 || math.Abs(b) > 1e-2 {
		t.Errorf("white: L*a*b* = %.4f %.4f %.4f, want 100 0 0", l, a, b)
	}
	if d := Distance(Normal, white, black); math.Abs(d-100) > 1e-3 {
		t.Errorf("ΔE(white, black) = %v, want 100", d)
	}
	if l, _, _ := Lab(Normal, 0.5, 0.5, 0.5); math.Abs(l-53.4) > 0.1 {
		t.Errorf("grey 0.5: L* = %v, want about 53.4", l)
	}
}

// TestDichromacy checks the defining facts of the simulations: neutral
// colours are unchanged, and red and green, far apart to normal vision,
// come close for protanopes and deuteranopes, while blue and yellow stay
// apart (the red–green confusion of both; e.g. Fairchild, Color
// Appearance Models, 3rd ed., 2013, ch. 1).
func TestDichromacy(t *testing.T) {
	red, green := [3]float64{0.8, 0.2, 0.1}, [3]float64{0.4, 0.5, 0.1}
	blue, yellow := [3]float64{0.1, 0.2, 0.9}, [3]float64{0.9, 0.8, 0.1}
	for _, v := range []Vision{Protanopia, Deuteranopia} {
		for _, g := range []float64{0, 0.3, 1} {
			if d := Distance(v, [3]float64{g, g, g}, [3]float64{g, g, g}); d != 0 {
				t.Errorf("vision %d: grey %v moves by %v", v, g, d)
			}
			l0, a0, b0 := Lab(Normal, g, g, g)
			l1, a1, b1 := Lab(v, g, g, g)
			if math.Abs(l0-l1)+math.Abs(a0-a1)+math.Abs(b0-b1) > 1e-3 {
				t.Errorf("vision %d: grey %v changes appearance", v, g)
			}
		}
		if dn, dv := Distance(Normal, red, green), Distance(v, red, green); dv > dn/3 {
			t.Errorf("vision %d: red–green ΔE %v, normal %v; want the pair confused", v, dv, dn)
		}
		if dv := Distance(v, blue, yellow); dv < 50 {
			t.Errorf("vision %d: blue–yellow ΔE %v, want them apart", v, dv)
		}
	}
}
