package decode

import (
	"errors"
	"fmt"
	"image/jpeg"
	"image/png"
	"io"
	"strings"

	"golang.org/x/image/tiff"
)

// FormatError reports input that is not an image of a supported format, or
// is corrupt or truncated. Err, if not nil, is the underlying decoder's
// error. The message is one line starting "decode: ".
type FormatError struct {
	Msg string
	Err error
}

func (e *FormatError) Error() string { return message(e.Msg, e.Err) }

// Unwrap returns the underlying decoder error.
func (e *FormatError) Unwrap() error { return e.Err }

// UnsupportedError reports a valid image that uses a format or feature
// this package does not decode. The message is one line starting
// "decode: ".
type UnsupportedError struct {
	Msg string
	Err error
}

func (e *UnsupportedError) Error() string { return message(e.Msg, e.Err) }

// Unwrap returns the underlying decoder error.
func (e *UnsupportedError) Unwrap() error { return e.Err }

// TooLargeError reports an image whose header declares more pixels than
// Options.MaxPixels; no pixel memory was allocated.
type TooLargeError struct {
	Width, Height int // px, from the header
	MaxPixels     int
}

func (e *TooLargeError) Error() string {
	return fmt.Sprintf("decode: image is %d x %d px (%.1f MP), above the limit of %.1f MP",
		e.Width, e.Height, float64(e.Width)*float64(e.Height)/1e6, float64(e.MaxPixels)/1e6)
}

func formatErr(msg string, err error) error      { return &FormatError{Msg: msg, Err: err} }
func unsupportedErr(msg string, err error) error { return &UnsupportedError{Msg: msg, Err: err} }

func message(msg string, err error) string {
	s := "decode: " + msg
	if err != nil && err != io.EOF && err != io.ErrUnexpectedEOF { // "truncated" says it already
		s += " (" + err.Error() + ")"
	}
	return strings.Join(strings.Fields(s), " ") // one line
}

// wrapDecoderErr turns an error of image/png, image/jpeg or x/image/tiff
// into a FormatError or UnsupportedError naming the format.
func wrapDecoderErr(format string, err error) error {
	name := strings.ToUpper(format)
	var (
		pu png.UnsupportedError
		ju jpeg.UnsupportedError
		tu tiff.UnsupportedError
	)
	switch {
	case errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, io.EOF):
		return formatErr("truncated "+name, err)
	case errors.As(err, &pu), errors.As(err, &ju), errors.As(err, &tu):
		return unsupportedErr("this "+name+" variant is not supported", err)
	case strings.Contains(err.Error(), "not enough pixel data"):
		return formatErr("truncated "+name, err)
	}
	return formatErr("corrupt "+name, err)
}

// guard runs a standard decoder and turns a panic into a FormatError: the
// decoders are meant never to panic, and a bug there must not take down a
// browser worker.
func guard(format string, f func() error) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = formatErr(fmt.Sprintf("corrupt %s (decoder failed: %v)", strings.ToUpper(format), r), nil)
		}
	}()
	if err := f(); err != nil {
		return wrapDecoderErr(format, err)
	}
	return nil
}

// UserMessage is the error as one plain clause for a person, without the
// package prefix or the standard decoder's wording.
func (e *FormatError) UserMessage() string {
	return "the file cannot be read as a photo (" + e.Msg + ")"
}

// UserMessage is the error as one plain clause for a person, without the
// package prefix.
func (e *UnsupportedError) UserMessage() string { return e.Msg }

// UserMessage is the error as one plain clause for a person, without the
// package prefix.
func (e *TooLargeError) UserMessage() string {
	return fmt.Sprintf("the photo is %d x %d px (%.1f MP), more than the %.0f MP this tool measures",
		e.Width, e.Height, float64(e.Width)*float64(e.Height)/1e6, float64(e.MaxPixels)/1e6)
}
