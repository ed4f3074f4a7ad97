package raw

// TIFF 6.0 baseline and extension tags (section 8 and the tag list of
// appendix A).
const (
	tagNewSubFileType  = 254
	tagImageWidth      = 256
	tagImageLength     = 257
	tagBitsPerSample   = 258
	tagCompression     = 259
	tagPhotometric     = 262
	tagMake            = 271
	tagModel           = 272
	tagStripOffsets    = 273
	tagSamplesPerPixel = 277
	tagRowsPerStrip    = 278
	tagStripByteCounts = 279
	tagPlanarConfig    = 284
	tagTileWidth       = 322
	tagTileLength      = 323
	tagTileOffsets     = 324
	tagTileByteCounts  = 325
	tagSubIFDs         = 330 // TIFF Technical Notes (1995)
	tagSampleFormat    = 339
	tagExifIFD         = 34665 // CIPA DC-008
)

// TIFF/EP and DNG tags (DNG 1.4.0.0, chapter 4; numbers from memory,
// confirmed against libraw by the tests).
const (
	tagCFARepeatPatternDim = 33421
	tagCFAPattern          = 33422
	tagDNGVersion          = 50706
	tagUniqueCameraModel   = 50708
	tagCFAPlaneColor       = 50710
	tagCFALayout           = 50711
	tagLinearizationTable  = 50712
	tagBlackLevelRepeatDim = 50713
	tagBlackLevel          = 50714
	tagBlackLevelDeltaH    = 50715
	tagBlackLevelDeltaV    = 50716
	tagWhiteLevel          = 50717
	tagDefaultCropOrigin   = 50719
	tagDefaultCropSize     = 50720
	tagAsShotNeutral       = 50728
	tagActiveArea          = 50829
)

// Values of Compression, PhotometricInterpretation and SampleFormat.
const (
	compNone         = 1
	compLosslessJPEG = 7     // DNG: lossless JPEG (ITU-T T.81 annex H)
	compDeflate      = 8     // DNG 1.4: floating-point data
	compLossyDNG     = 34892 // DNG 1.4: lossy JPEG
	compJPEGXL       = 52546 // DNG 1.7: JPEG XL (from memory)

	photoCFA       = 32803 // TIFF/EP colour filter array
	photoLinearRaw = 34892 // DNG LinearRaw

	sampleFloat = 3
)

// CFA colour codes of CFAPattern (TIFF/EP): 0 red, 1 green, 2 blue.
const (
	Red   = 0
	Green = 1
	Blue  = 2
)
