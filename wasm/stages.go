//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"fmt"
	"image"
	"syscall/js"

	"sagitta/core/analyze"
	"sagitta/core/decode"
)

// One photo over several workers (analyze.Find, Prepare, Measure, Finish;
// the order of the messages is in site/protocol.js). A worker holds the
// photos it is finding or helping with, by the page's job id, until it
// finishes or releases them.
//
//	sagittaDecodable(bytes Uint8Array) -> bool
//	    whether the browser may decode the file for the core
//	    (decode.ForeignDecodable)
//	sagittaFind(id, name, bytes, pixels, width, height, settings, onProgress)
//	    -> {targets number, plan string (JSON), width, height, orientation}
//	    the find stage; pixels: null (the core decodes) or the browser's
//	    RGBA bytes (Uint8Array, width x height, not premultiplied)
//	sagittaPrepare(id, name, bytes, pixels, width, height, settings) -> true
//	    decodes the photo on a helping worker
//	sagittaUse(id, plan string) -> true
//	    gives a helping worker the finder's plan
//	sagittaMeasure(id, lo, hi) -> string (JSON [analyze.Part])
//	    measures the targets lo..hi-1 (edge candidates, then sine patterns)
//	sagittaFinish(id, parts string (JSON [analyze.Part])) -> string (JSON)
//	    merges the parts measured by other workers with those this worker
//	    measured itself (kept here: they do not travel through JSON twice)
//	    and summarises: the photo's analysis (analyze.Image); the photo is
//	    released
//	sagittaRelease(id)
//	    drops a photo the worker holds

var (
	found    = map[int]*analyze.Found{}
	measurer = map[int]*analyze.Measurer{}
	// kept holds the parts a finder measured itself, until it finishes.
	kept = map[int][]analyze.Part{}
)

// photoArgs reads (name, bytes, pixels, width, height, settings) at args[i:].
func photoArgs(args []js.Value, i int) (analyze.Photo, analyze.Settings, error) {
	if len(args) < i+6 || args[i+1].Type() != js.TypeObject {
		return analyze.Photo{}, analyze.Settings{}, fmt.Errorf("wrong arguments")
	}
	ph := analyze.Photo{Name: args[i].String(), Data: goBytes(args[i+1])}
	if px := args[i+2]; px.Type() == js.TypeObject {
		w, h := args[i+3].Int(), args[i+4].Int()
		if w <= 0 || h <= 0 || px.Get("length").Int() != 4*w*h {
			return ph, analyze.Settings{}, fmt.Errorf("pixels: %d bytes for %d x %d", px.Get("length").Int(), w, h)
		}
		// One copy into Go's memory; the image wraps it as it is.
		ph.Pixels = &image.NRGBA{Pix: goBytes(px), Stride: 4 * w, Rect: image.Rect(0, 0, w, h)}
	}
	s, err := settings(args[i+5])
	s.Workers = 1
	return ph, s, err
}

func decodableJS(args []js.Value) (any, error) {
	if len(args) < 1 || args[0].Type() != js.TypeObject {
		return nil, fmt.Errorf("sagittaDecodable(bytes): wrong arguments")
	}
	return decode.ForeignDecodable(goBytes(args[0])), nil
}

func findJS(args []js.Value) (any, error) {
	if len(args) < 7 {
		return nil, fmt.Errorf("sagittaFind(id, name, bytes, pixels, width, height, settings, onProgress): wrong arguments")
	}
	id := args[0].Int()
	ph, s, err := photoArgs(args, 1)
	if err != nil {
		return nil, err
	}
	var progress analyze.Progress
	if len(args) > 7 && args[7].Type() == js.TypeFunction {
		cb := args[7]
		progress = func(stage string, f float64) { cb.Invoke(stage, f) }
	}
	f, err := analyze.Find(context.Background(), ph, s, progress)
	if err != nil {
		return nil, err
	}
	plan, err := json.Marshal(f.Plan())
	if err != nil {
		return nil, err
	}
	found[id] = f
	w, h, o := f.Frame()
	return js.ValueOf(map[string]any{"targets": f.Targets(), "plan": string(plan), "width": w, "height": h, "orientation": o}), nil
}

func prepareJS(args []js.Value) (any, error) {
	if len(args) < 7 {
		return nil, fmt.Errorf("sagittaPrepare(id, name, bytes, pixels, width, height, settings): wrong arguments")
	}
	ph, s, err := photoArgs(args, 1)
	if err != nil {
		return nil, err
	}
	m, err := analyze.Prepare(ph, s)
	if err != nil {
		return nil, err
	}
	measurer[args[0].Int()] = m
	return true, nil
}

func useJS(args []js.Value) (any, error) {
	if len(args) < 2 || args[1].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaUse(id, plan): wrong arguments")
	}
	m := measurer[args[0].Int()]
	if m == nil {
		return nil, fmt.Errorf("no photo %d prepared", args[0].Int())
	}
	var plan analyze.Plan
	if err := json.Unmarshal([]byte(args[1].String()), &plan); err != nil {
		return nil, fmt.Errorf("plan: %v", err)
	}
	return true, m.Use(plan)
}

func measureJS(args []js.Value) (any, error) {
	if len(args) < 3 {
		return nil, fmt.Errorf("sagittaMeasure(id, lo, hi): wrong arguments")
	}
	id, lo, hi := args[0].Int(), args[1].Int(), args[2].Int()
	var m *analyze.Measurer
	f := found[id]
	if f != nil {
		m = &f.Measurer
	} else if m = measurer[id]; m == nil {
		return nil, fmt.Errorf("no photo %d to measure", id)
	}
	if lo < 0 || hi < lo || hi > m.Targets() {
		return nil, fmt.Errorf("targets %d..%d outside 0..%d", lo, hi, m.Targets())
	}
	parts, err := m.Measure(context.Background(), lo, hi, nil)
	if err != nil {
		return nil, err
	}
	if f != nil {
		kept[id] = append(kept[id], parts...)
	}
	b, err := json.Marshal(parts)
	return string(b), err
}

func finishJS(args []js.Value) (any, error) {
	if len(args) < 2 || args[1].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaFinish(id, parts): wrong arguments")
	}
	id := args[0].Int()
	f := found[id]
	if f == nil {
		return nil, fmt.Errorf("no photo %d found", id)
	}
	delete(found, id)
	parts := kept[id]
	delete(kept, id)
	var others []analyze.Part
	if err := json.Unmarshal([]byte(args[1].String()), &others); err != nil {
		return nil, fmt.Errorf("parts: %v", err)
	}
	parts = append(parts, others...)
	img, err := f.Finish(context.Background(), parts, nil)
	if err != nil {
		return nil, err
	}
	b, err := json.Marshal(img)
	return string(b), err
}

func releaseJS(args []js.Value) (any, error) {
	if len(args) < 1 {
		return nil, fmt.Errorf("sagittaRelease(id): wrong arguments")
	}
	delete(found, args[0].Int())
	delete(measurer, args[0].Int())
	delete(kept, args[0].Int())
	return true, nil
}

// decodersJS compares the core's decoding of a file with the browser's
// (decode.LumDiff): sagittaDecoders(bytes, pixels, width, height) ->
// {max_diff, mean_diff}, linear luminance, full scale 1.
func decodersJS(args []js.Value) (any, error) {
	ph, _, err := photoArgs(append(append([]js.Value{js.ValueOf("")}, args...), js.ValueOf("")), 0)
	if err != nil {
		return nil, fmt.Errorf("sagittaDecoders(bytes, pixels, width, height): %v", err)
	}
	if ph.Pixels == nil {
		return nil, fmt.Errorf("sagittaDecoders: no pixels given")
	}
	mx, mean, err := decode.LumDiff(ph.Data, ph.Pixels, decode.Options{})
	if err != nil {
		return nil, err
	}
	return js.ValueOf(map[string]any{"max_diff": mx, "mean_diff": mean}), nil
}
