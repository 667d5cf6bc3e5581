// Package e2e holds zport's browser tests: the built site, opened from
// file:// and over http in Debian's Chromium, driven by chromedp. The tests
// build the site once (TestMain) into a temporary folder, exactly as
// `go run ./build` and `go run ./build single` would, and compare what the
// pages show with the native engine.
//
// Without Chromium the tests skip with a loud message, unless
// ZPORT_BROWSER=required (as .ci/run sets), when they fail. In -short mode
// they skip, and the site is not built.
//
// # One browser, many tabs
//
// The package starts one Chromium (browser.Shared) and every test runs in
// parallel with the others (t.Parallel), in a tab of its own browser
// context, so that no test sees another's storage or downloads. Tests that
// check every page or every stage do so in parallel subtests, a tab each.
// go test runs as many at once as -parallel allows (by default, as many as
// there are cores).
//
// # Time
//
// No test asserts how long anything takes: speed is measured by the
// benchmark (go run ./build/bench), and a loaded machine must not fail a
// test. Responsiveness is checked by design instead — by counting or by
// structure: that a paste costs one engine call and draws only a view's
// worth of line numbers and marks, that a tolerance study runs in slices
// with frames drawn between them. A test waits for a condition (a state of
// the page, a frame drawn, requests settled, a file written), never for a
// fixed time; every wait gives up after waitFor, a safety net that only a
// failing test reaches. Go's package timeout (10 minutes by default) is the
// only limit on a test's duration; the tabs stop a little before it, so
// that a page that hangs fails its own test with the step it hung in.
//
// # What is checked, and how
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
//	harness_test.go      the built site, the shared browser, the probe, waits
//	smoke_test.go        a calculator page loads and its engine starts
//	pages_test.go        every stage's page from file:// and under an http sub-path
//	native_test.go       reading a calculator and holding it to the native engine
//	edit_test.go         typing updates every row and chart; a bad value is refused in place
//	share_test.go        share links round-trip; hostile fragments are refused with a notice
//	network_test.go      no request leaves the site's folder
//	single_test.go       the single-file export from file://
//	screenshots_test.go  every page at 1280×800 (light, dark) and 390×844, checked non-blank
//	aids_test.go         the design aids: tolerance study, cancel, share link, panels
//	custom_test.go       the custom-circuit page: editor, errors, limits, links, files
//	robust_test.go       drafts across reloads, links by one rule, tiny values, long tokens,
//	                     scripts off, the editor's input limits
//	noise_test.go        the noise section: a stage page, the custom page, the single file
//	response_test.go     the closed-loop response section, on stage pages and the custom page
//	solve_test.go        design to a target: stage page, custom page, single file, a bad link
//	compare_test.go      pins: overlays, the comparison table, pins on the custom page and in
//	                     the single file
//	review_test.go       chart images (SVG, PNG), the printed report read back as text, charts
//	                     at a phone's width
//	contrast_test.go     input borders reach 3:1 in light and dark
//	worker_test.go       the engine runs in a worker; a superseded recompute never reaches it
//
// Set ZPORT_SHOTS=DIR to keep the screenshots in DIR.
package e2e
