package store_test

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"reflect"
	"testing"

	"whorl/store"
	"whorl/store/storetest"
)

// streamFixture is the storetest record with enough added indications to
// span several of the streaming queries' batches, some of them with later
// calls, so that the batch boundaries are crossed with call histories.
func streamFixture(t *testing.T) *store.Store {
	t.Helper()
	ctx := context.Background()
	s, err := storetest.Build(ctx, filepath.Join(t.TempDir(), "stream.whorl"), storetest.Clock(storetest.Epoch))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	ids, err := s.As(storetest.ActorOf(storetest.Primary)).AddIndications(ctx, "S-R1C1", benchIndications(1100))
	if err != nil {
		t.Fatal(err)
	}
	sec := s.As(storetest.ActorOf(storetest.Second))
	for i := 0; i < len(ids); i += 97 {
		if err := sec.Call(ctx, ids[i], store.Decision{Status: store.CallAccepted, Comment: fmt.Sprint("checked ", i)}, "review"); err != nil {
			t.Fatal(err)
		}
	}
	return s
}

func TestEachIndicationMatchesSlices(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s := streamFixture(t)
	want, err := s.Indications(ctx, "")
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	err = s.EachIndication(ctx, func(d store.Indication, calls []store.Call) error {
		if n >= len(want) {
			return fmt.Errorf("indication %d (%s) beyond the %d of Indications", n, d.ID, len(want))
		}
		if !reflect.DeepEqual(d, want[n]) {
			t.Errorf("indication %d: EachIndication gives %+v; Indications gives %+v", n, d, want[n])
		}
		wantCalls, err := s.Calls(ctx, d.ID) // a query inside the callback: no cursor is held open
		if err != nil {
			return err
		}
		if !reflect.DeepEqual(calls, wantCalls) {
			t.Errorf("indication %s: EachIndication calls %+v; Calls gives %+v", d.ID, calls, wantCalls)
		}
		n++
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if n != len(want) {
		t.Errorf("EachIndication gave %d indications; Indications gives %d", n, len(want))
	}
	if len(want) < 1100 {
		t.Fatalf("fixture has %d indications; want at least 1100 (several batches)", len(want))
	}
}

func TestEachEventMatchesEvents(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s := streamFixture(t)
	want, err := s.Events(ctx)
	if err != nil {
		t.Fatal(err)
	}
	var got []store.Event
	if err := s.EachEvent(ctx, func(e store.Event) error {
		got = append(got, e)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("EachEvent gave %d events; Events gives %d; they differ", len(got), len(want))
	}
}

func TestEachStopsOnError(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s := streamFixture(t)
	stop := errors.New("stop")
	n := 0
	if err := s.EachIndication(ctx, func(store.Indication, []store.Call) error { n++; return stop }); !errors.Is(err, stop) || n != 1 {
		t.Errorf("EachIndication: err %v after %d calls; want %v after 1", err, n, stop)
	}
	n = 0
	if err := s.EachEvent(ctx, func(store.Event) error { n++; return stop }); !errors.Is(err, stop) || n != 1 {
		t.Errorf("EachEvent: err %v after %d calls; want %v after 1", err, n, stop)
	}
}
