package raw

import (
	"fmt"
	"strings"
)

// FormatError reports a file that is not a DNG, or a DNG that is corrupt or
// truncated. The message is one line starting "raw: ".
type FormatError string

func (e FormatError) Error() string { return "raw: " + oneLine(string(e)) }

// UnsupportedError reports a valid DNG that uses a variant this package does
// not read; the message names what is missing.
type UnsupportedError string

func (e UnsupportedError) Error() string { return "raw: " + oneLine(string(e)) }

// TooLargeError reports a DNG whose raw image declares more samples than the
// limit; nothing was allocated for its pixels.
type TooLargeError struct {
	Width, Height, Samples int // px and samples per pixel, from the header
	MaxPixels              int
}

func (e *TooLargeError) Error() string {
	return fmt.Sprintf("raw: DNG image is %d x %d px (%.1f MP), above the limit of %.1f MP",
		e.Width, e.Height, float64(e.Width)*float64(e.Height)/1e6, float64(e.MaxPixels)/1e6)
}

func formatf(f string, a ...any) error      { return FormatError(fmt.Sprintf(f, a...)) }
func unsupportedf(f string, a ...any) error { return UnsupportedError(fmt.Sprintf(f, a...)) }

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }
