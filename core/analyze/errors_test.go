package analyze

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"testing"

	"sagitta/core/decode"
	"sagitta/core/sim/simcam"
)

// TestTooSmall: a photo under MinSidePx on a side is refused as too small,
// before the pixel pitch is worked out (a 1 x 1 photo on a 36 mm sensor
// would otherwise report a 36000 um pitch).
func TestTooSmall(t *testing.T) {
	for _, size := range [][2]int{{1, 1}, {MinSidePx - 1, 400}, {400, 2}} {
		cam := simcam.Camera{W: size[0], H: size[1], Encoding: simcam.SRGB8}
		data, err := cam.Encode(simcam.Scene{Background: 0.5})
		if err != nil {
			t.Fatal(err)
		}
		_, err = Run(context.Background(), "small.png", data, Settings{SensorMM: [2]float64{36, 24}}, nil)
		var ts *TooSmallError
		if !errors.As(err, &ts) || ts.Width != size[0] || ts.Height != size[1] {
			t.Fatalf("%v: got %v, want a TooSmallError", size, err)
		}
		want := fmt.Sprintf("the photo is %d x %d px, too small to measure", size[0], size[1])
		if msg := UserMessage(err); !strings.HasPrefix(msg, want) {
			t.Errorf("UserMessage %q, want it to start %q", msg, want)
		}
		if !strings.HasPrefix(err.Error(), "analyze: ") || !FileFault(err) {
			t.Errorf("Error %q (want the package prefix); FileFault %v", err, FileFault(err))
		}
	}
}

// TestUserMessage: the page's line has no package prefix, and says whether
// the file itself is at fault.
func TestUserMessage(t *testing.T) {
	_, notImage := decode.Decode([]byte("hello, this is text"), decode.Options{})
	_, empty := decode.Decode(nil, decode.Options{})
	cases := []struct {
		err   error
		want  string
		fault bool
	}{
		{notImage, "the file cannot be read as a photo (not a PNG, JPEG or TIFF image)", true},
		{empty, "the file cannot be read as a photo (empty input)", true},
		{&decode.TooLargeError{Width: 100000, Height: 100000, MaxPixels: 120_000_000}, "the photo is 100000 x 100000 px (10000.0 MP), more than the 120 MP this tool measures", true},
		{fmt.Errorf("analyze: %w: the photo shows nothing", ErrNoTargets), "no measurable edge found: the photo shows nothing", false},
		{errors.New("analyze: field: pixel pitch 200 um is outside (0, 100]"), "pixel pitch 200 um is outside (0, 100]", false},
		{errors.New("sine stars: fewer than\nthree rings"), "sine stars: fewer than three rings", false},
	}
	for _, c := range cases {
		if got := UserMessage(c.err); got != c.want {
			t.Errorf("UserMessage(%q) = %q, want %q", c.err, got, c.want)
		}
		if got := FileFault(c.err); got != c.fault {
			t.Errorf("FileFault(%q) = %v", c.err, got)
		}
	}
}

// TestPitchFromSensorTooLarge: a sensor format over a small photo is
// explained, not reported as a field geometry error.
func TestPitchFromSensorTooLarge(t *testing.T) {
	cam := simcam.Camera{W: 256, H: 256, Encoding: simcam.SRGB8}
	data, err := cam.Encode(simcam.Scene{Background: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	_, err = Run(context.Background(), "small.png", data, Settings{FallbackSensorMM: [2]float64{36, 24}}, nil)
	want := "the sensor format over this photo's 256 px width makes pixels of 141 um, more than 100 um: enter the pixel pitch"
	if err == nil || !strings.HasPrefix(UserMessage(err), want) || FileFault(err) {
		t.Fatalf("got %v, want %q (not a fault of the file)", err, want)
	}
}
