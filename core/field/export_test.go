package field

// SynthPoints lends the synthetic points of the package's tests to its
// external tests.
var SynthPoints = synthPoints
