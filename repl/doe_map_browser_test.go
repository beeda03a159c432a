package repl

import (
	"bytes"
	"context"
	"fmt"
	"image/png"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// chromium returns the headless Chromium command; the test is skipped
// when it is missing, except in CI (CI=true), where it fails.
func chromium(t *testing.T) string {
	t.Helper()
	const debian = "/usr/bin/chromium" // Debian's chromium package
	if _, err := os.Stat(debian); err == nil {
		return debian
	}
	if p, err := exec.LookPath("chromium"); err == nil {
		return p
	}
	msg := fmt.Sprintf("headless Chromium not found at %s nor on PATH (install Debian's chromium package: apt-get install -y chromium)", debian)
	if os.Getenv("CI") == "true" {
		t.Fatal(msg)
	}
	t.Skip(msg)
	return ""
}

// headless runs Chromium without a window on the page with the given
// mode flags and returns what it printed. The context only keeps a
// broken browser from holding the test for ever; nothing is timed.
func headless(t *testing.T, bin, page string, mode ...string) []byte {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	args := append([]string{"--headless", "--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-background-networking",
		"--disable-component-update", "--disable-sync", "--user-data-dir=" + t.TempDir(), "--window-size=1200,900"}, mode...)
	var out, errs bytes.Buffer
	cmd := exec.CommandContext(ctx, bin, append(args, "file://"+page)...)
	cmd.Stdout, cmd.Stderr = &out, &errs
	if err := cmd.Run(); err != nil {
		t.Fatalf("%s %v: %v\n%s", bin, mode, err, errs.String())
	}
	return out.Bytes()
}

// TestDOEMapInChromium runs the business-jet design of experiments and
// views its report in headless Chromium: the map of take-off mass over
// wing area and aspect ratio is laid out in the page with the
// field-length, climb, stability and fuel-volume boundaries, beside the
// map interpolated from the samples (which says so) and the carpet.
func TestDOEMapInChromium(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a study and starts a browser")
	}
	bin := chromium(t)
	out := t.TempDir()
	var stderr bytes.Buffer
	if _, err := Run(context.Background(), RunOptions{File: filepath.Join("..", "studies", "business_jet_wing_doe.study"), OutDir: out, Stdout: io.Discard, Stderr: &stderr}); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	page := filepath.Join(resultFolder(t, out), "report.html")
	dom := string(headless(t, bin, page, "--dump-dom"))
	figure := func(title string) string {
		i := strings.Index(dom, "<figcaption>")
		for i >= 0 {
			end := strings.Index(dom[i:], "</figcaption>")
			if end > 0 && strings.Contains(dom[i:i+end], title) {
				start := strings.LastIndex(dom[:i], "<figure")
				return dom[start:i]
			}
			next := strings.Index(dom[i+1:], "<figcaption>")
			if next < 0 {
				break
			}
			i += 1 + next
		}
		return ""
	}
	boundaries := []string{"perf.takeoff_field_length boundary", "perf.landing_field_length boundary", "perf.climb_gradient_second_segment boundary",
		"stability.static_margin_takeoff boundary", "fuel_volume_margin boundary"}
	for _, f := range []struct {
		title string
		want  []string
	}{
		{"mass.takeoff over wing.area and wing.aspect_ratio", append([]string{"wing.area [m2]", "wing.aspect_ratio [-]", "failed: does-not-close"}, boundaries...)},
		{"mass.takeoff over wing.area and wing.aspect_ratio, interpolated from 60 recorded analyses", []string{"values and boundaries interpolated (cubic RBF), not analysed", "best analysed design"}},
		{"carpet of mass.takeoff over wing.area and wing.aspect_ratio", append([]string{"lines of constant wing.area"}, boundaries...)},
	} {
		fig := figure(f.title)
		if fig == "" {
			t.Errorf("the page Chromium rendered has no figure %q", f.title)
			continue
		}
		if !strings.Contains(fig, "<svg") {
			t.Errorf("figure %q has no SVG in the rendered page", f.title)
		}
		for _, w := range f.want {
			if !strings.Contains(fig, w) {
				t.Errorf("figure %q in the rendered page does not show %q", f.title, w)
			}
		}
	}
	shot := filepath.Join(t.TempDir(), "page.png")
	headless(t, bin, page, "--screenshot="+shot, "--hide-scrollbars")
	b, err := os.ReadFile(shot)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("the screenshot does not decode: %v", err)
	}
	if r := img.Bounds(); r.Dx() < 1000 || r.Dy() < 800 {
		t.Errorf("screenshot %v", r)
	}
}
