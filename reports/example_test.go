package reports_test

import (
	"fmt"
	"os"
	"time"

	"whorl/reports"
	"whorl/store"
)

// ExampleWriteIndicationsCSV writes one indication; a comment with a
// comma and quotes is quoted as RFC 4180 asks, and the phase appears in
// radians and in degrees (1.9198621771937625 rad = 110°).
func ExampleWriteIndicationsCSV() {
	depth := 52.0
	in := &reports.Inspection{
		ReportID: "INS-1-R1-0a1b2c3d",
		Record:   store.Inspection{ID: "INS-1"},
		Indications: []reports.Indication{{Indication: store.Indication{
			ID: "S-1/1", ScanID: "S-1", Component: "R12C34", Channel: "F1-diff", StartSample: 1200, EndSample: 1260,
			AxialM: 0.8125, Location: "TSP-2 +12.5 mm", VppV: 1.84, PhaseRad: 1.9198621771937625, DepthPct: &depth,
			Class: "flaw-like", Method: "phase curve", Source: store.SourceAuto, CurveID: "CAL-A", CurveVersion: 1,
			Status: store.CallAccepted, CallVersion: 2, CalledBy: "analyst-2c", CalledRole: store.RoleLevel2,
			CalledAt: time.Date(2026, 11, 30, 8, 0, 0, 0, time.UTC), Comment: `seen at "TSP-2", recheck`,
		}}},
	}
	if err := reports.WriteIndicationsCSV(os.Stdout, in); err != nil {
		fmt.Println(err)
	}
	// Output:
	// report_id,inspection_id,indication_id,component,scan_id,channel,start_sample,end_sample,axial_m,location,vpp_v,phase_rad,phase_deg,depth_pct,uncertainty_pct,class,method,source,curve_id,curve_version,call_status,call_version,resolved,called_by,called_role,called_at,comment
	// INS-1-R1-0a1b2c3d,INS-1,S-1/1,R12C34,S-1,F1-diff,1200,1260,0.8125,TSP-2 +12.5 mm,1.84,1.9198621771937625,110,52,,flaw-like,phase curve,auto,CAL-A,1,accepted,2,false,analyst-2c,level2,2026-11-30T08:00:00Z,"seen at ""TSP-2"", recheck"
}
