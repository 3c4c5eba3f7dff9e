package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"slices"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"fieldtab/schema"
)

// benchJob makes a job with a system and n outlets through the store.
func benchJob(tb testing.TB, db *schema.DB, n int) (job string, outlets []string) {
	tb.Helper()
	ctx := context.Background()
	a := schema.Actor{Name: "Lead", Role: schema.RoleLead}
	j := &schema.Job{Name: "Bench tower", Units: "ip"}
	if err := db.CreateJob(ctx, a, j); err != nil {
		tb.Fatal(err)
	}
	var systems []string
	for i := range max(1, n/150) {
		sys := &schema.System{JobID: j.ID, Tag: fmt.Sprintf("AHU-%d", i+1), Kind: "air_handler", Design: schema.SystemDesign{Airflow: 60000}}
		if err := schema.Create(ctx, db, a, sys); err != nil {
			tb.Fatal(err)
		}
		systems = append(systems, sys.ID)
	}
	for i := range n {
		o := &schema.Outlet{JobID: j.ID, SystemID: systems[i%len(systems)], Tag: fmt.Sprintf("S-%d", i+1), Room: fmt.Sprintf("Room %d", 100+i/4),
			Kind: "supply", DesignFlow: 400, Method: "hood", Factor: 1}
		if err := schema.Create(ctx, db, a, o); err != nil {
			tb.Fatal(err)
		}
		outlets = append(outlets, o.ID)
	}
	return j.ID, outlets
}

// ingestBench is a server with a job of 100 outlets and one device token per
// client, for the ingest benchmarks.
type ingestBench struct {
	url     string
	tokens  []string
	outlets []string
	cli     *http.Client
}

func newIngestBench(b *testing.B, clients int) *ingestBench {
	b.Helper()
	ts := MustOpenServer(b)
	job, outlets := benchJob(b, ts.db, 100)
	in := &ingestBench{url: ts.ts.URL + "/api/v1/jobs/" + job + "/readings", outlets: outlets}
	for i := range clients {
		_, tok, err := ts.db.CreateDevice(context.Background(), schema.Actor{Name: "bench"}, fmt.Sprintf("Phone %d", i), schema.RoleTechnician)
		if err != nil {
			b.Fatal(err)
		}
		in.tokens = append(in.tokens, tok)
	}
	tr := &http.Transport{MaxIdleConns: clients * 2, MaxIdleConnsPerHost: clients * 2}
	b.Cleanup(tr.CloseIdleConnections)
	in.cli = &http.Client{Transport: tr}
	return in
}

// post sends one batch of n readings and returns how long the answer took.
func (in *ingestBench) post(token string, n int, next *atomic.Int64) (time.Duration, error) {
	rs := make([]schema.Reading, n)
	for i := range rs {
		rs[i] = flowReading(in.outlets[int(next.Add(1))%len(in.outlets)], 400)
	}
	body, _ := json.Marshal(map[string]any{"readings": rs})
	req, _ := http.NewRequest(http.MethodPost, in.url, bytes.NewReader(body))
	req.Header.Set("Authorization", "Bearer "+token)
	req.Header.Set("Content-Type", "application/json")
	start := time.Now()
	resp, err := in.cli.Do(req)
	if err != nil {
		return 0, err
	}
	_, _ = io.Copy(io.Discard, resp.Body)
	resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		return 0, fmt.Errorf("status %d", resp.StatusCode)
	}
	return time.Since(start), nil
}

// BenchmarkReadingsIngest posts batches of 20 readings from 20 concurrent
// clients (each with its own device token and connection) through the real
// handler stack to a store on disk. One op is one batch.
func BenchmarkReadingsIngest(b *testing.B) {
	const clients, batchSize = 20, 20
	in := newIngestBench(b, clients)

	var (
		mu        sync.Mutex
		latencies []time.Duration
		next      atomic.Int64
		failed    atomic.Int64
	)
	b.SetParallelism((clients + 1) / 2) // × GOMAXPROCS (2 here) goroutines
	b.ResetTimer()
	b.RunParallel(func(pb *testing.PB) {
		token := in.tokens[int(next.Add(1)-1)%clients]
		var mine []time.Duration
		for pb.Next() {
			d, err := in.post(token, batchSize, &next)
			if err != nil {
				failed.Add(1)
				continue
			}
			mine = append(mine, d)
		}
		mu.Lock()
		latencies = append(latencies, mine...)
		mu.Unlock()
	})
	b.StopTimer()
	if n := failed.Load(); n > 0 {
		b.Fatalf("%d batches failed", n)
	}
	slices.Sort(latencies)
	if len(latencies) > 0 {
		b.ReportMetric(float64(len(latencies)*batchSize)/b.Elapsed().Seconds(), "readings/s")
		b.ReportMetric(float64(latencies[len(latencies)*99/100].Microseconds())/1000, "p99-ms")
		b.ReportMetric(float64(latencies[len(latencies)/2].Microseconds())/1000, "p50-ms")
	}
}

// BenchmarkReadingsIngestAtTarget offers the target load: 20 clients each post
// a batch of 20 readings every 80 ms, 5,000 readings/s in all, and reports the
// latency at that load. (BenchmarkReadingsIngest, with clients posting back to
// back, measures the ceiling; its latency is queueing behind the one writer.)
func BenchmarkReadingsIngestAtTarget(b *testing.B) {
	const clients, batchSize, period = 20, 20, 80 * time.Millisecond
	in := newIngestBench(b, clients)
	var (
		mu        sync.Mutex
		latencies []time.Duration
		sent      atomic.Int64
		next      atomic.Int64
		failed    atomic.Int64
		wg        sync.WaitGroup
	)
	b.ResetTimer()
	for c := range clients {
		wg.Add(1)
		go func() {
			defer wg.Done()
			time.Sleep(time.Duration(c) * period / clients) // spread the clients over the period
			tick := time.NewTicker(period)
			defer tick.Stop()
			var mine []time.Duration
			for sent.Add(1) <= int64(b.N) {
				if d, err := in.post(in.tokens[c], batchSize, &next); err != nil {
					failed.Add(1)
				} else {
					mine = append(mine, d)
				}
				<-tick.C
			}
			mu.Lock()
			latencies = append(latencies, mine...)
			mu.Unlock()
		}()
	}
	wg.Wait()
	b.StopTimer()
	if n := failed.Load(); n > 0 {
		b.Fatalf("%d batches failed", n)
	}
	slices.Sort(latencies)
	if len(latencies) > 0 {
		b.ReportMetric(float64(len(latencies)*batchSize)/b.Elapsed().Seconds(), "readings/s")
		b.ReportMetric(float64(latencies[len(latencies)*99/100].Microseconds())/1000, "p99-ms")
		b.ReportMetric(float64(latencies[len(latencies)/2].Microseconds())/1000, "p50-ms")
	}
}

// BenchmarkJobGet1500Outlets gets a job of 1,500 outlets, each read as found
// and final, with its results.
func BenchmarkJobGet1500Outlets(b *testing.B) {
	ts := MustOpenServer(b)
	job, outlets := benchJob(b, ts.db, 1500)
	var rs []schema.Reading
	for i, o := range outlets {
		found := flowReading(o, 300+float64(i%200))
		final := flowReading(o, 380+float64(i%40))
		final.Stage = schema.StageFinal
		rs = append(rs, found, final)
	}
	for len(rs) > 0 {
		n := min(len(rs), schema.MaxReadingsBatch)
		if _, err := ts.db.AddReadings(context.Background(), schema.Actor{Name: "Sam"}, job, rs[:n]); err != nil {
			b.Fatal(err)
		}
		rs = rs[n:]
	}
	url := ts.ts.URL + "/api/v1/jobs/" + job
	var size int64
	b.ResetTimer()
	for b.Loop() {
		req, _ := http.NewRequest(http.MethodGet, url, nil)
		req.Header.Set("Authorization", "Bearer "+ts.tech)
		resp, err := ts.ts.Client().Do(req)
		if err != nil {
			b.Fatal(err)
		}
		size, _ = io.Copy(io.Discard, resp.Body)
		resp.Body.Close()
		if resp.StatusCode != http.StatusOK {
			b.Fatalf("status %d", resp.StatusCode)
		}
	}
	b.ReportMetric(float64(size)/1e6, "MB/response")
}
