package sine

import "errors"

// ArgumentError reports a guess or an option that cannot be measured with:
// a place outside the image, a radius too small, a segment count that is
// not a multiple of 4. The message starts "sine: ".
type ArgumentError string

func (e ArgumentError) Error() string { return "sine: " + string(e) }

// Errors that depend on the photo.
var (
	// ErrNoStar: no sinusoidal star at the guessed place.
	ErrNoStar = errors.New("sine: no sinusoidal star at this place")
	// ErrStarTooSmall: the star is too small for its number of cycles (its
	// usable rings would not reach inside its largest one).
	ErrStarTooSmall = errors.New("sine: the star is too small for its number of cycles")
	// ErrNoGrating: the area holds no clean sine grating.
	ErrNoGrating = errors.New("sine: no sine grating in this area")
)
