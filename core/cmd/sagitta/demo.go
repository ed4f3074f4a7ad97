package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"sagitta/core/sim/demo"
)

// cmdDemo writes the built-in demo photo: a simulated lens and camera of our
// own invention photographing a sheet of tilted squares.
func cmdDemo(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("demo", flag.ContinueOnError)
	fs.SetOutput(stdout)
	out := fs.String("o", "demo.jpg", "output file: JPEG, or the camera's raw DNG when it ends in .dng")
	reduce := fs.Int("reduce", 1, "shrink the sensor by this factor (same field of view; 1 = 24 MP)")
	fs.Usage = func() {
		fmt.Fprintln(stdout, "usage: sagitta demo [-o FILE] [--reduce N]")
		printOptions(fs, stdout)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *reduce < 1 || *reduce > 20 {
		return fmt.Errorf("%w: -reduce must be between 1 and 20", errUsage)
	}
	sc := demo.PortraitSmall(*reduce)
	photo := sc.Photo
	if strings.EqualFold(filepath.Ext(*out), ".dng") {
		photo = sc.RawPhoto
	}
	data, err := photo()
	if err != nil {
		return err
	}
	if err := os.WriteFile(*out, data, 0o644); err != nil {
		return fmt.Errorf("cannot write %s: %v", *out, unwrapPath(err))
	}
	fmt.Fprintf(stdout, "wrote %s (%d bytes)\n", *out, len(data))
	return nil
}
