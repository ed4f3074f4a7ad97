//go:build js && wasm

package main

import (
	"encoding/json"
	"fmt"
	"syscall/js"

	"sagitta/core/chart"
	"sagitta/core/plan"
)

// chartJS draws the printable chart: sagittaChart(options JSON, format) -> Uint8Array.
func chartJS(args []js.Value) (any, error) {
	if len(args) < 2 || args[0].Type() != js.TypeString || args[1].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaChart(options, format): wrong arguments")
	}
	var opt chart.Options
	if err := json.Unmarshal([]byte(args[0].String()), &opt); err != nil {
		return nil, fmt.Errorf("chart options: %v", err)
	}
	data, err := chart.Render(opt, args[1].String())
	if err != nil {
		return nil, err
	}
	out := js.Global().Get("Uint8Array").New(len(data))
	js.CopyBytesToJS(out, data)
	return out, nil
}

// planJS runs the shooting planner: sagittaPlan(options JSON) -> plan JSON.
func planJS(args []js.Value) (any, error) {
	if len(args) < 1 || args[0].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaPlan(options): wrong arguments")
	}
	var opt plan.Options
	if err := json.Unmarshal([]byte(args[0].String()), &opt); err != nil {
		return nil, fmt.Errorf("plan options: %v", err)
	}
	p, err := plan.Compute(opt)
	if err != nil {
		return nil, err
	}
	b, err := json.Marshal(p)
	return string(b), err
}
