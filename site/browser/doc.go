// Package browser is test and benchmark support: it starts Debian's
// Chromium for chromedp (see browser.go; native builds only).
package browser
