package site

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"embed"
	"encoding/base64"
	"errors"
	"fmt"
	"html/template"
	"io/fs"
	"maps"
	"os"
	"path"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/parser"
	"github.com/yuin/goldmark/text"

	"zport/engine/api"
	"zport/site/calc"
	"zport/site/examples"
	"zport/site/plot"
)

// Sources holds the site as it is edited: content/ (Markdown, one file per
// page), templates/ (html/template), assets/ (style sheet, scripts, icon)
// and schematics/ (one SVG per topology, named after its ID).
//
//go:embed content templates assets schematics
var Sources embed.FS

// CSP is the Content-Security-Policy of every page of the multi-file site:
// scripts, styles and images only from the page's own folder, the
// WebAssembly compile the engine needs, and its worker from a blob: (the
// loader makes it from zport-engine.js). Images may also be data: URLs. No
// plugins, no <base> to move relative links, and no form submission
// anywhere (the calculators compute in the page). The single-file export
// has the same policy, with hashes for its inline parts.
const CSP = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; worker-src blob:; style-src 'self'; img-src 'self' data:; connect-src 'self'; " + cspLocks

// cspLocks are the directives that default-src does not cover: plugins,
// the document's base URL and form targets, all refused.
const cspLocks = "object-src 'none'; base-uri 'none'; form-action 'none'"

// Options configure a build.
type Options struct {
	// Engine is the compiled WebAssembly module (GOOS=js GOARCH=wasm build
	// of zport/wasm). It is written gzip-compressed and base64-encoded into
	// zport-engine.js.
	Engine []byte
	// WasmExec is Go's wasm_exec.js, from $(go env GOROOT)/lib/wasm.
	WasmExec []byte
	// Sources replaces the embedded Sources, e.g. os.DirFS("site") while
	// editing or an fstest.MapFS in tests.
	Sources fs.FS
}

// Files is a built site: slash-separated file name to content.
type Files map[string][]byte

// Names returns the file names in lexical order.
func (f Files) Names() []string { return slices.Sorted(maps.Keys(f)) }

// Write writes every file under dir, creating directories as needed.
func (f Files) Write(dir string) error {
	for _, n := range f.Names() {
		p := filepath.Join(dir, filepath.FromSlash(n))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(p, f[n], 0o644); err != nil {
			return err
		}
	}
	return nil
}

// EngineGlobal is the name of the global string zport-engine.js sets, and
// EngineRuntime that of the function holding Go's wasm_exec.js.
const (
	EngineGlobal  = "zportEngine"
	EngineRuntime = "zportGo"
)

// EngineScript wraps a WebAssembly module and Go's wasm_exec.js as the
// classic script the loader reads: the module gzip-compressed at the best
// level, with no name or time in the header so the bytes depend on the
// module alone, then written into one global string in a base-122
// encoding (base122.go: a seventh smaller than base64); and
// wasm_exec.js as the body of a global function, which the loader does not
// call but reads back as source (Function.prototype.toString) to start the
// engine's worker with. Browsers refuse to fetch or stream-compile a .wasm
// file from file://, and to start a worker from a file, but they run a
// script and a worker from a blob: of the page's own making.
func EngineScript(wasm, wasmExec []byte) ([]byte, error) {
	var gz bytes.Buffer
	zw, err := gzip.NewWriterLevel(&gz, gzip.BestCompression)
	if err != nil {
		return nil, err
	}
	if _, err := zw.Write(wasm); err != nil {
		return nil, err
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	enc := base122Encode(gz.Bytes())
	var b bytes.Buffer
	b.WriteString("// zport engine: gzip-compressed WebAssembly, base-122-encoded, and Go's wasm_exec.js (see zport.js).\n")
	b.WriteString("globalThis." + EngineGlobal + "=\"")
	b.WriteString(enc)
	b.WriteString("\";\nglobalThis." + EngineRuntime + "=function(){\n")
	b.Write(wasmExec)
	b.WriteString("\n};\n")
	return b.Bytes(), nil
}

// builder holds what every page of one build shares.
type builder struct {
	src      fs.FS
	tmpl     *template.Template
	md       goldmark.Markdown
	catalog  []api.CatalogEntry
	pages    []pageSrc
	hover    bool
	styleCSS []byte
}

// pageSrc is one Markdown page.
type pageSrc struct {
	Name   string // file name without extension: index, method, inverting …
	Source []byte
}

// navItem is one link of the navigation.
type navItem struct {
	Name, Title, Link string
	Current           bool
}

// pageData is what the page templates receive.
type pageData struct {
	Name, Title string
	Body        template.HTML
	CSP         string
	Engine      bool // the page holds a calculator or the editor and loads the engine, solve.js and aids.js
	Calculator  bool // the page holds a stage calculator and loads calculator.js
	Editor      bool // the page holds the circuit editor and loads circuit.js
	Hover       bool // plothover.js is part of the site
	Single      bool
	Home        string
	Nav         []navItem
	Stages      []navItem
	Prev, Next  *navItem
}

func newBuilder(opt Options) (*builder, error) {
	src := opt.Sources
	if src == nil {
		src = Sources
	}
	b := &builder{src: src, catalog: api.Catalog()}
	for _, e := range b.catalog {
		for _, p := range e.Params {
			for _, k := range calc.ReservedKeys {
				if p.Name == k {
					return nil, fmt.Errorf("topology %s: parameter %q collides with the URL fragment's own key", e.ID, k)
				}
			}
		}
	}
	tmpl, err := Templates(src)
	if err != nil {
		return nil, err
	}
	b.tmpl = tmpl
	if _, err := fs.Stat(src, "assets/plothover.js"); err == nil {
		b.hover = true
	}
	css, err := fs.ReadFile(src, "assets/style.css")
	if err != nil {
		return nil, err
	}
	// The charts are inline SVG without a style element of their own (the
	// CSP forbids inline styles), so their rules join the site's sheet.
	b.styleCSS = append(append(append([]byte{}, css...), "\n/* Charts (zport/site/plot). */\n"...), plot.CSS+"\n"...)

	b.md = goldmark.New(
		goldmark.WithExtensions(
			extension.Table,
			&Blocks{
				Catalog:   b.catalog,
				Compute:   calc.Compute,
				Schematic: b.schematic,
				Templates: tmpl,
			},
			&Editor{Examples: examples.All(), Compute: calc.Compute, Templates: tmpl},
		),
		goldmark.WithParserOptions(parser.WithAutoHeadingID()),
	)
	entries, err := fs.ReadDir(src, "content")
	if err != nil {
		return nil, err
	}
	for _, e := range entries { // ReadDir sorts by name
		name, ok := strings.CutSuffix(e.Name(), ".md")
		if !ok || e.IsDir() {
			continue
		}
		if !isPageName(name) {
			return nil, fmt.Errorf("content/%s: page names are lower-case letters, digits and “-”", e.Name())
		}
		data, err := fs.ReadFile(src, "content/"+e.Name())
		if err != nil {
			return nil, err
		}
		b.pages = append(b.pages, pageSrc{Name: name, Source: data})
	}
	for _, e := range b.catalog {
		if !b.hasPage(e.ID) {
			return nil, fmt.Errorf("content/%s.md is missing: every topology of the catalog has a page", e.ID)
		}
	}
	for _, need := range []string{"index", "method", "about"} {
		if !b.hasPage(need) {
			return nil, fmt.Errorf("content/%s.md is missing", need)
		}
	}
	sort.SliceStable(b.pages, func(i, j int) bool { return b.rank(b.pages[i].Name) < b.rank(b.pages[j].Name) })
	return b, nil
}

func (b *builder) hasPage(name string) bool {
	for _, p := range b.pages {
		if p.Name == name {
			return true
		}
	}
	return false
}

// rank orders pages: the start page, the stages in catalog order, the
// method, other pages by name, and the about page last.
func (b *builder) rank(name string) int {
	switch name {
	case "index":
		return 0
	case "method":
		return 1000
	case "about":
		return 3000
	}
	for i, e := range b.catalog {
		if e.ID == name {
			return 1 + i
		}
	}
	return 2000
}

// schematic returns the inline SVG of a topology's schematic.
func (b *builder) schematic(id string) (template.HTML, bool) {
	data, err := fs.ReadFile(b.src, path.Join("schematics", id+".svg"))
	if err != nil {
		return "", false
	}
	s := string(data)
	if i := strings.Index(s, "<svg"); i > 0 {
		s = s[i:] // drop an XML declaration or comment before the root
	}
	return template.HTML(strings.TrimSpace(s)), true
}

// converted is one page's HTML body and facts about it.
type converted struct {
	Title      string
	Body       template.HTML
	Engine     bool
	Calculator bool
	Editor     bool
}

func (b *builder) convert(p pageSrc, single bool) (converted, error) {
	ctx := NewContext(Page{Name: p.Name, Single: single})
	doc := b.md.Parser().Parse(text.NewReader(p.Source), parser.WithContext(ctx))
	var c converted
	_ = ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		switch n := n.(type) {
		case *ast.Heading:
			if n.Level == 1 && c.Title == "" {
				c.Title = plainText(n, p.Source)
			}
		case *Calculator:
			c.Engine, c.Calculator = true, true
		case *CircuitEditor:
			c.Engine, c.Editor = true, true
		}
		return ast.WalkContinue, nil
	})
	if c.Title == "" {
		return c, fmt.Errorf("content/%s.md: the page needs a “# Title” heading", p.Name)
	}
	var out bytes.Buffer
	if err := b.md.Renderer().Render(&out, p.Source, doc); err != nil {
		return c, fmt.Errorf("content/%s.md: %w", p.Name, err)
	}
	c.Body = template.HTML(out.String())
	return c, nil
}

// plainText is the text of an inline subtree.
func plainText(n ast.Node, src []byte) string {
	var b strings.Builder
	_ = ast.Walk(n, func(c ast.Node, entering bool) (ast.WalkStatus, error) {
		if entering {
			if t, ok := c.(*ast.Text); ok {
				b.Write(t.Segment.Value(src))
				if t.SoftLineBreak() {
					b.WriteByte(' ')
				}
			}
			if s, ok := c.(*ast.String); ok {
				b.Write(s.Value)
			}
		}
		return ast.WalkContinue, nil
	})
	return b.String()
}

// nav builds the navigation for page current.
func (b *builder) nav(current string, titles map[string]string, single bool) (nav, stages []navItem, prev, next *navItem) {
	for _, n := range []string{"index", "method", "custom", "about"} {
		if n == "custom" && !b.hasPage(n) {
			continue
		}
		nav = append(nav, navItem{Name: n, Title: navTitles[n], Link: PageLink(n, single), Current: n == current})
	}
	for i, e := range b.catalog {
		it := navItem{Name: e.ID, Title: titles[e.ID], Link: PageLink(e.ID, single), Current: e.ID == current}
		stages = append(stages, it)
		if e.ID == current {
			if i > 0 {
				p := b.catalog[i-1]
				prev = &navItem{Name: p.ID, Title: titles[p.ID], Link: PageLink(p.ID, single)}
			}
			if i+1 < len(b.catalog) {
				n := b.catalog[i+1]
				next = &navItem{Name: n.ID, Title: titles[n.ID], Link: PageLink(n.ID, single)}
			}
		}
	}
	return nav, stages, prev, next
}

var navTitles = map[string]string{"index": "Start", "method": "Method", "custom": "Your circuit", "about": "About and cautions"}

// Build renders the multi-file site: one HTML file per page of content/,
// the style sheet, the scripts, the icon and the engine.
func Build(opt Options) (Files, error) {
	if len(opt.Engine) == 0 || len(opt.WasmExec) == 0 {
		return nil, errors.New("site: Options.Engine and Options.WasmExec are required")
	}
	b, err := newBuilder(opt)
	if err != nil {
		return nil, err
	}
	files := Files{}
	conv := map[string]converted{}
	titles := map[string]string{}
	for _, p := range b.pages {
		c, err := b.convert(p, false)
		if err != nil {
			return nil, err
		}
		conv[p.Name], titles[p.Name] = c, c.Title
	}
	for _, p := range b.pages {
		c := conv[p.Name]
		d := pageData{Name: p.Name, Title: c.Title, Body: c.Body, CSP: CSP, Engine: c.Engine, Calculator: c.Calculator, Editor: c.Editor, Hover: b.hover, Home: PageLink("index", false)}
		d.Nav, d.Stages, d.Prev, d.Next = b.nav(p.Name, titles, false)
		var out bytes.Buffer
		if err := b.tmpl.ExecuteTemplate(&out, "page", d); err != nil {
			return nil, fmt.Errorf("page %s: %w", p.Name, err)
		}
		files[p.Name+".html"] = out.Bytes()
	}
	err = fs.WalkDir(b.src, "assets", func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		data, err := fs.ReadFile(b.src, p)
		if err != nil {
			return err
		}
		files[strings.TrimPrefix(p, "assets/")] = data
		return nil
	})
	if err != nil {
		return nil, err
	}
	files["style.css"] = b.styleCSS
	eng, err := EngineScript(opt.Engine, opt.WasmExec)
	if err != nil {
		return nil, err
	}
	files["zport-engine.js"] = eng
	return files, nil
}

// Single renders every page into one self-contained HTML file: the pages
// are sections chosen by the fragment key p (#p=inverting), and the style
// sheet and scripts are inline, allowed by their SHA-256 hashes in the
// file's Content-Security-Policy.
func Single(opt Options) ([]byte, error) {
	if len(opt.Engine) == 0 || len(opt.WasmExec) == 0 {
		return nil, errors.New("site: Options.Engine and Options.WasmExec are required")
	}
	b, err := newBuilder(opt)
	if err != nil {
		return nil, err
	}
	eng, err := EngineScript(opt.Engine, opt.WasmExec)
	if err != nil {
		return nil, err
	}
	zjs, err := fs.ReadFile(b.src, "assets/zport.js")
	if err != nil {
		return nil, err
	}
	scripts := [][]byte{eng}
	if b.hover {
		h, err := fs.ReadFile(b.src, "assets/plothover.js")
		if err != nil {
			return nil, err
		}
		scripts = append(scripts, h)
	}
	scripts = append(scripts, zjs)
	// The page scripts follow zport.js, whose helpers they use, in the
	// order of page.html.
	for _, name := range []string{"calculator.js", "circuit.js", "solve.js", "aids.js"} {
		js, err := fs.ReadFile(b.src, "assets/"+name)
		if err != nil {
			return nil, err
		}
		scripts = append(scripts, js)
	}

	var style, inline strings.Builder
	var scriptHashes []string
	style.WriteString("<style>")
	style.Write(b.styleCSS)
	style.WriteString("</style>")
	if bytes.Contains(bytes.ToLower(b.styleCSS), []byte("</style")) {
		return nil, errors.New("site: style sheet contains “</style”")
	}
	styleHash := hash(b.styleCSS)
	for _, s := range scripts {
		if bytes.Contains(bytes.ToLower(s), []byte("</script")) {
			return nil, errors.New("site: a script contains “</script” and cannot be inlined")
		}
		// Inline scripts run in document order, like the deferred ones of
		// the multi-file pages, once they are placed at the end of body.
		inline.WriteString("<script>")
		inline.Write(s)
		inline.WriteString("</script>\n")
		scriptHashes = append(scriptHashes, hash(s))
	}
	csp := "default-src 'self'; script-src " + strings.Join(scriptHashes, " ") +
		" 'wasm-unsafe-eval'; worker-src blob:; style-src " + styleHash + "; img-src 'self' data:; connect-src 'self'; " + cspLocks

	titles := map[string]string{}
	conv := map[string]converted{}
	for _, p := range b.pages {
		c, err := b.convert(p, true)
		if err != nil {
			return nil, err
		}
		conv[p.Name], titles[p.Name] = c, c.Title
	}
	var sections []pageData
	for _, p := range b.pages {
		c := conv[p.Name]
		d := pageData{Name: p.Name, Title: c.Title, Body: c.Body, Engine: c.Engine, Calculator: c.Calculator, Editor: c.Editor, Single: true, Hover: b.hover, Home: PageLink("index", true)}
		d.Nav, d.Stages, d.Prev, d.Next = b.nav(p.Name, titles, true)
		sections = append(sections, d)
	}
	icon, err := fs.ReadFile(b.src, "assets/icon.svg")
	if err != nil {
		return nil, err
	}
	var out bytes.Buffer
	err = b.tmpl.ExecuteTemplate(&out, "single", struct {
		CSP      string
		Title    string
		Icon     template.URL
		Sections []pageData
		Style    template.HTML
		Scripts  template.HTML
	}{csp, titles["index"], template.URL("data:image/svg+xml;base64," + base64.StdEncoding.EncodeToString(icon)),
		sections, template.HTML(style.String()), template.HTML(inline.String())})
	if err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

// Templates parses templates/*.html of src with the functions they use.
func Templates(src fs.FS) (*template.Template, error) {
	return template.New("site").Funcs(template.FuncMap{
		"join": strings.Join,
		"sym":  symbolHTML,
		// fieldOf pairs a calculator field with its element id.
		"fieldOf": func(calcID string, f calcField) struct {
			ID string
			F  calcField
		} {
			return struct {
				ID string
				F  calcField
			}{calcID + "-" + strings.ReplaceAll(f.Name, ".", "-"), f}
		},
	}).ParseFS(src, "templates/*.html")
}

// symbolHTML writes a parameter symbol, turning the catalog's "R_s" or
// "r_id" notation into a subscript.
func symbolHTML(s string) template.HTML {
	base, sub, ok := strings.Cut(s, "_")
	if !ok {
		return template.HTML(template.HTMLEscapeString(s))
	}
	return template.HTML(template.HTMLEscapeString(base) + "<sub>" + template.HTMLEscapeString(sub) + "</sub>")
}

// hash is a CSP source expression for content: 'sha256-…'.
func hash(content []byte) string {
	sum := sha256.Sum256(content)
	return "'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"
}
