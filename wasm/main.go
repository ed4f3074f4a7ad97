//go:build js && wasm

// Command wasm is the WebAssembly entry point of Sagitta's core: thin
// syscall/js glue that converts between JavaScript values and Go types and
// calls core. It runs inside a Web Worker (see site/worker.js and the
// message protocol in site/protocol.js); the photo never leaves the browser.
//
// It registers, on the worker's global object:
//
//	sagittaFind, sagittaPrepare, sagittaUse, sagittaMeasure, sagittaFinish,
//	sagittaRelease, sagittaDecodable
//	    the analysis of one photo in stages, over one or several workers
//	    (stages.go): the JSON of analyze.Image (core/analyze) at the end;
//	    settings are the JSON of analyze.Settings (with "fallback_sensor_mm",
//	    the sensor size to assume when the file's Exif gives no pixel pitch)
//	sagittaResummarise(image string (JSON), settings string (JSON))
//	    -> {image: string (JSON)} or {remeasure: string, remeasure_codes: [string]}
//	    one photo's analysis (as sagittaFinish gave it) with a new pixel
//	    pitch, optical centre or field frequencies, without the photo
//	    (analyze.Resummarise); remeasure, one plain line, when the settings
//	    change what was measured and the photo must be analysed again, with
//	    the code of each cause (analyze.MeasureAgainError, core/note)
//	sagittaPreview(bytes Uint8Array, maxSide number, tone string)
//	    -> {width, height, factor, pixels Uint8Array}
//	    an 8-bit grey display image of the decoded photo, reduced by an
//	    integer factor (core/preview), for formats a browser cannot show
//	sagittaCSV(results string (JSON {"images":[...]})) -> string
//	    the CSV of `sagitta analyze --csv` (analyze.WriteCSV)
//	sagittaJSON(results string (JSON {"images":[...]})) -> string
//	    the same document as `sagitta analyze --json` prints it
//	sagittaPlot(kind, data, options) -> {svg | png, table}, sagittaPalette()
//	    core/plot's figures and colours (plot.go)
//	sagittaChart(options, format) -> Uint8Array, sagittaPlan(options) -> string
//	    the printable chart and the shooting planner (chart.go)
//
//	sagittaReference(args string (JSON)) -> string (JSON)
//	    the reference curve of a measured MTF, a perfect lens (optics.go)
//	sagittaFunctions: {call name: global name}
//	    the functions a "call" message can reach (functions.go, the one list)
//
// Every function throws an Error whose message is one plain line on
// failure; a Go panic is recovered and thrown the same way.
package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"syscall/js"

	"sagitta/core/analyze"
	"sagitta/core/decode"
	"sagitta/core/preview"
)

func main() {
	registerAll() // the list in functions.go
	js.Global().Set("sagittaReady", true)
	select {}
}

// register exposes f under name; a panic in f becomes a thrown Error
// instead of ending the Go program.
func register(name string, f func(args []js.Value) (any, error)) {
	js.Global().Set(name, js.FuncOf(func(_ js.Value, args []js.Value) (out any) {
		defer func() {
			if r := recover(); r != nil {
				out = jsError(fmt.Sprintf("internal error in %s: %v", name, r))
			}
		}()
		v, err := f(args)
		if err != nil {
			return userError(err)
		}
		return v
	}))
}

// resummariseJS applies new settings to one photo's analysis.
func resummariseJS(args []js.Value) (any, error) {
	if len(args) < 2 || args[0].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaResummarise(image, settings): wrong arguments")
	}
	var img analyze.Image
	if err := json.Unmarshal([]byte(args[0].String()), &img); err != nil {
		return nil, fmt.Errorf("result: %v", err)
	}
	s, err := settings(args[1])
	if err != nil {
		return nil, err
	}
	out, err := analyze.Resummarise(&img, s)
	var again *analyze.MeasureAgainError
	if errors.As(err, &again) {
		codes := make([]any, len(again.Codes))
		for i, c := range again.Codes {
			codes[i] = c
		}
		return js.ValueOf(map[string]any{"remeasure": again.Error(), "remeasure_codes": codes}), nil
	}
	if err != nil {
		return nil, err
	}
	b, err := json.Marshal(out)
	if err != nil {
		return nil, err
	}
	return js.ValueOf(map[string]any{"image": string(b)}), nil
}

// settings reads analysis settings from their JSON ("" for the defaults).
func settings(v js.Value) (analyze.Settings, error) {
	var s analyze.Settings
	if v.Type() != js.TypeString {
		return s, fmt.Errorf("settings: expected a JSON string")
	}
	if txt := v.String(); txt != "" {
		if err := json.Unmarshal([]byte(txt), &s); err != nil {
			return s, fmt.Errorf("settings: %v", err)
		}
	}
	return s, nil
}

// previewJS decodes a photo and returns its reduced grey preview.
func previewJS(args []js.Value) (any, error) {
	if len(args) < 2 || args[0].Type() != js.TypeObject {
		return nil, fmt.Errorf("sagittaPreview(bytes, maxSide, tone): wrong arguments")
	}
	maxSide := args[1].Int()
	if maxSide < 16 {
		return nil, fmt.Errorf("preview: largest side %d px is too small", maxSide)
	}
	var opt decode.Options
	if len(args) > 2 && args[2].Type() == js.TypeString {
		t, err := decode.ParseTone(args[2].String())
		if err != nil {
			return nil, err
		}
		opt.Tone = t
	}
	dec, err := decode.Decode(goBytes(args[0]), opt)
	if err != nil {
		return nil, err
	}
	img, k := preview.Gray(dec.Lum, maxSide)
	b := img.Bounds()
	pix := js.Global().Get("Uint8Array").New(len(img.Pix))
	js.CopyBytesToJS(pix, img.Pix)
	return js.ValueOf(map[string]any{
		"width": b.Dx(), "height": b.Dy(), "factor": k, "pixels": pix,
	}), nil
}

// csvJS writes the CSV of a results document.
func csvJS(args []js.Value) (any, error) {
	res, err := results(args)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if err := analyze.WriteCSV(&buf, res); err != nil {
		return nil, err
	}
	return buf.String(), nil
}

// jsonJS rewrites a results document exactly as the command-line tool
// prints it (analyze.WriteJSON).
func jsonJS(args []js.Value) (any, error) {
	res, err := results(args)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	err = analyze.WriteJSON(&buf, res)
	return buf.String(), err
}

// results reads the results document passed as the first argument.
func results(args []js.Value) (analyze.Result, error) {
	var res analyze.Result
	if len(args) < 1 || args[0].Type() != js.TypeString {
		return res, fmt.Errorf("expected the results as a JSON string")
	}
	if err := json.Unmarshal([]byte(args[0].String()), &res); err != nil {
		return res, fmt.Errorf("results: %v", err)
	}
	return res, nil
}

// goBytes copies a Uint8Array into Go memory.
func goBytes(v js.Value) []byte {
	data := make([]byte, v.Get("length").Int())
	js.CopyBytesToGo(data, v)
	return data
}

// userError returns a JavaScript Error for err: its message is the core's
// plain line for a person (analyze.UserMessage, no package prefixes), and
// its fileFault property says whether the file itself is at fault
// (analyze.FileFault), so that the page offers no "Measure again".
func userError(err error) js.Value {
	e := jsError(analyze.UserMessage(err))
	e.Set("fileFault", analyze.FileFault(err))
	return e
}

// jsError returns a JavaScript Error for the caller to throw; the worker
// checks for it and turns it into an error message.
func jsError(msg string) js.Value {
	return js.Global().Get("Error").New(msg)
}
