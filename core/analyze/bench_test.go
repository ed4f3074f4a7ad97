package analyze

import (
	"context"
	"sync"
	"testing"

	"sagitta/core/decode"
	"sagitta/core/demo"
	"sagitta/core/edge"
	"sagitta/core/field"
	"sagitta/core/find"
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
	cands, _ := find.Edges(dec.Lum, find.Options{})
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
			find.Edges(dec.Lum, find.Options{})
		}
	})
	b.Run("sine-patterns", func(b *testing.B) {
		geo := field.NewGeometry(dec.Width, dec.Height, 6)
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			findPatterns(context.Background(), dec.Lum, geo, 0)
		}
	})
	b.Run("measure", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			measureAll(context.Background(), dec, cands, edge.Refined, 0, func(int) {})
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
