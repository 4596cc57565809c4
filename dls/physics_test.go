package dls

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestStokesEinsteinWorkedValues(t *testing.T) {
	// 100 nm sphere in water at 298.15 K. Expected D values are the
	// Stokes–Einstein closed form D = k_B·T/(3π·η·d), k_B = 1.380649e-23 J/K
	// (exact, SI 2019), worked outside the project (Python 3 math module)
	// and printed to 6 digits; 1e-5 relative covers their rounding
	// (at most 1e-5/4.9 relative in the sixth digit).
	cases := []struct {
		etaMPaS float64
		wantD   float64
	}{
		{0.890022, 4.90734e-12}, // η of IAPWS 2008 at 0.101325 MPa
		{0.8900, 4.90746e-12},
		{0.8872, 4.92295e-12},
	}
	for _, c := range cases {
		d := DiffusionFromDiameter(298.15, c.etaMPaS*1e-3, 100e-9)
		if !scalar.EqualWithinRel(d, c.wantD, 1e-5) {
			t.Errorf("η %.6f mPa·s: D = %.6e, want %.5e", c.etaMPaS, d, c.wantD)
		}
		if back := DiameterFromDiffusion(298.15, c.etaMPaS*1e-3, d); !scalar.EqualWithinRel(back, 100e-9, 1e-14) {
			t.Errorf("round trip gives %.15g m", back)
		}
	}
}

func TestScatteringVectorAndRate(t *testing.T) {
	// q = 4πn·sin(θ/2)/λ0 and Γ = D·q² for the 100 nm sphere above with
	// n = 1.33162 at 632.8 nm: the closed forms worked outside the project
	// (Python 3 math module) and printed to 7 digits (q) and to 0.01 s⁻¹
	// (Γ). q agrees to 1e-6 relative (its rounding is at most 1.5e-7). The
	// printed Γ were computed from D rounded to 6 digits (4.90734e-12), so
	// they sit up to 1e-5 relative from the exact product: tolerance 1e-5
	// relative, or 0.006 s⁻¹ absolute (half the last printed digit plus
	// that D rounding) where the two decimals are the coarser.
	d := DiffusionFromDiameter(298.15, 0.890022e-3, 100e-9)
	cases := []struct {
		thetaDeg, q, gamma float64
	}{
		{15, 3.451607e6, 58.46},
		{60, 1.322190e7, 857.89},
		{90, 1.869858e7, 1715.78},
		{120, 2.290099e7, 2573.68},
		{165, 2.621756e7, 3373.11},
		{173, 2.639447e7, 3418.78},
	}
	for _, c := range cases {
		o := Optics{WavelengthM: 632.8e-9, AngleRad: c.thetaDeg * math.Pi / 180, RefractiveIndex: 1.33162}
		q := o.Q()
		if !scalar.EqualWithinRel(q, c.q, 1e-6) {
			t.Errorf("θ %g°: q = %.7e, want %.7e", c.thetaDeg, q, c.q)
		}
		if g := d * q * q; !scalar.EqualWithinRel(g, c.gamma, 1e-5) && !scalar.EqualWithinAbs(g, c.gamma, 0.006) {
			t.Errorf("θ %g°: Γ = %.4f, want %.2f", c.thetaDeg, g, c.gamma)
		}
	}
	// Round trip: Γ(173°) = 3418.78 s⁻¹ gives d = 100.00 nm.
	o := Optics{WavelengthM: 632.8e-9, AngleRad: 173 * math.Pi / 180, RefractiveIndex: 1.33162}
	dh := DiameterFromDiffusion(298.15, 0.890022e-3, DiffusionFromRate(3418.78, o.Q()))
	if !scalar.EqualWithinAbs(dh*1e9, 100.00, 0.005) {
		t.Errorf("round trip d = %.4f nm, want 100.00", dh*1e9)
	}
}

func TestOpticsValidate(t *testing.T) {
	bad := []Optics{
		{WavelengthM: 0, AngleRad: 1, RefractiveIndex: 1.33},
		{WavelengthM: 633e-9, AngleRad: 0, RefractiveIndex: 1.33},
		{WavelengthM: 633e-9, AngleRad: math.Pi, RefractiveIndex: 1.33},
		{WavelengthM: 633e-9, AngleRad: 1, RefractiveIndex: 0.9},
		{WavelengthM: math.NaN(), AngleRad: 1, RefractiveIndex: 1.33},
	}
	for _, o := range bad {
		if o.Validate() == nil {
			t.Errorf("%+v accepted", o)
		}
	}
	if err := (Optics{WavelengthM: 633e-9, AngleRad: 1, RefractiveIndex: 1.33}).Validate(); err != nil {
		t.Error(err)
	}
}

func TestMetadataPrecedence(t *testing.T) {
	// Flag over sheet over file over default, whatever the order of Set.
	var md Metadata
	md.Set(Param{Key: KeyTemperatureC, Value: "20", Origin: OriginDefault})
	md.Set(Param{Key: KeyTemperatureC, Value: "25", Origin: OriginFlag})
	md.Set(Param{Key: KeyTemperatureC, Value: "30", Origin: OriginFile})
	md.Set(Param{Key: KeyTemperatureC, Value: "35", Origin: OriginSheet})
	if p, _ := md.Get(KeyTemperatureC); p.Value != "25" || p.Origin != OriginFlag {
		t.Errorf("got %+v, want the flag value", p)
	}
	md.Set(Param{Key: KeyAngleDeg, Value: "90", Origin: OriginFile})
	md.Set(Param{Key: KeyAngleDeg, Value: "173", Origin: OriginSheet})
	if v, ok, err := md.Float(KeyAngleDeg); !ok || err != nil || v != 173 {
		t.Errorf("angle %v %v %v, want 173 from the sheet", v, ok, err)
	}
	md.Set(Param{Key: KeySample, Value: "x", Origin: OriginFile, Where: "a.csv:2"})
	md.Set(Param{Key: KeyWavelengthNm, Value: "six hundred", Origin: OriginFile, Where: "a.csv:3"})
	if _, _, err := md.Float(KeyWavelengthNm); err == nil {
		t.Error("non-numeric value accepted")
	}
}

// TestConditionReplaced: a condition that a sheet or a flag sets to
// another value than the file states keeps the file's value and place in
// Replaces, through a sheet's value and then a flag's; the same value in
// another spelling, a name (not a condition), a later line of the same
// file and a default replace nothing that needs saying.
func TestConditionReplaced(t *testing.T) {
	file := Param{Key: KeyTemperatureC, Value: "37", Origin: OriginFile, Where: "a.csv:2"}
	cases := []struct {
		name string
		set  []Param
		want string
	}{
		{"flag", []Param{{Key: KeyTemperatureC, Value: "25", Origin: OriginFlag}}, "37 (a.csv:2)"},
		{"sheet then flag", []Param{{Key: KeyTemperatureC, Value: "30", Origin: OriginSheet}, {Key: KeyTemperatureC, Value: "25", Origin: OriginFlag}}, "37 (a.csv:2)"},
		{"sheet, then a flag back to the file's", []Param{{Key: KeyTemperatureC, Value: "30", Origin: OriginSheet}, {Key: KeyTemperatureC, Value: "37.0", Origin: OriginFlag}}, ""},
		{"same number", []Param{{Key: KeyTemperatureC, Value: "3.7e1", Origin: OriginSheet}}, ""},
		{"later line", []Param{{Key: KeyTemperatureC, Value: "25", Origin: OriginFile, Where: "a.csv:9"}}, ""},
		{"default", []Param{{Key: KeyTemperatureC, Value: "25", Origin: OriginDefault}}, ""},
	}
	for _, c := range cases {
		var md Metadata
		md.Set(file)
		for _, p := range c.set {
			md.Set(p)
		}
		if p, _ := md.Get(KeyTemperatureC); p.Replaces != c.want {
			t.Errorf("%s: Replaces %q, want %q", c.name, p.Replaces, c.want)
		}
	}
	var md Metadata
	md.Set(Param{Key: KeySample, Value: "x", Origin: OriginFile, Where: "a.csv:1"})
	md.Set(Param{Key: KeySample, Value: "lot 7", Origin: OriginSheet})
	md.Set(Param{Key: KeySolvent, Value: "water", Origin: OriginFile, Where: "a.csv:3"})
	md.Set(Param{Key: KeySolvent, Value: "Water", Origin: OriginFlag})
	for _, k := range []string{KeySample, KeySolvent} {
		if p, _ := md.Get(k); p.Replaces != "" {
			t.Errorf("%s: Replaces %q, want none (a name; the same word)", k, p.Replaces)
		}
	}
}
