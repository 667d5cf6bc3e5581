package site

import (
	"strconv"

	"github.com/yuin/goldmark/ast"
)

// ids makes heading ids: lower-case ASCII letters and digits with "-" for
// spaces, unique within a page. In the single-file export every page shares
// one document, so ids there are prefixed with the page name.
type ids struct {
	prefix string
	used   map[string]bool
}

func newIDs(p Page) *ids {
	i := &ids{used: map[string]bool{}}
	if p.Single {
		i.prefix = p.Name + "-"
	}
	return i
}

// Generate implements parser.IDs.
func (s *ids) Generate(value []byte, kind ast.NodeKind) []byte {
	var b []byte
	dash := false
	for _, c := range value {
		switch {
		case c >= 'a' && c <= 'z' || c >= '0' && c <= '9':
			b = append(b, c)
			dash = false
		case c >= 'A' && c <= 'Z':
			b = append(b, c+'a'-'A')
			dash = false
		case c == ' ' || c == '-' || c == '_':
			if len(b) > 0 && !dash {
				b = append(b, '-')
				dash = true
			}
		}
	}
	for len(b) > 0 && b[len(b)-1] == '-' {
		b = b[:len(b)-1]
	}
	if len(b) == 0 {
		b = []byte("section")
	}
	id := s.prefix + string(b)
	if s.used[id] {
		for n := 2; ; n++ {
			if c := id + "-" + strconv.Itoa(n); !s.used[c] {
				id = c
				break
			}
		}
	}
	s.used[id] = true
	return []byte(id)
}

// Put implements parser.IDs.
func (s *ids) Put(value []byte) { s.used[string(value)] = true }
