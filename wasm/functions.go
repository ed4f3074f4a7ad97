//go:build js && wasm

package main

import "syscall/js"

// function is one of the core's functions the page can reach.
type function struct {
	// Global is its name on the worker's global object.
	Global string
	// Call is the name a "call" message gives it (site/protocol.js CALLS and
	// the adapters in site/worker.js); "" for the functions the worker calls
	// itself (sagittaPreview and the stages of stages.go, for
	// the messages of a photo).
	Call string
	// Fn does the work.
	Fn func(args []js.Value) (any, error)
}

// functions is the one list of the measuring engine's functions: main
// registers each, and exports the call names as sagittaFunctions
// ({call: global}); TestFunctionsMatchPage checks site/protocol.js and
// site/worker.js against it and against the demo photo's own build
// (wasm/demo, which adds the call "demo").
var functions = []function{
	{"sagittaPreview", "", previewJS},
	{"sagittaDecodable", "", decodableJS},
	{"sagittaFind", "", findJS},
	{"sagittaPrepare", "", prepareJS},
	{"sagittaUse", "", useJS},
	{"sagittaMeasure", "", measureJS},
	{"sagittaFinish", "", finishJS},
	{"sagittaRelease", "", releaseJS},
	{"sagittaResummarise", "resummarise", resummariseJS},
	{"sagittaCSV", "csv", csvJS},
	{"sagittaJSON", "json", jsonJS},
	{"sagittaPlot", "plot", plotJS},
	{"sagittaPalette", "palette", paletteJS},
	{"sagittaChart", "chart", chartJS},
	{"sagittaPlan", "plan", planJS},
	{"sagittaReference", "reference", referenceJS},
	{"sagittaSeries", "series", seriesJS},
	{"sagittaDecoders", "decoders", decodersJS},
}

// registerAll registers every function of the list and sagittaFunctions.
func registerAll() {
	calls := map[string]any{}
	for _, f := range functions {
		register(f.Global, f.Fn)
		if f.Call != "" {
			calls[f.Call] = f.Global
		}
	}
	js.Global().Set("sagittaFunctions", js.ValueOf(calls))
}
