package api_test

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
)

// A reference case: a request, its published source, and the values the
// response must hold (or the error it must give). The files live in
// testdata/cases, one case a file, so adding one is cheap.
type refCase struct {
	Source  string          `json:"source"`
	Request json.RawMessage `json:"request"`
	Expect  []struct {
		Path  string   `json:"path"`
		Value *float64 `json:"value"`
		Text  string   `json:"text"`
		Rel   float64  `json:"rel"`
	} `json:"expect"`
	Error *struct {
		Line, Column int
		Param        string
	} `json:"error"`
}

func TestReferenceCases(t *testing.T) {
	files, err := filepath.Glob("../../testdata/cases/*.json")
	if err != nil || len(files) == 0 {
		t.Fatalf("no reference cases found (%v)", err)
	}
	for _, file := range files {
		t.Run(filepath.Base(file), func(t *testing.T) {
			data, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			var c refCase
			if err := json.Unmarshal(data, &c); err != nil {
				t.Fatal(err)
			}
			if c.Source == "" {
				t.Error("case names no source")
			}
			var req api.Request
			if err := json.Unmarshal(c.Request, &req); err != nil {
				t.Fatal(err)
			}
			resp, err := api.Analyze(req)
			if c.Error != nil {
				var p *api.Problem
				if !errors.As(err, &p) || p.Line != c.Error.Line || p.Column != c.Error.Column || p.Param != c.Error.Param {
					t.Errorf("got %v, want an error at %d:%d %s", err, c.Error.Line, c.Error.Column, c.Error.Param)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			raw, _ := json.Marshal(resp)
			var tree any
			_ = json.Unmarshal(raw, &tree)
			for _, e := range c.Expect {
				got, ok := lookup(tree, e.Path)
				if !ok {
					t.Errorf("%s: not in the response", e.Path)
					continue
				}
				if e.Text != "" {
					if got != e.Text {
						t.Errorf("%s = %v, want %q", e.Path, got, e.Text)
					}
					continue
				}
				var v float64
				switch g := got.(type) {
				case float64:
					v = g
				case map[string]any:
					re, im := g["re"].(float64), g["im"].(float64)
					v = math.Copysign(math.Hypot(re, im), re)
					if math.Abs(im) > 1e-9*math.Abs(re) {
						t.Errorf("%s = %v: expected a real value", e.Path, g)
					}
				default:
					t.Errorf("%s = %v: not a number", e.Path, got)
					continue
				}
				if d := math.Abs(v-*e.Value) / math.Abs(*e.Value); !(d <= e.Rel) {
					t.Errorf("%s = %.12g, want %.12g (rel %.2g > %.0g) — %s", e.Path, v, *e.Value, d, e.Rel, c.Source)
				}
			}
		})
	}
}

// lookup follows a dotted path: map keys, list indices, and name=X to pick
// the list element whose "name" is X.
func lookup(v any, path string) (any, bool) {
	for _, seg := range strings.Split(path, ".") {
		switch n := v.(type) {
		case map[string]any:
			x, ok := n[seg]
			if !ok {
				return nil, false
			}
			v = x
		case []any:
			if name, ok := strings.CutPrefix(seg, "name="); ok {
				found := false
				for _, el := range n {
					if m, _ := el.(map[string]any); m != nil && m["name"] == name {
						v, found = el, true
					}
				}
				if !found {
					return nil, false
				}
				continue
			}
			i, err := strconv.Atoi(seg)
			if err != nil || i < 0 || i >= len(n) {
				return nil, false
			}
			v = n[i]
		default:
			return nil, false
		}
	}
	return v, true
}
