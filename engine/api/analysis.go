package api

import (
	"bytes"
	"encoding/json"
	"fmt"
	"reflect"
	"slices"
	"strings"

	"zport/engine/feedback"
)

// An Analysis is one optional part of the contract beyond the base answer
// (ports, gain, loop and sweep): a request key whose value is decoded
// strictly into a Q, answered by an R written under the same key of the
// response. The design aids ("tolerance", "standardValues",
// "sensitivity") are analyses, and so is every later one; each is
// registered once, from a package-level variable:
//
//	var Step = api.Register("step", func(p *api.Prepared, q *StepRequest, base *api.Response) (*StepResult, error) {
//		…
//	})
//
// A Go caller asks for it and reads the answer through the same value,
// typed:
//
//	Step.Ask(&req, &StepRequest{…})
//	resp, err := api.Analyze(req)
//	r := Step.Result(resp) // *StepResult, nil when not asked
//
// A JSON request names it by its key ({"step": {…}}); an unknown key is an
// error naming it. Analyses run after the base answer, in the order they
// were registered, each with the base response in hand.
type Analysis[Q, R any] struct {
	key string
}

// entry is an analysis as the registry keeps it, its types erased.
type entry struct {
	key    string
	decode func(raw json.RawMessage) (any, error)
	run    func(p *Prepared, q any, base *Response) (any, error)
	// before, when set, runs ahead of the base answer (see Before).
	before func(p *Prepared, q any) error
	// result decodes an answer, for reading a response back.
	result func(raw json.RawMessage) (any, error)
}

// registry holds the analyses in the order they were registered.
var registry []*entry

// baseKeys are the request's own keys (its fields' JSON names), which no
// analysis may take.
var baseKeys = jsonKeys(reflect.TypeFor[Request]())

// jsonKeys lists the JSON names of a struct type's exported fields.
func jsonKeys(t reflect.Type) []string {
	var keys []string
	for f := range t.Fields() {
		if !f.IsExported() {
			continue
		}
		name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		if name == "-" {
			continue
		}
		if name == "" {
			name = f.Name
		}
		keys = append(keys, name)
	}
	return keys
}

// Register adds an analysis under key, answered by run. The request's
// value for key is decoded into a new Q with unknown fields refused and
// every error naming its field under key ("step.points"); a Q that
// implements json.Unmarshaler decodes itself. run answers it from the
// prepared request and the base response; its error is the request's.
// Register panics when key is taken or empty: it is called from
// package-level variables, so a clash shows at start-up.
func Register[Q, R any](key string, run func(p *Prepared, q *Q, base *Response) (*R, error)) Analysis[Q, R] {
	if key == "" || slices.Contains(baseKeys, key) || lookup(key) != nil {
		panic(fmt.Sprintf("api: analysis key %q is empty or taken", key))
	}
	e := &entry{
		key: key,
		decode: func(raw json.RawMessage) (any, error) {
			q := new(Q)
			if err := decodeStrict(key, raw, q); err != nil {
				return nil, err
			}
			return q, nil
		},
		run: func(p *Prepared, q any, base *Response) (any, error) {
			r, err := run(p, q.(*Q), base)
			if err != nil || r == nil {
				return nil, err
			}
			return r, nil
		},
		result: func(raw json.RawMessage) (any, error) {
			r := new(R)
			return r, json.Unmarshal(raw, r)
		},
	}
	registry = append(registry, e)
	return Analysis[Q, R]{key: key}
}

func lookup(key string) *entry {
	for _, e := range registry {
		if e.key == key {
			return e
		}
	}
	return nil
}

// Analyses lists the registered analysis keys in the order they run.
func Analyses() []string {
	keys := make([]string, len(registry))
	for i, e := range registry {
		keys[i] = e.key
	}
	return keys
}

// Before sets work the analysis does ahead of the base answer, and
// returns the analysis, so that it reads
//
//	var Noise = api.Register("noise", run).Before(prepare)
//
// An analysis that needs more of the engine at every frequency of the
// base answer than the response carries asks the analyzer for it here
// (p.Analyzer.Adjoint: an adjoint solution at each point, from the
// factorization the point makes anyway), and run reads it from p.Spot and
// p.Points. Its error is the request's; it runs before anything is
// analyzed, so it is also where the analysis's options are checked.
func (a Analysis[Q, R]) Before(f func(p *Prepared, q *Q) error) Analysis[Q, R] {
	lookup(a.key).before = func(p *Prepared, q any) error { return f(p, q.(*Q)) }
	return a
}

// beforeAnalyses runs the Before of every analysis the request asks for.
func (p *Prepared) beforeAnalyses() error {
	for _, e := range p.Req.asked() {
		if e.before != nil {
			if err := e.before(p, p.Req.analyses[e.key]); err != nil {
				return err
			}
		}
	}
	return nil
}

// Key is the analysis's request and response key.
func (a Analysis[Q, R]) Key() string { return a.key }

// Ask asks req for the analysis with options q (a nil q withdraws it).
// It never changes a request that req was copied from.
func (a Analysis[Q, R]) Ask(req *Request, q *Q) {
	m := make(map[string]any, len(req.analyses)+1)
	for k, v := range req.analyses {
		m[k] = v
	}
	if q == nil {
		delete(m, a.key)
	} else {
		m[a.key] = q
	}
	req.analyses = m
}

// Asked returns the options req asks the analysis with, nil when it does
// not ask for it.
func (a Analysis[Q, R]) Asked(req Request) *Q {
	q, _ := req.analyses[a.key].(*Q)
	return q
}

// Result returns the analysis's answer in resp, nil when the request did
// not ask for it.
func (a Analysis[Q, R]) Result(resp *Response) *R {
	if resp == nil {
		return nil
	}
	r, _ := resp.analyses[a.key].(*R)
	return r
}

// Set puts r into resp as the analysis's answer, for code that assembles
// a response itself (a tolerance run in slices).
func (a Analysis[Q, R]) Set(resp *Response, r *R) {
	if resp.analyses == nil {
		resp.analyses = map[string]any{}
	}
	resp.analyses[a.key] = r
}

// Base returns req without any analysis key: the base request alone.
func (req Request) Base() Request {
	req.analyses = nil
	return req
}

// asked lists the registered analyses req asks for, in registry order.
func (req Request) asked() []*entry {
	var out []*entry
	for _, e := range registry {
		if _, ok := req.analyses[e.key]; ok {
			out = append(out, e)
		}
	}
	return out
}

// runAnalyses answers every analysis the request asks for into resp,
// stopping between them once the request's context is done.
func (p *Prepared) runAnalyses(resp *Response) error {
	asked := p.Req.asked()
	for i, e := range asked {
		if err := p.Context().Err(); err != nil {
			return stopProblem(&feedback.Stopped{Done: i, Total: len(asked), Units: "analyses asked for", Err: err}, "the analyses")
		}
		r, err := e.run(p, p.Req.analyses[e.key], resp)
		if err != nil {
			if sp := stopProblem(err, "“"+e.key+"”"); sp != nil {
				return sp
			}
			return err
		}
		if r != nil {
			if resp.analyses == nil {
				resp.analyses = map[string]any{}
			}
			resp.analyses[e.key] = r
		}
	}
	return nil
}

// requestBase is Request without its methods, so that its JSON form is
// encoding/json's own.
type requestBase Request

// UnmarshalJSON reads a request strictly: the base keys into their
// fields, every other key into the analysis registered under it; an
// unknown key, or a key given twice, is an error naming it.
func (req *Request) UnmarshalJSON(b []byte) error {
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(b, &raw); err != nil {
		return err
	}
	base := map[string]json.RawMessage{}
	analyses := map[string]any{}
	for k, v := range raw {
		if slices.Contains(baseKeys, k) {
			base[k] = v
			continue
		}
		e := lookup(k)
		if e == nil {
			return fieldErr(k, "unknown key %q (the request's keys are %s, and the analyses %s)", k,
				strings.Join(baseKeys, ", "), strings.Join(Analyses(), ", "))
		}
		if !present(v) {
			continue
		}
		q, err := e.decode(v)
		if err != nil {
			return err
		}
		analyses[k] = q
	}
	enc, err := json.Marshal(base)
	if err != nil {
		return err
	}
	var rb requestBase
	dec := json.NewDecoder(bytes.NewReader(enc))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&rb); err != nil {
		return err
	}
	*req = Request(rb)
	if len(analyses) > 0 {
		req.analyses = analyses
	}
	return nil
}

// MarshalJSON writes the base keys, then each analysis asked for under its
// key, in registry order.
func (req Request) MarshalJSON() ([]byte, error) {
	return withAnalyses(requestBase(req), req.analyses)
}

// responseBase is Response without its methods.
type responseBase Response

// MarshalJSON writes the base answer, then each analysis's answer under its
// key, in registry order.
func (r Response) MarshalJSON() ([]byte, error) {
	return withAnalyses(responseBase(r), r.analyses)
}

// UnmarshalJSON reads a response: the base keys into their fields, each
// registered analysis's answer into its result type. (Tests and tools read
// responses; the engine only writes them.)
func (r *Response) UnmarshalJSON(b []byte) error {
	var rb responseBase
	if err := json.Unmarshal(b, &rb); err != nil {
		return err
	}
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(b, &raw); err != nil {
		return err
	}
	*r = Response(rb)
	for _, e := range registry {
		v, ok := raw[e.key]
		if !ok || !present(v) {
			continue
		}
		res, err := e.result(v)
		if err != nil {
			return fmt.Errorf("%s: %w", e.key, err)
		}
		if r.analyses == nil {
			r.analyses = map[string]any{}
		}
		r.analyses[e.key] = res
	}
	return nil
}

// withAnalyses marshals base, an object, and appends each analysis in
// extra in registry order.
func withAnalyses(base any, extra map[string]any) ([]byte, error) {
	b, err := json.Marshal(base)
	if err != nil || len(extra) == 0 {
		return b, err
	}
	var buf bytes.Buffer
	buf.Write(b[:len(b)-1]) // without the closing brace
	for _, e := range registry {
		v, ok := extra[e.key]
		if !ok {
			continue
		}
		vb, err := json.Marshal(v)
		if err != nil {
			return nil, err
		}
		if buf.Len() > 1 {
			buf.WriteByte(',')
		}
		kb, _ := json.Marshal(e.key)
		buf.Write(kb)
		buf.WriteByte(':')
		buf.Write(vb)
	}
	buf.WriteByte('}')
	return buf.Bytes(), nil
}
