package main

import (
	"errors"
	"fmt"
	"net"
	"net/http"
	"os"
	"time"
)

// runServe builds the site, then serves dist/ over http on the loopback
// interface until interrupted. args may name the address: "127.0.0.1:9000",
// ":9000" (port only) or "localhost:9000"; other hosts are refused, since
// the pages are for the person at this machine.
func runServe(args []string) error {
	addr := "127.0.0.1:8080"
	switch len(args) {
	case 0:
	case 1:
		addr = args[0]
	default:
		return fmt.Errorf("serve takes at most one argument, the address (got %q)", args)
	}
	host, port, err := net.SplitHostPort(addr)
	if err != nil {
		return fmt.Errorf("serve: address %q: %v (e.g. 127.0.0.1:8080)", addr, err)
	}
	switch host {
	case "", "localhost", "127.0.0.1":
		host = "127.0.0.1"
	case "::1", "[::1]":
		host = "::1"
	default:
		return fmt.Errorf("serve: %q is not a loopback address; the server listens on 127.0.0.1 only", host)
	}
	dist, _, err := buildSite()
	if err != nil {
		return err
	}
	ln, err := net.Listen("tcp", net.JoinHostPort(host, port))
	if err != nil {
		return err
	}
	srv := &http.Server{
		Handler:           noCache(http.FileServer(http.Dir(dist))),
		ReadHeaderTimeout: 10 * time.Second,
	}
	fmt.Fprintf(os.Stderr, "serving %s; stop with Ctrl-C\n", dist)
	fmt.Printf("http://%s/index.html\n", ln.Addr())
	err = srv.Serve(ln)
	if errors.Is(err, http.ErrServerClosed) {
		return nil
	}
	return err
}

// noCache keeps a browser from holding on to the pages of an older build.
func noCache(h http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Cache-Control", "no-cache")
		h.ServeHTTP(w, r)
	})
}
