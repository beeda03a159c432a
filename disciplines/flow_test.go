package disciplines

import (
	"math"
	"testing"
)

const deg = math.Pi / 180

func TestIsentropicNACA1135(t *testing.T) {
	// NACA Report 1135 (1953), isentropic table at M = 2.0.
	ar, err := AreaRatio(2)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"T/T0", IsentropicTemperatureRatio(2), 0.55556},
		{"p/p0", IsentropicPressureRatio(2), 0.12780},
		{"A/A*", ar, 1.68750},
	} {
		if relErr(c.got, c.want) > 5e-5 {
			t.Errorf("%s = %.6f, want %.5f", c.name, c.got, c.want)
		}
	}
	if ar1, _ := AreaRatio(1); math.Abs(ar1-1) > 1e-12 {
		t.Errorf("A/A*(1) = %g", ar1)
	}
}

func TestNormalShockNACA1135(t *testing.T) {
	// NACA Report 1135 (1953), normal-shock table at M1 = 2.0.
	s, err := NormalShock(2)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"M2", s.Mach2, 0.57735}, {"p2/p1", s.PressureRatio, 4.5000}, {"T2/T1", s.TemperatureRatio, 1.6875},
		{"rho2/rho1", s.DensityRatio, 2.6667}, {"p02/p01", s.TotalPressureRatio, 0.72087},
	} {
		if relErr(c.got, c.want) > 5e-5 {
			t.Errorf("%s = %.6f, want %.5f", c.name, c.got, c.want)
		}
	}
	if _, err := NormalShock(0.8); err == nil {
		t.Error("subsonic normal shock accepted")
	}
}

func TestObliqueShockNACA1135(t *testing.T) {
	// NACA Report 1135 (1953), oblique-shock charts: M1 = 2.0, θ = 10°,
	// weak solution β = 39.31°, M2 = 1.6405, p2/p1 = 1.7066.
	s, err := ObliqueShock(2, 10*deg)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(s.WaveAngle/deg-39.31) > 0.005 {
		t.Errorf("β = %.4f°", s.WaveAngle/deg)
	}
	if relErr(s.Mach2, 1.6405) > 1e-4 || relErr(s.PressureRatio, 1.7066) > 1e-4 {
		t.Errorf("M2 = %.5f, p2/p1 = %.5f", s.Mach2, s.PressureRatio)
	}
	// Zero deflection is a Mach wave.
	if s0, _ := ObliqueShock(2, 0); math.Abs(s0.WaveAngle-30*deg) > 1e-9 || math.Abs(s0.PressureRatio-1) > 1e-9 {
		t.Errorf("θ = 0: %+v", s0)
	}
	// Maximum deflection at M = 2 is 22.97° (NACA 1135 charts, from memory).
	th, _, _ := MaxDeflection(2)
	if math.Abs(th/deg-22.97) > 0.01 {
		t.Errorf("θmax = %.3f°", th/deg)
	}
	if _, err := ObliqueShock(2, 25*deg); err == nil {
		t.Error("detached shock accepted")
	}
}

func TestPrandtlMeyerAndMachAngle(t *testing.T) {
	// NACA Report 1135 (1953): ν(2.0) = 26.380°.
	nu, err := PrandtlMeyer(2)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(nu/deg-26.380) > 5e-4 {
		t.Errorf("ν = %.4f°", nu/deg)
	}
	// μ = asin(1/M): 30° at M = 2 (definition).
	mu, _ := MachAngle(2)
	if math.Abs(mu/deg-30) > 1e-12 {
		t.Errorf("μ = %g", mu/deg)
	}
	// A leading edge swept more than 90° − μ lies inside the Mach cone.
	cases := []struct {
		mach, sweep float64
		subsonic    bool
	}{{2, 59 * deg, false}, {2, 61 * deg, true}, {2, -61 * deg, true}, {1.5, 45 * deg, false}, {1.5, 50 * deg, true}, {0.9, 0, true}}
	for _, c := range cases {
		if got := SubsonicLeadingEdge(c.mach, c.sweep); got != c.subsonic {
			t.Errorf("M %g, Λ %g°: subsonic = %v", c.mach, c.sweep/deg, got)
		}
	}
}
