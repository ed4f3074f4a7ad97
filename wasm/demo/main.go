//go:build js && wasm

// Command demo is the WebAssembly of Sagitta's demo photo: the simulator
// (core/sim/demo), built apart from the measuring engine (wasm/) so that
// the engine does not carry it. The page loads it only when the user asks
// for the demo photo, runs it in a worker of its own (site/worker.js, the
// same script as the measuring workers) and ends that worker when the photo
// is made.
//
// It registers, on the worker's global object:
//
//	sagittaDemo(reduce number) -> Uint8Array
//	    the built-in demo photo, a JPEG, on a sensor reduced by the integer
//	    factor reduce (1 = 24 MP; as `sagitta demo -reduce`)
//	sagittaFunctions: {demo: "sagittaDemo"}
//	    its one call (the list below; wasm/functions_test.go checks the
//	    page's side against it and the engine's list)
//
// A failure throws an Error whose message is one plain line; a Go panic is
// recovered and thrown the same way.
package main

import (
	"fmt"
	"syscall/js"

	"sagitta/core/sim/demo"
)

// functions is this build's list, in the shape of wasm/functions.go's.
var functions = []struct {
	Global, Call string
	Fn           func(args []js.Value) (any, error)
}{
	{"sagittaDemo", "demo", demoJS},
}

func main() {
	calls := map[string]any{}
	for _, f := range functions {
		register(f.Global, f.Fn)
		calls[f.Call] = f.Global
	}
	js.Global().Set("sagittaFunctions", js.ValueOf(calls))
	js.Global().Set("sagittaReady", true)
	select {}
}

// register exposes f under name; a panic in f becomes a thrown Error.
func register(name string, f func(args []js.Value) (any, error)) {
	js.Global().Set(name, js.FuncOf(func(_ js.Value, args []js.Value) (out any) {
		defer func() {
			if r := recover(); r != nil {
				out = js.Global().Get("Error").New(fmt.Sprintf("internal error in %s: %v", name, r))
			}
		}()
		v, err := f(args)
		if err != nil {
			return js.Global().Get("Error").New(err.Error())
		}
		return v
	}))
}

// demoJS renders the demo photo.
func demoJS(args []js.Value) (any, error) {
	reduce := 1
	if len(args) > 0 && args[0].Type() == js.TypeNumber {
		reduce = args[0].Int()
	}
	if reduce < 1 || reduce > 20 {
		return nil, fmt.Errorf("demo: reduction %d is outside 1..20", reduce)
	}
	data, err := demo.PortraitSmall(reduce).Photo()
	if err != nil {
		return nil, err
	}
	out := js.Global().Get("Uint8Array").New(len(data))
	js.CopyBytesToJS(out, data)
	return out, nil
}
