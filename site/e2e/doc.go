// Package e2e holds zport's browser tests: the built site, opened from
// file:// and over http in Debian's Chromium, driven by chromedp. The tests
// build the site once (TestMain) into a temporary folder, exactly as
// `go run ./build` and `go run ./build single` would, and compare what the
// pages show with the native engine.
//
// Without Chromium the tests skip with a loud message, unless
// ZPORT_BROWSER=required (as .ci/run sets), when they fail.
package e2e
