package analyze

import (
	"errors"
	"fmt"
	"strings"

	"sagitta/core/decode"
)

// MinSidePx is the smallest width and height Run measures: the edge search
// keeps no edge shorter than 28 px (edgefind's default), and an edge needs a
// few pixels of margin around it.
const MinSidePx = 32

// MaxPitchUM is the largest pixel pitch, um, that field geometry accepts
// (core/field Geometry.Validate); a sensor format spread over a small or
// reduced photo can exceed it.
const MaxPitchUM = 100

// TooSmallError reports a photo narrower or lower than MinSidePx; it is
// returned before the pixel pitch or anything else is worked out.
type TooSmallError struct {
	Width, Height int // px
}

func (e *TooSmallError) Error() string { return "analyze: " + e.UserMessage() }

// UserMessage is the error as one plain clause for a person.
func (e *TooSmallError) UserMessage() string {
	return fmt.Sprintf("the photo is %d x %d px, too small to measure (each side needs at least %d px)", e.Width, e.Height, MinSidePx)
}

// prefixes are the package prefixes of the core's error messages ("decode: ",
// "field: " ...), which name where an error arose, for developers.
var prefixes = []string{"analyze", "decode", "exif", "field", "edge", "edgefind", "sine", "chart", "curve", "plane", "settings", "result"}

// UserMessage gives err as one plain line for a person: an error's own
// UserMessage when it has one (decode's errors, TooSmallError), otherwise its
// message without the package prefixes. The command-line tool prints
// err.Error() (with prefixes, for a bug report); the page shows this.
func UserMessage(err error) string {
	if err == nil {
		return ""
	}
	var u interface{ UserMessage() string }
	if errors.As(err, &u) {
		return oneLine(u.UserMessage())
	}
	s := oneLine(err.Error())
	for {
		cut := false
		for _, p := range prefixes {
			if rest, ok := strings.CutPrefix(s, p+": "); ok {
				s, cut = rest, true
			}
		}
		if !cut {
			return s
		}
	}
}

// FileFault reports whether err comes from the file itself (not an image,
// damaged, of an unsupported kind, too small or too large), so that measuring
// it again, with any settings, cannot succeed.
func FileFault(err error) bool {
	var (
		f  *decode.FormatError
		u  *decode.UnsupportedError
		tl *decode.TooLargeError
		ts *TooSmallError
	)
	return errors.As(err, &f) || errors.As(err, &u) || errors.As(err, &tl) || errors.As(err, &ts)
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }
