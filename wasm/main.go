//go:build js && wasm

package main

import (
	"encoding/json"
	"fmt"
	"syscall/js"

	"zport/engine/api"
	"zport/site/render"
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
	add("analyze", guard(func(args []js.Value) string {
		in, err := oneString(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		out, _ := api.AnalyzeJSON([]byte(in))
		return string(out)
	}))
	add("catalog", guard(func(args []js.Value) string {
		if len(args) != 0 {
			return errorJSON("zport.catalog takes no arguments")
		}
		b, err := json.Marshal(api.Catalog())
		if err != nil {
			return errorJSON("internal error: " + err.Error())
		}
		return string(b)
	}))
	add("panel", guard(func(args []js.Value) string {
		in, err := oneString(args)
		if err != nil {
			return errorJSON(err.Error())
		}
		return string(render.ComputeJSON([]byte(in)))
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
