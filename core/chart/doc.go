// Package chart is Sagitta's printable test chart: one layout, drawn
// through core/draw's Canvas by three writers (PDF, SVG, PNG) at the exact
// physical size of the user's sheet and printer, and recognised again in
// photographs of it.
//
// # The layout
//
// A Design is the chart in chart units, where the chart's short side is 1
// and the origin its centre (x right, y down, angles from +x towards +y). Its
// frame, the area the camera's frame should cover, has the camera's aspect
// ratio (3:2, 4:3, 16:9 or 1:1, landscape or portrait) and is cut into a grid
// of cells, 7 along the short side and an odd number (11, 9, 13 or 7) along
// the long side, so that there is a centre cell:
//
//   - dark squares, one per cell, from next to the centre to the corners
//     (69 on a 3:2 chart), each turned so that its edges run along and
//     across the radius from the chart's centre (within 5 degrees) while
//     their slant from the pixel axes of a camera square to the chart is at
//     least 5 degrees (about 5 degrees is the usual choice near the axes;
//     common practice) and at least 1.5 degrees from every angle whose
//     tangent is p/q with q <= 5, the slanted-edge method's critical angles
//     (ISO 12233:2017, edge-based SFR annex). Away from the axes the slant
//     follows the radius, so the sagittal and tangential edges stay
//     classifiable; design.go lists the rule;
//   - sinusoidal Siemens stars of 72 cycles (the sine-star method of ISO
//     12233:2014 and later; that standard's star has more cycles, from
//     memory, 144, but 72 keeps the centre printable on a home printer) in
//     the centre cell and in four cells at about half the field towards
//     the corners;
//   - sine gratings in the cells above (modulated along y) and below
//     (along x) the centre, 2 x 2 separate patches each: a low-frequency
//     reference at 96 cycles per chart short side and 240, 360 and 720,
//     which on a 24 mm tall sensor filled by the chart are 4, 10, 15 and 30
//     lp/mm;
//   - a step wedge in the cell left of the centre (the part of the frame
//     least shaded by the lens's fall-off after the centre, which holds a
//     star): 4 x 3 touching grey patches, as wide as a grating block (0.72
//     of the cell), of reflectance 0.90 down to 0.06 of the paper in 12
//     steps evenly spaced in log (Design.Wedge; the darkest stays above
//     the few per cent black ink reflects on matte paper, from memory). The
//     analysis reads the middle of each patch and the paper above and below
//     the block through the recognised pose and fits the photo's tone curve
//     from them before measuring anything (core/analyze, tone.go); edges
//     found on it are not records. That cell holds no square, so a 3:2 chart
//     has 69; the block keeps 0.049 chart units from every square and
//     0.0364 from every sine pattern and mark (wedge_test.go). Older prints
//     without it are recognised as before and the tone curve is assumed;
//   - eight recognition marks on grid corners (mark.go): a dark disc inside
//     a ring of 16 sectors that spells a word of a 64-word ring code, giving
//     the chart's design (aspect and orientation) and the mark's index, and
//     correcting one misread sector;
//   - every square clear of every other by at least 0.021 chart units (42 px
//     when the chart's short side spans 2000 px), room for core/edgefind's
//     regions of up to 32 px on each side of an edge plus its margins, and
//     of every sine pattern by at least 0.0364 (40 px at 1100 px), room for
//     those regions plus the 8 px the analyser keeps between edge regions
//     and sine patterns.
//
// A Layout places the Design on a sheet (layout.go): the frame as large as
// the margins allow, small corner marks just outside it to frame the photo
// by, and below it a strip, outside the frame, with a 100 mm ruler, a 4 inch
// ruler and a text block (sheet, printer resolution, chart size, contrast
// and the chart code such as "S1-3:2-L"). A scale correction (the length the
// user measured for the 100 mm ruler) scales the whole drawing in the file
// about the sheet's centre by 100 / measured, shrinking the chart first when
// it enlarges the drawing so that it still fits the margins.
//
// # Across sheets
//
// Options.Sheets "2x2" or "3x3" draws a larger chart across that many sheets
// of the paper (Code.Sheets, chart code "S1-3:2-L-2x2"): the design cut
// along grid lines into pieces, each printed on its own sheet with four
// marks of its own, its number and cutting and overlap guides (tiling.go,
// sheets.go). Recognition finds one homography per sheet and the camera's
// view of the assembled chart apart from the sheets' misalignment, ties
// every target to its sheet, and measures the joins (photo_tiles.go).
//
// # The files
//
// Render writes PDF (page box the sheet in points, ISO 32000-1; the squares,
// marks and rulers as vector paths; Helvetica text), SVG (sizes and viewBox
// in millimetres, SVG 1.1) or PNG (8-bit grey at the printer's resolution,
// round(side / 25.4 x dpi) pixels, and a pHYs chunk of round(dpi / 0.0254)
// pixels per metre, ISO/IEC 15948). The sine stars and gratings are images
// at the printer's resolution on the page's own dot grid in every format
// (pattern.go); a star fades to grey where a cycle spans fewer than
// PrintLimitDots dots, so the analysis cuts star records there (the
// print's dots per photo pixel from the pose and the print's resolution
// and size). The grey steps are vector rectangles. Greys are linear reflectances written as sRGB codes
// (paint.go, which also explains why the print's unknown tone curve does not
// matter to the analysis).
//
// # Recognition
//
// The files of this job are named photo_*.go; the others draw the chart.
// Recognise (photo_recognise.go, photo_marks.go) finds the marks' discs in
// a photo, reads their rings, and fits the chart's pose, a homography from
// chart units to image pixels (photo_homography.go; Hartley and Zisserman's normalised
// direct linear transformation), to the designed and found centres. The
// pose tags every measurement with the target under it (Locate) and checks
// the set-up (Check): how much of the frame the chart fills, whether part of
// it is cut off, its rotation, the keystone of a camera not square to it,
// and how far its centre lies from the frame's. On simulated photos
// (core/sim/chartsim) the pose puts the squares' corners within 0.03 px
// of the truth.
//
// # For the web page
//
// Options is a plain struct with JSON names and Render(Options, format)
// returns the file's bytes, so the WebAssembly glue only converts values
// (the planner, core/plan, works the same way). Errors are OptionError or FormatError, in plain
// words, with the "chart: " prefix.
package chart
