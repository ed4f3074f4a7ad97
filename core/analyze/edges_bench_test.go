//go:build linux

package analyze

import (
	"context"
	"testing"

	sheet "sagitta/core/chart"
	"sagitta/core/decode"
	"sagitta/core/edgefind"
)

// BenchmarkEdgesOfChartPhoto times the measuring of every edge region of the
// 24 MP stage-table photo (benchChartPhoto; 553 regions, colour JPEG, so
// each edge is also located in red, green and blue) on one goroutine, with
// the inputs made beforehand: the per-edge cost of measureOne, reported as
// CPU ms per edge. Run with -benchtime 1x -count 3; never part of the tests.
func BenchmarkEdgesOfChartPhoto(b *testing.B) {
	_, data := benchChartPhoto(b, "24")
	ctx := context.Background()
	dec, err := decode.Decode(data, decode.Options{})
	if err != nil {
		b.Fatal(err)
	}
	img := &Image{Width: dec.Width, Height: dec.Height, Exif: exifOf(dec.Exif)}
	geo, err := placeFrame(img, Settings{}, DefaultFreqsLPMM)
	if err != nil {
		b.Fatal(err)
	}
	pose, _ := sheet.Recognise(dec.Lum)
	if pose == nil {
		b.Fatal("the chart was not recognised")
	}
	cands, rejects := edgefind.Edges(dec.Lum, edgefind.Options{})
	pats := findPatterns(ctx, dec.Lum, geo, 0)
	pats.gratingsFromChart(dec.Lum, pose)
	cands, _ = pats.exclude(cands, rejects)
	regions := regionsOf(cands)
	b.ReportAllocs()
	c0 := cpuTime()
	for b.Loop() {
		measureAll(ctx, dec, regions, measureOptions{}, 1, func(int) {})
	}
	c1 := cpuTime()
	b.ReportMetric(float64(len(regions)), "edges")
	if c0 >= 0 && c1 >= 0 {
		b.ReportMetric((c1-c0).Seconds()*1e3/float64(b.N)/float64(len(regions)), "cpu-ms/edge")
	}
}
