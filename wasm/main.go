//go:build js && wasm

package main

import (
	"encoding/json"
	"fmt"
	"syscall/js"

	"zport/engine/api"
	"zport/site/calc"
)

func main() {
	done := make(chan struct{})
	release := register(js.Global(), func() { close(done) })
	<-done
	release()
}

// register sets global.zport and returns the function that removes it and
// releases its js.Funcs. exit is called once, from zport.exit().
func register(global js.Value, exit func()) (release func()) {
	obj := js.Global().Get("Object").New()
	var funcs []js.Func
	add := func(name string, fn js.Func) {
		funcs = append(funcs, fn)
		obj.Set(name, fn)
	}
	add("circuit", guard(func(args []js.Value) string {
		in, err := oneString(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		return string(calc.ComputeCircuitJSON([]byte(in)))
	}))
	add("panel", guard(func(args []js.Value) string {
		in, err := oneString(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		return string(calc.ComputeJSON([]byte(in)))
	}))
	for name, fn := range map[string]func([]byte) []byte{
		"aidsForm":   calc.AidsFormJSON,
		"aidsPanels": calc.AidsPanelsJSON,
		"solveForm":  calc.SolveFormJSON,
		"solveApply": calc.ApplyValueJSON,
	} {
		add(name, guard(func(args []js.Value) string {
			in, err := oneString(args)
			if err != nil {
				return errorJSON(err.Error())
			}
			return string(fn([]byte(in)))
		}))
	}
	runs := &runList[*toleranceRun]{what: "tolerance run", byID: map[int]*toleranceRun{}}
	add("toleranceStart", guard(func(args []js.Value) string {
		in, err := oneString(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		run, layout, errJSON := calc.StartToleranceJSON([]byte(in))
		if run == nil {
			return string(errJSON)
		}
		n := runs.add(&toleranceRun{run: run, layout: layout})
		_, total := run.Step(0)
		return fmt.Sprintf(`{"run":%d,"done":0,"total":%d}`, n, total)
	}))
	add("toleranceStep", guard(func(args []js.Value) string {
		if len(args) != 2 || args[1].Type() != js.TypeNumber {
			return errorJSON("zport.toleranceStep takes a run id and a number of trials")
		}
		r, err := runs.get(args[:1])
		if err != nil {
			return errorJSON(err.Error())
		}
		n := min(max(args[1].Int(), 1), api.MaxTrials)
		done, total := r.run.Step(n)
		return fmt.Sprintf(`{"done":%d,"total":%d}`, done, total)
	}))
	add("tolerancePanel", guard(func(args []js.Value) string {
		r, err := runs.get(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		return string(calc.EncodeAids(calc.ToleranceOutput(r.run, r.layout)))
	}))
	add("toleranceRelease", guard(func(args []js.Value) string {
		if _, err := runs.get(args); err != nil {
			return errorJSON(err.Error())
		}
		runs.release(args[0].Int())
		return `{"released":true}`
	}))
	// A solve's run is a coroutine: one dropped unfinished must be
	// stopped, or its goroutine would wait for ever.
	solves := &runList[*solveRun]{what: "solve", byID: map[int]*solveRun{}, drop: func(r *solveRun) { r.run.Stop() }}
	add("solveStart", guard(func(args []js.Value) string {
		in, err := oneString(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		run, layout, errJSON := calc.StartSolveJSON([]byte(in))
		if run == nil {
			return string(errJSON)
		}
		n := solves.add(&solveRun{run: run, layout: layout})
		_, total, _ := run.Step(0)
		return fmt.Sprintf(`{"run":%d,"done":0,"total":%d}`, n, total)
	}))
	add("solveStep", guard(func(args []js.Value) string {
		if len(args) != 2 || args[1].Type() != js.TypeNumber {
			return errorJSON("zport.solveStep takes a run id and a number of evaluations")
		}
		r, err := solves.get(args[:1])
		if err != nil {
			return errorJSON(err.Error())
		}
		done, total, finished := r.run.Step(min(max(args[1].Int(), 1), 1000))
		return fmt.Sprintf(`{"done":%d,"total":%d,"finished":%t}`, done, total, finished)
	}))
	add("solvePanel", guard(func(args []js.Value) string {
		r, err := solves.get(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		return string(calc.EncodeSolve(calc.SolveOutputOf(r.run, r.layout)))
	}))
	add("solveRelease", guard(func(args []js.Value) string {
		r, err := solves.get(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		r.run.Stop()
		solves.release(args[0].Int())
		return `{"released":true}`
	}))
	exited := false
	add("exit", js.FuncOf(func(js.Value, []js.Value) any {
		if !exited {
			exited = true
			exit()
		}
		return nil
	}))
	global.Set("zport", obj)
	return func() {
		global.Delete("zport")
		for _, f := range funcs {
			f.Release()
		}
	}
}

// guard wraps fn as a js.Func whose panics come back as an error object.
func guard(fn func(args []js.Value) string) js.Func {
	return js.FuncOf(func(_ js.Value, args []js.Value) (result any) {
		defer func() {
			if r := recover(); r != nil {
				result = errorJSON(fmt.Sprintf("internal error: %v", r))
			}
		}()
		return fn(args)
	})
}

// toleranceRun is a tolerance study run in slices from the page, and how
// its panel is laid out.
type toleranceRun struct {
	run    *api.ToleranceRun
	layout calc.Layout
}

// solveRun is a solve run in slices from the page, and how its panel is
// laid out.
type solveRun struct {
	run    *api.SolveRun
	layout calc.Layout
}

// runList holds the page's runs of one kind by id. A page releases a run
// when it is done or cancelled; past maxRuns the oldest is dropped (and
// given to drop, when set), so a page that forgets cannot make the module
// grow without end.
type runList[R any] struct {
	what string
	next int
	byID map[int]R
	drop func(R)
}

const maxRuns = 8

func (rs *runList[R]) add(r R) int {
	rs.next++
	rs.byID[rs.next] = r
	for id := range rs.byID {
		if len(rs.byID) <= maxRuns {
			break
		}
		if id <= rs.next-maxRuns {
			if rs.drop != nil {
				rs.drop(rs.byID[id])
			}
			delete(rs.byID, id)
		}
	}
	return rs.next
}

func (rs *runList[R]) get(args []js.Value) (R, error) {
	var zero R
	if len(args) != 1 || args[0].Type() != js.TypeNumber {
		return zero, fmt.Errorf("expected one argument, a %s id", rs.what)
	}
	r, ok := rs.byID[args[0].Int()]
	if !ok {
		return zero, fmt.Errorf("no %s %d (a run is gone once released or cancelled)", rs.what, args[0].Int())
	}
	return r, nil
}

func (rs *runList[R]) release(id int) { delete(rs.byID, id) }

func oneString(args []js.Value) (string, error) {
	if len(args) != 1 || args[0].Type() != js.TypeString {
		return "", fmt.Errorf("expected one argument, a string of JSON")
	}
	return args[0].String(), nil
}

// errorJSON is the contract's error object with a message only.
func errorJSON(msg string) string {
	b, _ := json.Marshal(api.ErrorResponse{Error: api.ErrorBody{Message: msg}})
	return string(b)
}
