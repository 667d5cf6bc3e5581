package site

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/base64"
	"html"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"zport/engine/api"
)

// testOptions stand in for the compiled engine and Go's wasm_exec.js: the
// site treats both as opaque bytes.
func testOptions() Options {
	rnd := rand.New(rand.NewPCG(1, 1))
	engine := make([]byte, 64<<10)
	for i := range engine {
		engine[i] = byte(rnd.IntN(16)) // compressible, like code
	}
	copy(engine, "\x00asm\x01\x00\x00\x00")
	return Options{Engine: engine, WasmExec: []byte("// stand-in for wasm_exec.js\nglobalThis.Go = class {};\n")}
}

var (
	built       Files
	builtSingle []byte
)

func build(t *testing.T) Files {
	t.Helper()
	if built == nil {
		f, err := Build(testOptions())
		if err != nil {
			t.Fatalf("Build: %v", err)
		}
		built = f
	}
	return built
}

func single(t *testing.T) []byte {
	t.Helper()
	if builtSingle == nil {
		b, err := Single(testOptions())
		if err != nil {
			t.Fatalf("Single: %v", err)
		}
		builtSingle = b
	}
	return builtSingle
}

// TestBuildDeterministic builds the site twice into two folders and
// compares every byte, as two builds of one tree must match.
func TestBuildDeterministic(t *testing.T) {
	dirs := []string{t.TempDir(), t.TempDir()}
	for _, d := range dirs {
		f, err := Build(testOptions())
		if err != nil {
			t.Fatal(err)
		}
		if err := f.Write(d); err != nil {
			t.Fatal(err)
		}
		s, err := Single(testOptions())
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(d, "zport-single.html"), s, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	n := 0
	err := filepath.WalkDir(dirs[0], func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dirs[0], p)
		a, _ := os.ReadFile(p)
		b, err := os.ReadFile(filepath.Join(dirs[1], rel))
		if err != nil {
			t.Errorf("%s: only in the first build", rel)
			return nil
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between two builds", rel)
		}
		n++
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if n < 15 {
		t.Errorf("only %d files built", n)
	}
}

func TestEngineScript(t *testing.T) {
	opt := testOptions()
	js, err := EngineScript(opt.Engine)
	if err != nil {
		t.Fatal(err)
	}
	m := regexp.MustCompile(`globalThis\.` + EngineGlobal + `="([A-Za-z0-9+/=]+)";`).FindSubmatch(js)
	if m == nil {
		t.Fatalf("zport-engine.js does not set the global string: %.200s", js)
	}
	gz, err := base64.StdEncoding.DecodeString(string(m[1]))
	if err != nil {
		t.Fatal(err)
	}
	// RFC 1952: bytes 4–7 are the modification time, zero for none; no
	// FNAME flag (bit 3 of byte 3).
	if !bytes.Equal(gz[4:8], []byte{0, 0, 0, 0}) || gz[3]&8 != 0 {
		t.Errorf("gzip header carries a time or a name: % x", gz[:10])
	}
	zr, err := gzip.NewReader(bytes.NewReader(gz))
	if err != nil {
		t.Fatal(err)
	}
	got, err := io.ReadAll(zr)
	if err != nil || !bytes.Equal(got, opt.Engine) {
		t.Errorf("the engine does not survive the round trip (%v)", err)
	}
}

var (
	tagRE     = regexp.MustCompile(`<[a-zA-Z][^>]*>`)
	attrRE    = regexp.MustCompile(`\s(src|href)="([^"]*)"`)
	handlerRE = regexp.MustCompile(`\son[a-z]+=`)
	inputRE   = regexp.MustCompile(`<input [^>]*id="([^"]+)"`)
	cspRE     = regexp.MustCompile(`<meta http-equiv="Content-Security-Policy" content="([^"]*)">`)
	schemeRE  = regexp.MustCompile(`^[a-zA-Z][a-zA-Z0-9+.-]*:`)
)

// TestPagesSafe checks every page of the multi-file site for what its
// Content-Security-Policy and the offline promise require.
func TestPagesSafe(t *testing.T) {
	files := build(t)
	pages := 0
	for _, name := range files.Names() {
		if !strings.HasSuffix(name, ".html") {
			continue
		}
		pages++
		page := string(files[name])
		m := cspRE.FindStringSubmatch(page)
		if m == nil || html.UnescapeString(m[1]) != CSP {
			t.Errorf("%s: CSP meta tag missing or different: %v", name, m)
		} else {
			checkLocks(t, name, html.UnescapeString(m[1]))
		}
		for _, tag := range tagRE.FindAllString(page, -1) {
			if regexp.MustCompile(`\sstyle=`).MatchString(tag) {
				t.Errorf("%s: inline style attribute in %.80s", name, tag)
			}
			if handlerRE.MatchString(tag) {
				t.Errorf("%s: event handler attribute in %.80s", name, tag)
			}
			if strings.HasPrefix(tag, "<script") && !strings.Contains(tag, " src=") {
				t.Errorf("%s: inline script %.80s", name, tag)
			}
			if strings.HasPrefix(tag, "<style") {
				t.Errorf("%s: style element", name)
			}
			for _, a := range attrRE.FindAllStringSubmatch(tag, -1) {
				u := html.UnescapeString(a[2])
				switch {
				case strings.HasPrefix(u, "#"):
				case strings.HasPrefix(u, "/"), schemeRE.MatchString(u):
					t.Errorf("%s: %s=%q leaves the page's folder", name, a[1], u)
				default:
					target := strings.SplitN(u, "#", 2)[0]
					// custom.html is the circuit page, built with its own issue.
					if _, ok := files[target]; !ok && target != "custom.html" {
						t.Errorf("%s: %s=%q names a file the build does not write", name, a[1], u)
					}
				}
			}
		}
		for _, id := range inputRE.FindAllStringSubmatch(page, -1) {
			if !strings.Contains(page, `<label for="`+id[1]+`"`) {
				t.Errorf("%s: input %s has no label", name, id[1])
			}
		}
	}
	if pages < 13 {
		t.Errorf("%d pages, want the start, method and about pages and one per topology", pages)
	}
}

// TestTopologyPages checks that every stage of the catalog has a page with
// its live calculator and pre-rendered results.
func TestTopologyPages(t *testing.T) {
	files := build(t)
	for _, e := range api.Catalog() {
		page, ok := files[e.ID+".html"]
		if !ok {
			t.Errorf("no page for %s", e.ID)
			continue
		}
		s := string(page)
		for _, want := range []string{
			`data-calculator data-topology="` + e.ID + `"`,
			`data-engine="loading"`,
			`<script defer src="zport-engine.js"></script>`,
			`data-quantity="zDirect"`,
			`class="zplot`,
			`Small-signal linear analysis only`,
		} {
			if !strings.Contains(s, want) {
				t.Errorf("%s.html lacks %s", e.ID, want)
			}
		}
		if !strings.Contains(string(files["index.html"]), `href="`+e.ID+`.html"`) {
			t.Errorf("the start page does not link to %s", e.ID)
		}
	}
	for _, name := range []string{"index.html", "method.html", "about.html"} {
		if strings.Contains(string(files[name]), "zport-engine.js") {
			t.Errorf("%s loads the engine without a calculator", name)
		}
	}
	if !strings.Contains(string(files["method.html"]), `<math display="block">`) {
		t.Errorf("the method page has no MathML formulas")
	}
}

// checkLocks checks that a page's policy refuses what default-src leaves
// open: plugins, a <base> element, and form submissions.
func checkLocks(t *testing.T, name, csp string) {
	t.Helper()
	directives := map[string]bool{}
	for _, d := range strings.Split(csp, ";") {
		directives[strings.Join(strings.Fields(d), " ")] = true
	}
	for _, want := range []string{"object-src 'none'", "base-uri 'none'", "form-action 'none'"} {
		if !directives[want] {
			t.Errorf("%s: the policy lacks %s: %s", name, want, csp)
		}
	}
}

// TestSingleFile checks that the single-file export is self-contained and
// that its CSP admits exactly its own inline style and scripts.
func TestSingleFile(t *testing.T) {
	s := string(single(t))
	m := cspRE.FindStringSubmatch(s)
	if m == nil {
		t.Fatal("no CSP meta tag")
	}
	csp := html.UnescapeString(m[1])
	blocks := regexp.MustCompile(`(?s)<(script|style)>(.*?)</(?:script|style)>`).FindAllStringSubmatch(s, -1)
	if len(blocks) < 4 {
		t.Fatalf("%d inline blocks, want the style sheet and the scripts", len(blocks))
	}
	for _, b := range blocks {
		sum := sha256.Sum256([]byte(b[2]))
		h := "'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"
		if !strings.Contains(csp, h) {
			t.Errorf("inline %s (%d bytes) is not admitted by the CSP", b[1], len(b[2]))
		}
	}
	if strings.Contains(csp, "unsafe-inline") {
		t.Errorf("CSP allows any inline code: %s", csp)
	}
	checkLocks(t, "the single file", csp)
	for _, tag := range tagRE.FindAllString(s, -1) {
		for _, a := range attrRE.FindAllStringSubmatch(tag, -1) {
			u := html.UnescapeString(a[2])
			if !strings.HasPrefix(u, "#") && !strings.HasPrefix(u, "data:") && u != "custom.html" {
				t.Errorf("single file refers to %s=%q", a[1], u)
			}
		}
	}
	for _, e := range api.Catalog() {
		if !strings.Contains(s, `id="page-`+e.ID+`"`) || !strings.Contains(s, `data-topology="`+e.ID+`"`) {
			t.Errorf("single file lacks the page or calculator of %s", e.ID)
		}
	}
}
