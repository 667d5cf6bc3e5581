// Package e2e holds zport's browser tests: the built site, opened from
// file:// and over http in Debian's Chromium, driven by chromedp. The tests
// build the site once (TestMain) into a temporary folder, exactly as
// `go run ./build` and `go run ./build single` would, and compare what the
// pages show with the native engine.
//
// Without Chromium the tests skip with a loud message, unless
// ZPORT_BROWSER=required (as .ci/run sets), when they fail.
//
// What a page shows is read from the data attributes of its values and
// charts (data-port, data-quantity, data-re/data-im, data-value, the
// charts' data-values) and held to api.Analyze run in the test itself on
// the request the page's inputs describe (native_test.go): 1e-12 relative
// for values, the charts' own precision for charts. Every tab carries a
// probe (harness_test.go) that records script errors, policy violations
// and dialogs, and marks the panels the HTML carried before the engine
// started, so a test can tell a live result from a pre-rendered one.
//
//	pages_test.go        every stage's page from file:// and under an http sub-path
//	edit_test.go         typing updates every row and chart; a bad value is refused in place
//	share_test.go        share links round-trip; hostile fragments are refused with a notice
//	network_test.go      no request leaves the site's folder
//	single_test.go       the single-file export from file://
//	screenshots_test.go  every page at 1280×800 (light, dark) and 390×844, checked non-blank
//	robust_test.go       drafts across reloads, links by one rule, tiny values, long tokens,
//	                     scripts off, the editor's input limits
//
// Set ZPORT_SHOTS=DIR to keep the screenshots in DIR.
package e2e
