package analyze

import (
	"context"
	"encoding/json"
	"fmt"
	"sync"
	"testing"

	"sagitta/core/decode"
	"sagitta/core/edge"
	"sagitta/core/edgefind"
	"sagitta/core/field"
	"sagitta/core/internal/coarse"
	"sagitta/core/sim/demo"
)

var (
	benchOnce  sync.Once
	benchPhoto []byte
)

// demoPhoto renders the 24 MP demo photo once per benchmark run.
func demoPhoto(b *testing.B) []byte {
	benchOnce.Do(func() {
		var err error
		if benchPhoto, err = demo.Portrait().Photo(); err != nil {
			b.Fatal(err)
		}
	})
	return benchPhoto
}

// BenchmarkWholePhoto times the analysis of the 24 MP demo photo (a JPEG of
// 54 tilted squares, 432 edge regions), split by stage.
func BenchmarkWholePhoto(b *testing.B) {
	data := demoPhoto(b)
	dec, err := decode.Decode(data, decode.Options{})
	if err != nil {
		b.Fatal(err)
	}
	cands, _ := edgefind.Edges(dec.Lum, edgefind.Options{})
	b.Run("decode", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			if _, err := decode.Decode(data, decode.Options{}); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("find", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			edgefind.Edges(dec.Lum, edgefind.Options{})
		}
	})
	b.Run("sine-patterns", func(b *testing.B) {
		geo := field.NewGeometry(dec.Width, dec.Height, 6)
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			for _, j := range findPatterns(coarse.NewViews(dec.Lum), geo, nil) {
				measurePattern(dec.Lum, j, [2]float64{geo.CentreX, geo.CentreY}, 0)
			}
		}
	})
	b.Run("measure", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			measureAll(context.Background(), dec, regionsOf(cands), measureOptions{}, 0, func(int) {})
		}
	})
	b.Run("all", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			if _, err := Run(context.Background(), "demo.jpg", data, Settings{}, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkResummarise times Resummarise to new field frequencies on the
// demo photo's result (Sagitta's chart, 6 and 24 MP): alone, and with the
// result read from JSON and written back, as the page's worker does.
func BenchmarkResummarise(b *testing.B) {
	s := Settings{FreqsLPMM: []float64{20, 40}}
	for _, reduce := range []int{2, 1} {
		var data []byte
		var err error
		if reduce == 1 {
			data = demoPhoto(b)
		} else if data, err = demo.PortraitSmall(reduce).Photo(); err != nil {
			b.Fatal(err)
		}
		img, err := Run(context.Background(), "demo.jpg", data, Settings{}, nil)
		if err != nil {
			b.Fatal(err)
		}
		text, err := json.Marshal(img)
		if err != nil {
			b.Fatal(err)
		}
		size := fmt.Sprintf("%dMP", 24/(reduce*reduce))
		b.Run(size, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Resummarise(img, s); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(size+"-json", func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(text)))
			for b.Loop() {
				var in Image
				if err := json.Unmarshal(text, &in); err != nil {
					b.Fatal(err)
				}
				out, err := Resummarise(&in, s)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := json.Marshal(out); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// regionsOf lists the candidates' regions.
func regionsOf(cands []edgefind.Candidate) []edge.Region {
	out := make([]edge.Region, len(cands))
	for i, c := range cands {
		out[i] = c.Region
	}
	return out
}
