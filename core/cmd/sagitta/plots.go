package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"sagitta/core/analyze"
	"sagitta/core/plot"
)

// plotScale is the PNG scale of written plots: two pixels per layout px,
// sharp on high-density screens and in print.
const plotScale = 2

// writePlots writes the SVG and PNG of each plot of each photo into dir,
// creating it if needed: <name>-field-curves, <name>-mtf50-map,
// <name>-astigmatism, <name>-target-centre and <name>-target-corner (the
// measured targets nearest to and farthest from the optical centre),
// <name>-colour-fringes for a colour photo, <name>-distortion and
// <name>-light-fall-off where they were measured, and, for two or more
// photos, field-curves-compared (and colour-fringes-compared,
// distortion-compared, light-fall-off-compared when two photos have them).
func writePlots(dir string, res analyze.Result) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("cannot create the plot folder: %v", unwrapPath(err))
	}
	used := map[string]bool{}
	var photos []plot.Photo
	var fringes []plot.CAPhoto
	var geo []plot.GeometryPhoto
	for _, img := range res.Images {
		if img.Summary == nil {
			continue
		}
		name := plotName(img.File, used)
		sum := img.Summary.Field()
		photos = append(photos, plot.Photo{Label: img.File, Summary: sum})
		figs := []namedFigure{
			{"field-curves", plot.FieldCurves(sum, plot.FieldOptions{Label: img.File, Band: true})},
			{"mtf50-map", plot.Map(sum, plot.MapOptions{Label: img.File})},
			{"astigmatism", plot.Astigmatism(sum, plot.FieldOptions{Label: img.File, Band: true})},
		}
		// Measurements come sorted by image height: the first is the
		// centre-most, the last the corner-most.
		if n := len(img.Measurements); n > 0 {
			figs = append(figs, namedFigure{"target-centre", plot.Target(plot.TargetFromMeasurement(img.Measurements[0], img), plot.TargetOptions{})})
			if n > 1 {
				figs = append(figs, namedFigure{"target-corner", plot.Target(plot.TargetFromMeasurement(img.Measurements[n-1], img), plot.TargetOptions{})})
			}
		}
		if ca := img.LateralCA; ca != nil {
			figs = append(figs, namedFigure{"colour-fringes", plot.LateralCA(ca, img.CornerMM, plot.FieldOptions{Label: img.File, Band: true})})
			fringes = append(fringes, plot.CAPhoto{Label: img.File, LateralCA: ca, CornerMM: img.CornerMM})
		}
		figs = append(figs, geometryFigures(img)...)
		if g, ok := geometryPhoto(img); ok {
			geo = append(geo, g)
		}
		if img.ToneFit != nil {
			figs = append(figs, namedFigure{"tone", plot.ToneCurve(img.ToneFit, img.File)})
		}
		for _, fg := range figs {
			if err := writeFigure(dir, name+"-"+fg.suffix, fg.f); err != nil {
				return err
			}
		}
	}
	if len(fringes) > 1 {
		if err := writeFigure(dir, plotName("colour-fringes-compared", used), plot.CompareCA(fringes, plot.CompareOptions{Band: true})); err != nil {
			return err
		}
	}
	if len(geo) > 1 {
		if err := writeFigure(dir, plotName("distortion-compared", used), plot.CompareDistortion(geo)); err != nil {
			return err
		}
		if err := writeFigure(dir, plotName("light-fall-off-compared", used), plot.CompareFalloff(geo)); err != nil {
			return err
		}
	}
	if len(photos) > 1 {
		return writeFigure(dir, plotName("field-curves-compared", used), plot.Compare(photos, plot.CompareOptions{}))
	}
	return nil
}

// namedFigure is a plot and the suffix of its file names.
type namedFigure struct {
	suffix string
	f      *plot.Figure
}

// writeFigure writes base.svg and base.png in dir.
func writeFigure(dir, base string, f *plot.Figure) error {
	png, err := f.PNG(plotScale)
	if err != nil {
		return fmt.Errorf("cannot draw %s: %v", base, err)
	}
	for ext, data := range map[string][]byte{".svg": f.SVG(), ".png": png} {
		if err := os.WriteFile(filepath.Join(dir, base+ext), data, 0o644); err != nil {
			return fmt.Errorf("cannot write %s: %v", base+ext, unwrapPath(err))
		}
	}
	return nil
}

// plotName turns a photo's file name into a plain, unique base name: the
// name without its extension, with characters other than letters, digits,
// '-', '_' and '.' replaced by '_', and a number added if it is taken.
func plotName(file string, used map[string]bool) string {
	base := strings.TrimSuffix(file, filepath.Ext(file))
	b := []byte(base)
	for i, c := range b {
		if !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-' || c == '_' || c == '.') {
			b[i] = '_'
		}
	}
	name := string(b)
	if name == "" {
		name = "photo"
	}
	for i := 2; used[name]; i++ {
		name = fmt.Sprintf("%s-%d", string(b), i)
	}
	used[name] = true
	return name
}
