// Package raw reads DNG raw files (Adobe, Digital Negative Specification,
// version 1.4.0.0 and later, https://helpx.adobe.com/camera-raw/digital-negative.html;
// built on TIFF Revision 6.0, Adobe 1992) into linear planes for measuring,
// without demosaicing.
//
// What is read: little- and big-endian files; the raw IFD chosen among IFD0,
// its chain and the SubIFDs by NewSubFileType 0 (the main image); strips or
// tiles; uncompressed integer samples of 8 to 16 bits (packed big-endian
// bit order when not 8 or 16 bits, as DNG 1.4 chapter 5 asks) and lossless
// JPEG (compression 7; the lossless process of ITU-T T.81 | ISO/IEC 10918-1,
// annex H, predictors 1 to 7, any number of interleaved components, restart
// intervals); the colour filter array (CFARepeatPatternDim, CFAPattern),
// LinearizationTable, BlackLevel with BlackLevelRepeatDim and the row and
// column deltas, WhiteLevel, ActiveArea, DefaultCropOrigin/Size,
// AsShotNeutral, UniqueCameraModel, and the Exif tags through core/exif.
// Linear DNGs (PhotometricInterpretation LinearRaw) are read as RGB planes.
//
// Refused with one sentence: lossy DNG (compression 34892), JPEG XL
// (compression 52546), deflate (compression 8), floating-point samples,
// more than 16 bits, and anything above the pixel limit, which is checked
// from the header before any pixel memory is allocated.
//
// Values: raw code values pass through the LinearizationTable, then
// v = (code - black(x, y)) / (white - black(x, y)), so black reads 0 and the
// white level exactly 1 (the scaling of DNG 1.4 chapter 5, "Mapping raw
// values to linear reference values", up to the colour steps we leave out).
// Values below black stay negative (noise is kept unclipped).
//
// Tag numbers are those of DNG 1.4 chapter 4 and TIFF 6.0; the DNG ones
// were written down from memory and are confirmed by the test that reads
// our DNGs back with libraw (see dng_libraw_test.go).
package raw
