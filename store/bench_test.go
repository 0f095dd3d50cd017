package store_test

import (
	"context"
	"fmt"
	"path/filepath"
	"testing"

	"whorl/store"
	"whorl/store/storetest"
)

func benchIndications(n int) []store.Indication {
	inds := make([]store.Indication, n)
	for i := range inds {
		inds[i] = store.Indication{Channel: "F1-diff", StartSample: 10 * i, EndSample: 10*i + 8, AxialM: 0.001 * float64(i),
			Location: fmt.Sprintf("TSP-%d +%d mm", i%9, i%100), VppV: 0.1 + 1e-4*float64(i), PhaseRad: 1.5,
			DepthPct: storetest.Depth(float64(i % 100)), Class: "flaw-like", Method: "phase curve", Source: store.SourceAuto}
	}
	return inds
}

// BenchmarkAddIndications10k inserts 10,000 indications (10,000 rows and
// 10,000 chained events) in one transaction.
func BenchmarkAddIndications10k(b *testing.B) {
	ctx := context.Background()
	inds := benchIndications(10000)
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		s, err := storetest.Build(ctx, filepath.Join(b.TempDir(), fmt.Sprintf("b%d.whorl", i)), storetest.Clock(storetest.Epoch))
		if err != nil {
			b.Fatal(err)
		}
		an := s.As(storetest.ActorOf(storetest.Primary))
		b.StartTimer()
		if _, err := an.AddIndications(ctx, "S-R1C1", inds); err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		s.Close()
		b.StartTimer()
	}
}

// BenchmarkVerify10k verifies a record of about 10,000 events.
func BenchmarkVerify10k(b *testing.B) {
	ctx := context.Background()
	s, err := storetest.Build(ctx, filepath.Join(b.TempDir(), "v.whorl"), storetest.Clock(storetest.Epoch))
	if err != nil {
		b.Fatal(err)
	}
	defer s.Close()
	n, _, _ := s.Head(ctx)
	if _, err := s.As(storetest.ActorOf(storetest.Primary)).AddIndications(ctx, "S-R1C1", benchIndications(10000-int(n))); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		res, err := s.Verify(ctx)
		if err != nil || !res.OK {
			b.Fatalf("Verify: %+v, %v", res, err)
		}
		if res.Events != 10000 {
			b.Fatalf("verified %d events; want 10000", res.Events)
		}
	}
}
