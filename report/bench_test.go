package report

import (
	"bytes"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"fieldtab/schema"
)

// Large-job sizes of issue 5's speed target.
const (
	largeSystems    = 40
	largeOutlets    = 1500
	largeTraverses  = 60
	largeCapTests   = 40
	largeWaterTests = 200
)

// largePlan is a job of the target's size, built in memory: 40 units of
// 37 or 38 outlets each, a supply traverse on every unit and a return one
// on 20 of them, a capacity test on each unit from its supply traverse, and
// five water tests per unit.
func largePlan(tb testing.TB, now time.Time) *plan {
	tb.Helper()
	elev := 850.0
	p := newPlan(schema.Job{Name: "Large job: Eastgate Hospital, all wings (fixture)", SiteAddress: "Eastgate (fictional)",
		Client: "Eastgate Health Trust (fictional)", Engineer: "Fixture engineer", Contractor: "Fixture contractor",
		TABFirm: "Fixture balancing crew", Units: "ip", Elevation: &elev})
	p.instrumentsFor(now)
	table := perfTable(tb)
	day1, day2 := now.Add(-74*time.Hour), now.Add(-28*time.Hour)
	outletN := 0
	travN := 0
	for s := range largeSystems {
		tag := fmt.Sprintf("AHU-%d", s+1)
		n := largeOutlets / largeSystems
		if s < largeOutlets%largeSystems {
			n++
		}
		supply := n - 3
		design := 0.0
		for i := range supply {
			design += float64(150 + 25*((s+i)%12))
		}
		des := schema.SystemDesign{Airflow: design, OutdoorAir: design * 0.2, ExternalStatic: 1.2, RatedTotal: design * 30,
			RatedSensible: design * 22, MotorHP: 15, FLA: 21, Volts: 460, Phase: 3, FanRPM: 1200, MotorRPM: 1765}
		kind := "air_handler"
		if s%4 == 0 {
			// Rooftop units whose airflow the invented table covers.
			kind, des.PerfTableCSV = "rooftop_unit", table
		}
		sys := p.system(schema.System{Tag: tag, Kind: kind, Name: fmt.Sprintf("Wing %c, level %d", 'A'+s/8, s%8+1),
			Location: fmt.Sprintf("Plant room %d", s/4+1), Design: des})
		sysID, sysAir := sys.ID, des.Airflow
		for i := range n {
			outletN++
			kind, d := "supply", float64(150+25*((s+i)%12))
			switch i {
			case supply:
				kind, d = "return", design*0.5
			case supply + 1:
				kind, d = "return", design*0.3
			case supply + 2:
				kind, d = "exhaust", 200
			}
			id := p.outlet(sysID, fmt.Sprintf("%s-%d", map[string]string{"supply": "S", "return": "R", "exhaust": "E"}[kind], outletN),
				fmt.Sprintf("%d.%02d %s", s%8+1, i+1, []string{"Ward", "Office", "Corridor", "Store", "Clean utility", "Bay"}[i%6]),
				kind, []string{"24x24", "12x12", "24x12", "10 in round"}[i%4], d)
			found := 0.7 + 0.6*float64((i*7+s*3)%11)/10
			p.read(schema.SubjectOutlet, id, "flow", 0, float64(int(d*found)), schema.UnitCFM, schema.StageAsFound, "Hood 1",
				day1.Add(time.Duration(outletN)*time.Minute))
			if (i+s)%17 != 0 {
				final := 0.93 + 0.14*float64((i*5+s)%9)/8
				p.read(schema.SubjectOutlet, id, "flow", 0, float64(int(d*final)), schema.UnitCFM, schema.StageFinal, "Hood 1",
					day2.Add(time.Duration(outletN)*time.Second*20))
			}
		}
		traverses := 1
		if s < largeTraverses-largeSystems {
			traverses = 2
		}
		var supplyTrav string
		for k := range traverses {
			travN++
			tv := schema.Traverse{ID: schema.NewID(), JobID: p.job.ID, SystemID: sysID, Tag: fmt.Sprintf("T-%d", travN),
				Location: tag + []string{" supply duct", " return duct"}[k]}
			switch travN % 3 {
			case 0:
				tv.Shape, tv.Method, tv.Width, tv.Height, tv.PointsW, tv.PointsH = "rect", "log-tchebycheff", 48, 30, 7, 6
			case 1:
				tv.Shape, tv.Method, tv.Width, tv.Height, tv.PointsW, tv.PointsH = "rect", "equal-area", 40, 40, 8, 8
			default:
				tv.Shape, tv.Method, tv.Diameter, tv.PointsPerDiameter, tv.Diameters = "round", "log-tchebycheff", 36, 8, 2
			}
			p.traverses = append(p.traverses, tv)
			at := day2.Add(time.Duration(travN) * 10 * time.Minute)
			p.traverseReadings(tb, &tv, sysAir*(0.97+0.01*float64(k)), 0.0735, at)
			p.read(schema.SubjectTraverse, tv.ID, "air_db", 0, 56, schema.UnitDegF, schema.StageFinal, "Psychrometer 1", at)
			p.read(schema.SubjectTraverse, tv.ID, "air_rh", 0, 85, schema.UnitPercent, schema.StageFinal, "Psychrometer 1", at)
			if k == 0 {
				supplyTrav = tv.ID
			}
		}
		ct := schema.CapacityTest{ID: schema.NewID(), JobID: p.job.ID, SystemID: sysID, Tag: "CT-" + tag, Mode: "cooling",
			FlowSource: "traverse", TraverseID: supplyTrav}
		p.caps = append(p.caps, ct)
		at := now.Add(-time.Duration(s+1) * 5 * time.Minute)
		for k, v := range []float64{78 + float64(s%5)*0.4, 64.5, 55.5, 53.8, 90} {
			q := []string{"enter_db", "enter_wb", "leave_db", "leave_wb", "outdoor_db"}[k]
			p.read(schema.SubjectCapacityTest, ct.ID, q, 0, v, schema.UnitDegF, schema.StageFinal, "Psychrometer 1", at)
		}
		for w := range largeWaterTests / largeSystems {
			wt := schema.WaterTest{ID: schema.NewID(), JobID: p.job.ID, SystemID: sysID, Mode: "cooling", Fluid: "water", FlowSource: "valve",
				ValveCv: 10, DesignFlow: 30}
			var enter, leave, first float64
			q0, u0 := "dp", schema.UnitPsi
			switch w {
			case 0:
				wt.Tag, wt.CapacityTest, enter, leave, first = "CHW coil "+tag, ct.ID, 44, 56, 8.5
			case 1:
				wt.Tag, wt.ValveCv, wt.DesignFlow, enter, leave, first = "HW coil "+tag, 5, 12, 180, 160, 5.6
			default:
				wt.Tag, wt.FlowSource, wt.Fluid, wt.Concentration, wt.DesignFlow = fmt.Sprintf("Circuit %d %s", w-1, tag), "meter", "pg", 30, 8
				enter, leave, first, q0, u0 = 140, 125, 7.6+0.3*float64(w), "flow", schema.UnitGPM
			}
			p.waters = append(p.waters, wt)
			at := now.Add(-time.Duration(s*5+w+1) * time.Minute)
			p.read(schema.SubjectWaterTest, wt.ID, q0, 0, first, u0, schema.StageFinal, "Hydronic 1", at)
			p.read(schema.SubjectWaterTest, wt.ID, "enter_temp", 0, enter, schema.UnitDegF, schema.StageFinal, "Hydronic 1", at)
			p.read(schema.SubjectWaterTest, wt.ID, "leave_temp", 0, leave, schema.UnitDegF, schema.StageFinal, "Hydronic 1", at)
		}
		p.fanReadings(sysID, 1180+float64(s), 1760, [3]float64{468, 466, 471}, [3]float64{18.2, 18.6, 18.1}, 1.25, 0.9, -0.4, 0.86,
			day2.Add(time.Duration(s)*time.Minute))
	}
	if len(p.outlets) != largeOutlets || len(p.traverses) != largeTraverses || len(p.caps) != largeCapTests ||
		len(p.waters) != largeWaterTests || len(p.systems) != largeSystems {
		tb.Fatalf("large plan: %d outlets, %d traverses, %d capacity tests, %d water tests, %d systems",
			len(p.outlets), len(p.traverses), len(p.caps), len(p.waters), len(p.systems))
	}
	return p
}

// heapSampler records the largest HeapInuse seen while it runs.
type heapSampler struct {
	stop chan struct{}
	done sync.WaitGroup
	peak uint64
}

func sampleHeap(every time.Duration) *heapSampler {
	h := &heapSampler{stop: make(chan struct{})}
	h.done.Add(1)
	go func() {
		defer h.done.Done()
		var m runtime.MemStats
		t := time.NewTicker(every)
		defer t.Stop()
		for {
			runtime.ReadMemStats(&m)
			h.peak = max(h.peak, m.HeapInuse)
			select {
			case <-h.stop:
				return
			case <-t.C:
			}
		}
	}()
	return h
}

func (h *heapSampler) end() uint64 {
	close(h.stop)
	h.done.Wait()
	return h.peak
}

// peakRSS is the process's peak resident memory (VmHWM), in bytes, where
// /proc has it.
func peakRSS() (uint64, bool) {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0, false
	}
	for _, l := range strings.Split(string(b), "\n") {
		if f := strings.Fields(l); len(f) >= 2 && f[0] == "VmHWM:" {
			kb, err := strconv.ParseUint(f[1], 10, 64)
			return kb << 10, err == nil
		}
	}
	return 0, false
}

// BenchmarkReportLargeJob is issue 5's target: the report of a large job in
// under 3 s and under 300 MB peak memory. Each iteration computes the
// results from the snapshot, as the command line and the server will, and
// renders the PDF. peak-heap-MB is the largest HeapInuse sampled every 5 ms
// during the loop; peak-rss-MB is the process's peak resident memory, fixture
// building included.
func BenchmarkReportLargeJob(b *testing.B) {
	s := largePlan(b, fixtureNow).memory()
	loc := time.FixedZone("EST", -5*3600)
	var out bytes.Buffer
	runtime.GC()
	h := sampleHeap(5 * time.Millisecond)
	b.ResetTimer()
	for b.Loop() {
		r, err := schema.ComputeResults(s, fixtureNow.In(loc))
		if err != nil {
			b.Fatal(err)
		}
		out.Reset()
		if err := Render(&out, Input{Snapshot: s, Results: r, Revision: 1, Generated: fixtureNow.In(loc)}); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	b.ReportMetric(float64(h.end())/1e6, "peak-heap-MB")
	if rss, ok := peakRSS(); ok {
		b.ReportMetric(float64(rss)/1e6, "peak-rss-MB")
	}
	b.ReportMetric(float64(out.Len())/1e6, "pdf-MB")
	b.ReportMetric(float64(bytes.Count(out.Bytes(), []byte("/Type /Page\n"))), "pages")
}
