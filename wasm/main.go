//go:build js && wasm

// Command wasm is the WebAssembly entry point of Sagitta's core: thin
// syscall/js glue that hands a photo's bytes to core/analyze and the JSON
// result back. It runs inside a Web Worker (see site/protocol.js); the
// photo never leaves the browser.
//
// It registers, on the worker's global object:
//
//	sagittaAnalyze(name string, bytes Uint8Array, settings string (JSON),
//	               onProgress(stage string, fraction number)) -> string (JSON)
//
// which returns the analysis of one photo as the JSON of analyze.Image, or
// throws an Error whose message is one plain line.
package main

import (
	"context"
	"encoding/json"
	"fmt"
	"syscall/js"

	"sagitta/core/analyze"
)

func main() {
	js.Global().Set("sagittaAnalyze", js.FuncOf(analyzeJS))
	js.Global().Set("sagittaReady", true)
	select {}
}

// analyzeJS converts the JavaScript arguments, runs the pipeline and
// converts the result; any failure becomes a thrown Error.
func analyzeJS(_ js.Value, args []js.Value) (out any) {
	defer func() {
		if r := recover(); r != nil {
			out = throw(fmt.Sprintf("internal error: %v", r))
		}
	}()
	if len(args) < 3 || args[1].Type() != js.TypeObject {
		return throw("sagittaAnalyze(name, bytes, settings, onProgress): wrong arguments")
	}
	name := args[0].String()
	data := make([]byte, args[1].Get("length").Int())
	js.CopyBytesToGo(data, args[1])
	var s analyze.Settings
	if txt := args[2].String(); txt != "" {
		if err := json.Unmarshal([]byte(txt), &s); err != nil {
			return throw("settings: " + err.Error())
		}
	}
	s.Workers = 1
	var progress analyze.Progress
	if len(args) > 3 && args[3].Type() == js.TypeFunction {
		cb := args[3]
		progress = func(stage string, f float64) { cb.Invoke(stage, f) }
	}
	img, err := analyze.Run(context.Background(), name, data, s, progress)
	if err != nil {
		return throw(err.Error())
	}
	b, err := json.Marshal(img)
	if err != nil {
		return throw(err.Error())
	}
	return string(b)
}

// throw returns a JavaScript Error for the caller to throw; the worker glue
// checks for it and turns it into an error message.
func throw(msg string) js.Value {
	return js.Global().Get("Error").New(msg)
}
