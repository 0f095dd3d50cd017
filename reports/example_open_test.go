package reports_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"whorl/reports"
	"whorl/store/storetest"
)

// ExampleOpen builds a streaming report of a record and writes its
// indications CSV, read from the store a batch at a time. Of the three
// indications of the test record, one is rejected by an analyst and one
// is in a component of an invalid calibration group.
func ExampleOpen() {
	ctx := context.Background()
	dir, err := os.MkdirTemp("", "whorl-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	s, err := storetest.Build(ctx, filepath.Join(dir, "insp.whorl"), storetest.Clock(storetest.Epoch))
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	r, err := reports.Open(ctx, s, reports.Options{Now: func() time.Time { return storetest.Epoch }})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d indications, %d reportable, %d rejected\n", r.Total, r.Reportable(), r.Rejected)
	fmt.Println("not listed:", r.Excluded)
	written, err := r.WriteFiles(ctx, reports.Files{IndicationsCSV: filepath.Join(dir, "indications.csv")})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(written[0].Kind, filepath.Base(written[0].Path))
	// Output:
	// 3 indications, 1 reportable, 1 rejected
	// not listed: map[invalid calibration group: re-test:1]
	// indications-csv indications.csv
}
