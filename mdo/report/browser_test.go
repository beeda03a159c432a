package report

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"image"
	"image/jpeg"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// chromiumPath is Debian's chromium package's command.
const chromiumPath = "/usr/bin/chromium"

// browser returns a chromedp context on a fresh headless Chromium; the
// test is skipped when Chromium is missing, except in CI (CI=true), where
// it fails.
func browser(t *testing.T) (context.Context, context.CancelFunc) {
	t.Helper()
	path := chromiumPath
	if _, err := os.Stat(path); err != nil {
		p, lerr := exec.LookPath("chromium")
		if lerr != nil {
			msg := fmt.Sprintf("headless Chromium not found at %s nor on PATH (install Debian's chromium package: apt-get install -y chromium)", chromiumPath)
			if os.Getenv("CI") == "true" {
				t.Fatal(msg)
			}
			t.Skip(msg)
		}
		path = p
	}
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(path),
		chromedp.Flag("headless", true),
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true),
		chromedp.NoFirstRun,
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1200, 900),
	}
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelC := chromedp.NewContext(actx)
	ctx, cancelT := context.WithTimeout(ctx, 60*time.Second)
	cancel := func() { cancelT(); cancelC(); cancelA() }
	// start the browser and its tab on this context, so that the
	// shorter-lived console subscriptions do not own them
	if err := chromedp.Do(ctx, chromedp.Navigate("about:blank")); err != nil {
		cancel()
		t.Fatalf("starting %s: %v", path, err)
	}
	return ctx, cancel
}

// pageResult is what the browser saw of a page.
type pageResult struct {
	problems []string
	title    string
	caution  string
	svgs     int
	box      []float64
	shot     []byte
}

// render opens a file in the browser and collects its console messages
// of level warning and above, its title, the caution text, the number and
// size of the figures and a full-page screenshot.
func render(t *testing.T, ctx context.Context, path string) pageResult {
	t.Helper()
	var res pageResult
	cctx, stop := context.WithCancel(ctx)
	msgs := chromedp.Console(cctx)
	// The page's messages are read until the sentinel written after the
	// load event (which waits for every image): the browser sends its
	// console and log events in order, so every message of the page has
	// arrived by then.
	var problems []string
	drained := make(chan error, 1)
	go func() {
		for m, err := range msgs {
			if err != nil {
				drained <- err
				return
			}
			if m.Type == chromedp.ConsoleInfo && m.Text == renderSentinel {
				drained <- nil
				return
			}
			switch m.Type {
			case chromedp.ConsoleError, chromedp.ConsoleWarning, chromedp.ConsoleException:
				problems = append(problems, m.String())
			}
		}
		drained <- errors.New("the console closed before the page's end mark")
	}()
	if err := chromedp.Do(ctx, chromedp.Navigate("file://"+path), chromedp.WaitReady(chromedp.CSS("body")),
		chromedp.Poll[chromedp.Void](`document.readyState === "complete"`)); err != nil {
		stop()
		t.Fatal(err)
	}
	if _, err := chromedp.Run(ctx, chromedp.Evaluate[bool](`console.info(`+strconv.Quote(renderSentinel)+`), true`)); err != nil {
		stop()
		t.Fatal(err)
	}
	if err := <-drained; err != nil {
		stop()
		t.Fatalf("reading the console of %s: %v", path, err)
	}
	res.problems = problems
	var err error
	if res.title, err = chromedp.Run(ctx, chromedp.Title()); err != nil {
		t.Fatal(err)
	}
	if res.caution, err = chromedp.Run(ctx, chromedp.Evaluate[string](`(document.getElementById("caution") || {}).textContent || ""`)); err != nil {
		t.Fatal(err)
	}
	if res.svgs, err = chromedp.Run(ctx, chromedp.Evaluate[int](`document.querySelectorAll("figure svg").length`)); err != nil {
		t.Fatal(err)
	}
	if res.box, err = chromedp.Run(ctx, chromedp.Evaluate[[]float64](`(() => { const s = document.querySelector("figure svg"); if (!s) return []; const r = s.getBoundingClientRect(); return [r.width, r.height]; })()`)); err != nil {
		t.Fatal(err)
	}
	if res.shot, err = chromedp.Run(ctx, chromedp.FullScreenshot(90)); err != nil {
		t.Fatal(err)
	}
	stop()
	return res
}

// renderSentinel is the console message render writes once the page has
// loaded, to know that every earlier message has been read.
const renderSentinel = "couplet: page loaded"

func TestReportRendersInChromium(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "report.html")
	if err := os.WriteFile(path, []byte(demoReport(t)), 0o644); err != nil {
		t.Fatal(err)
	}
	// a page with a console error and a missing image, to show that the
	// check sees them
	broken := filepath.Join(dir, "broken.html")
	if err := os.WriteFile(broken, []byte(`<!DOCTYPE html><html><head><title>broken</title></head><body><p>x</p>`+
		`<script>console.error("deliberate failure")</script><img src="missing.png"></body></html>`), 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := browser(t)
	defer cancel()

	bad := render(t, ctx, broken)
	if len(bad.problems) == 0 {
		t.Fatal("the console check saw nothing on a page with a console error and a missing image")
	}
	t.Logf("on the deliberately broken page the check saw: %q", bad.problems)

	res := render(t, ctx, path)
	checkRendered(t, res, "Study report: sellar", 5)
	// the settings of the run are laid out as tables with their rows
	for _, id := range []string{"optimizer-settings", "coupling-solvers"} {
		rows, err := chromedp.Run(ctx, chromedp.Evaluate[[]float64](`(() => { const t = document.getElementById("`+id+`"); if (!t) return []; return [t.rows.length, t.getBoundingClientRect().height]; })()`))
		if err != nil {
			t.Fatal(err)
		}
		if len(rows) != 2 || rows[0] < 2 || rows[1] < 20 {
			t.Errorf("table %s rendered as %v (rows, height px), want a head and a row laid out", id, rows)
		}
	}
	img, _, err := image.Decode(bytes.NewReader(res.shot))
	if err != nil {
		t.Fatalf("screenshot does not decode: %v", err)
	}
	if b := img.Bounds(); b.Dy() < 2000 {
		t.Errorf("screenshot of the whole page is only %v", b)
	}
	if frac := inkFraction(img); frac < 0.02 {
		t.Errorf("screenshot is blank: %.4f of its pixels differ from the background", frac)
	}
	if p := os.Getenv("COUPLET_KEEP_SCREENSHOT"); p != "" {
		os.WriteFile(p, res.shot, 0o644)
	}
}

// checkRendered checks what the browser saw of a page: no console
// message, its title, the caution, the number of figures and the first
// one's size.
func checkRendered(t *testing.T, res pageResult, title string, svgs int) {
	t.Helper()
	if len(res.problems) > 0 {
		t.Errorf("the browser reported on %q:\n%s", title, strings.Join(res.problems, "\n"))
	}
	if res.title != title {
		t.Errorf("page title %q, want %q", res.title, title)
	}
	if !strings.Contains(res.caution, "airworthiness") {
		t.Errorf("caution text not rendered: %q", res.caution)
	}
	if res.svgs != svgs {
		t.Errorf("%d SVG figures rendered, want %d", res.svgs, svgs)
	}
	if len(res.box) != 2 || res.box[0] < 200 || res.box[1] < 150 {
		t.Errorf("first figure laid out at %v px, want at least 200 × 150", res.box)
	}
}

// inkFraction returns the fraction of pixels that are not near-white.
func inkFraction(img image.Image) float64 {
	b := img.Bounds()
	ink, total := 0, 0
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bl, _ := img.At(x, y).RGBA()
			total++
			if r < 0xe000 || g < 0xe000 || bl < 0xe000 {
				ink++
			}
		}
	}
	return float64(ink) / float64(total)
}

// The decoders of the screenshot's format.
var (
	_ = png.Decode
	_ = jpeg.Decode
)
