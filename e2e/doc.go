// Package e2e proves Parley's workshop in a real browser: the real server
// on a loopback listener over a real SQLite file, driven by headless
// Chromium through chromedp, one browser context per person so the
// facilitator's session never leaks to an expert. It has no code outside
// its tests.
//
// The tests skip, loudly, when /usr/bin/chromium is missing; .ci/run
// installs it. Set PARLEY_SCREENSHOTS to a folder to keep the full-page
// screenshots the scenario takes; otherwise they go to a temporary folder
// whose path the test prints.
package e2e
