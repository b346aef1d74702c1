// Package browsertest starts the headless Chromium that Parley's browser
// tests drive (chromedp), with one set of flags for every test.
package browsertest

import (
	"context"
	"os"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// ChromiumPath is Debian's chromium, which .ci/run installs.
const ChromiumPath = "/usr/bin/chromium"

// Start starts chromium headless with the flags this machine's closed
// network needs, in a window of width × height CSS pixels, living at
// most life, and returns its root context with a first tab open on
// about:blank. Tabs and browser contexts are made from it with
// chromedp.NewContext. The browser is stopped when t ends. Start skips
// t, loudly, when chromium is missing.
func Start(t testing.TB, life time.Duration, width, height int) context.Context {
	t.Helper()
	if _, err := os.Stat(ChromiumPath); err != nil {
		t.Skipf("SKIPPING BROWSER TESTS: %s not found (%v). Install it with `apt-get install -y chromium`; .ci/run does.", ChromiumPath, err)
	}
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(ChromiumPath),
		chromedp.Headless,
		chromedp.NoSandbox, // CI runs as root
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.Flag("no-default-browser-check", true),
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-extensions", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.Flag("hide-scrollbars", true),
		chromedp.Flag("mute-audio", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(width, height),
	}
	ctx, cancelLife := context.WithTimeout(context.Background(), life)
	alloc, cancelAlloc := chromedp.NewExecAllocator(ctx, opts...)
	root, cancelRoot := chromedp.NewContext(alloc)
	t.Cleanup(func() { cancelRoot(); cancelAlloc(); cancelLife() })
	if err := chromedp.Do(root, chromedp.Navigate("about:blank")); err != nil {
		t.Fatalf("start chromium: %v", err)
	}
	return root
}
