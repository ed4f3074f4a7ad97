//go:build linux

package analyze

import (
	"context"
	"testing"
)

// BenchmarkEdgesOfChartPhoto times the measuring of every edge region of the
// 24 MP stage-table photo (benchChartPhoto; 553 regions, colour JPEG, so
// each edge is also located in red, green and blue) on one goroutine, with
// the inputs made beforehand: the per-edge cost of measureOne, reported as
// CPU ms per edge. Run with -benchtime 1x -count 3; never part of the tests.
func BenchmarkEdgesOfChartPhoto(b *testing.B) {
	_, data := benchChartPhoto(b, "24")
	ctx := context.Background()
	f, err := Find(ctx, Photo{Name: "chart-24MP.jpg", Data: data}, Settings{}, nil)
	if err != nil {
		b.Fatal(err)
	}
	if f.pose == nil {
		b.Fatal("the chart was not recognised")
	}
	dec, regions := f.dec, f.plan.Regions
	b.ReportAllocs()
	c0 := cpuTime()
	for b.Loop() {
		measureAll(ctx, dec, regions, f.opt, 1, func(int) {})
	}
	c1 := cpuTime()
	b.ReportMetric(float64(len(regions)), "edges")
	if c0 >= 0 && c1 >= 0 {
		b.ReportMetric((c1-c0).Seconds()*1e3/float64(b.N)/float64(len(regions)), "cpu-ms/edge")
	}
}
