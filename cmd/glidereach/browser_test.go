package main

import (
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

// requireBrowserEnv, when set to 1 (as .ci/run sets it), makes the browser
// test fail instead of skip when no Chromium is installed, so CI cannot pass
// without running it.
const requireBrowserEnv = "GLIDEREACH_REQUIRE_BROWSER"

// findChromium returns the path of a Chromium (or Chrome) binary, or "".
func findChromium() string {
	if p := os.Getenv("GLIDEREACH_CHROMIUM"); p != "" {
		return p
	}
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome", "chrome"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// browserCheck is what the page reports about itself after loading.
type browserCheck struct {
	CautionText    string  `json:"cautionText"`
	CautionVisible bool    `json:"cautionVisible"`
	CautionTop     float64 `json:"cautionTop"`
	MapLoaded      bool    `json:"mapLoaded"`
	MapWidth       float64 `json:"mapWidth"`
	MapLit         bool    `json:"mapLit"` // the decoded map has pixels of more than one colour
	ChartPresent   bool    `json:"chartPresent"`
	ChartWidth     float64 `json:"chartWidth"`
	ChartHeight    float64 `json:"chartHeight"`
	ChartPathLen   float64 `json:"chartPathLen"`
	ViewportHeight float64 `json:"viewportHeight"`
}

// pageProbe runs in the page: it measures the caution, decodes the map
// into a canvas to see that it holds a picture, and measures the profile
// chart's drawn lines.
const pageProbe = `(() => {
  const r = {};
  const c = document.querySelector('.caution');
  if (c) {
    const b = c.getBoundingClientRect(), s = getComputedStyle(c);
    r.cautionText = c.innerText;
    r.cautionVisible = b.width > 0 && b.height > 0 && s.visibility !== 'hidden' && s.display !== 'none' && parseFloat(s.opacity) > 0;
    r.cautionTop = b.top;
  }
  r.viewportHeight = innerHeight;
  const m = document.querySelector('img.map');
  if (m) {
    r.mapLoaded = m.complete && m.naturalWidth > 0 && m.naturalHeight > 0;
    r.mapWidth = m.getBoundingClientRect().width;
    if (r.mapLoaded) {
      const cv = document.createElement('canvas');
      cv.width = 64; cv.height = 64;
      const g = cv.getContext('2d');
      g.drawImage(m, 0, 0, 64, 64);
      const d = g.getImageData(0, 0, 64, 64).data;
      const seen = new Set();
      for (let i = 0; i < d.length; i += 4) seen.add(d[i] + ',' + d[i+1] + ',' + d[i+2]);
      r.mapLit = seen.size > 8;
    }
  }
  const svg = document.querySelector('figure.profile svg');
  if (svg) {
    r.chartPresent = true;
    const b = svg.getBoundingClientRect();
    r.chartWidth = b.width; r.chartHeight = b.height;
    let len = 0;
    for (const p of svg.querySelectorAll('path, polyline, line')) {
      if (p.getTotalLength) len += p.getTotalLength();
    }
    r.chartPathLen = len;
  }
  return r;
})()`

// TestReportsInHeadlessBrowser loads each command's HTML report in a real
// headless Chromium, offline, and checks what a reader relies on: no
// console error or uncaught exception, no network request (the report must
// be self-contained), the map decoded and drawn, the profile chart drawn
// where the command has one, and the caution visible at the top of the
// first screen (common practice, no source). Skipped, with a message, when
// no Chromium is installed, unless GLIDEREACH_REQUIRE_BROWSER=1 (CI).
func TestReportsInHeadlessBrowser(t *testing.T) {
	bin := findChromium()
	if bin == "" {
		msg := "no Chromium found (install Debian's chromium, or set GLIDEREACH_CHROMIUM): the HTML reports were not checked in a browser"
		if os.Getenv(requireBrowserEnv) == "1" {
			t.Fatal(msg + "; " + requireBrowserEnv + "=1 requires it")
		}
		t.Skip(msg)
	}
	td := filepath.Join("..", "..", "testdata")
	dir := t.TempDir()
	fields := filepath.Join(td, "fields", "demo-fields.geojson")
	reports := []struct {
		name    string
		args    []string
		profile bool
	}{
		{"reach", []string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--fields", fields, "--wind", "0m:240/10kt,1500m:270/20kt"}, false},
		{"final", []string{"final", "--from", "0.0,-25.04", "--alt", "1800m", "--to", "-0.03,-24.96", "--terrain", filepath.Join(td, "geotiff", "geo_int16_strip_none.tif")}, true},
		{"route", []string{"route", "--route", filepath.Join(td, "routes", "demo-route.gpx"), "--fields", fields, "--alt", "7500ft"}, true},
		{"coverage", []string{"coverage", "--fields", fields, "--area", filepath.Join(td, "areas", "demo-area.geojson"), "--alt", "1500m"}, false},
	}
	profileDir := t.TempDir()
	opts := append([]chromedp.ExecAllocatorOption{},
		chromedp.ExecPath(bin),
		chromedp.Flag("headless", true),
		chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("no-default-browser-check", true),
		chromedp.UserDataDir(profileDir),
		chromedp.WindowSize(1280, 900),
	)
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	defer cancelA()
	for _, rp := range reports {
		path, err := filepath.Abs(filepath.Join(dir, rp.name+".html"))
		if err != nil {
			t.Fatal(err)
		}
		if code, _, errOut := runCLI(t, append(rp.args, "--report", path)...); code != 0 {
			t.Fatalf("%s --report: exit %d: %s", rp.name, code, errOut)
		}
		url := "file://" + filepath.ToSlash(path)
		ctx, cancel := chromedp.NewContext(actx)
		ctx, cancelT := context.WithTimeout(ctx, 60*time.Second)
		var mu sync.Mutex
		var problems []string
		listenErr := chromedp.Listen(ctx, func(ev any) {
			mu.Lock()
			defer mu.Unlock()
			switch e := ev.(type) {
			case *runtime.EventExceptionThrown:
				problems = append(problems, "uncaught exception: "+e.ExceptionDetails.Text)
			case *runtime.EventConsoleAPICalled:
				if e.Type == runtime.ConsoleAPICalledTypeError || e.Type == runtime.ConsoleAPICalledTypeWarning {
					var args []string
					for _, a := range e.Args {
						args = append(args, string(a.Value))
					}
					problems = append(problems, fmt.Sprintf("console.%s: %s", e.Type, strings.Join(args, " ")))
				}
			case *log.EventEntryAdded:
				if e.Entry.Level == log.EntryLevelError || e.Entry.Level == log.EntryLevelWarning {
					problems = append(problems, fmt.Sprintf("console %s (%s): %s %s", e.Entry.Level, e.Entry.Source, e.Entry.Text, e.Entry.URL))
				}
			case *network.EventRequestWillBeSent:
				u := e.Request.URL
				if u != url && !strings.HasPrefix(u, "data:") {
					problems = append(problems, "network request: "+u)
				}
			}
		})
		if listenErr != nil {
			cancelT()
			cancel()
			t.Fatalf("%s: starting the browser: %v", rp.name, listenErr)
		}
		// chromedp enables the runtime, log and network domains of a new
		// tab itself, so their events reach the listener from the start.
		err = chromedp.Do(ctx,
			chromedp.Navigate(url),
			chromedp.WaitReady("body"),
			chromedp.Sleep(300*time.Millisecond), // let late errors and requests arrive
		)
		var res browserCheck
		if err == nil {
			res, err = chromedp.Run(ctx, chromedp.Evaluate[browserCheck](pageProbe))
		}
		cancelT()
		cancel()
		if err != nil {
			t.Fatalf("%s: browser: %v", rp.name, err)
		}
		mu.Lock()
		for _, p := range problems {
			t.Errorf("%s report: %s", rp.name, p)
		}
		mu.Unlock()
		if !res.CautionVisible || !strings.Contains(res.CautionText, "PLANNING AID ONLY") || res.CautionTop < 0 || res.CautionTop > res.ViewportHeight {
			t.Errorf("%s report: caution not visible on the first screen: %+v", rp.name, res)
		}
		if !res.MapLoaded || !res.MapLit || res.MapWidth < 300 {
			t.Errorf("%s report: map not drawn: %+v", rp.name, res)
		}
		if rp.profile && (!res.ChartPresent || res.ChartWidth < 300 || res.ChartHeight < 100 || res.ChartPathLen < 100) {
			t.Errorf("%s report: profile chart not drawn: %+v", rp.name, res)
		}
	}
}
