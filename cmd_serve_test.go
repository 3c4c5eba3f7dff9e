package main

import (
	"bufio"
	"bytes"
	"context"
	"crypto/rand"
	"database/sql"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	_ "github.com/mattn/go-sqlite3"
)

// buildBinary compiles fieldtab once per test run into dir.
func buildBinary(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "fieldtab")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	cmd.Stderr = os.Stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("go build: %v", err)
	}
	return bin
}

var portPattern = regexp.MustCompile(`http://localhost:(\d+)/`)

// startServer runs `fieldtab serve` on a free loopback port and returns its
// base URL once it answers /health.
func startServer(t *testing.T, bin, dbPath string) (*exec.Cmd, string) {
	t.Helper()
	cmd := exec.Command(bin, "serve", "--db", dbPath, "--addr", "127.0.0.1:0")
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	cmd.Stderr = io.Discard
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	found := make(chan string, 1)
	go func() {
		sc := bufio.NewScanner(stdout)
		for sc.Scan() {
			if m := portPattern.FindStringSubmatch(sc.Text()); m != nil {
				select {
				case found <- "http://127.0.0.1:" + m[1]:
				default:
				}
			}
		}
	}()
	select {
	case base := <-found:
		deadline := time.Now().Add(10 * time.Second)
		for time.Now().Before(deadline) {
			if resp, err := http.Get(base + "/api/v1/health"); err == nil {
				resp.Body.Close()
				if resp.StatusCode == http.StatusOK {
					return cmd, base
				}
			}
			time.Sleep(50 * time.Millisecond)
		}
		t.Fatal("server never answered /health")
	case <-time.After(20 * time.Second):
		cmd.Process.Kill()
		t.Fatal("server printed no address")
	}
	return nil, ""
}

func newUUID() string {
	var b [16]byte
	rand.Read(b[:])
	b[6] = b[6]&0x0f | 0x40
	b[8] = b[8]&0x3f | 0x80
	return fmt.Sprintf("%x-%x-%x-%x-%x", b[0:4], b[4:6], b[6:8], b[8:10], b[10:16])
}

type apiClient struct {
	base, token string
	http        *http.Client
}

func (c *apiClient) do(method, path string, body, out any) (int, error) {
	var buf bytes.Buffer
	if body != nil {
		if err := json.NewEncoder(&buf).Encode(body); err != nil {
			return 0, err
		}
	}
	req, err := http.NewRequest(method, c.base+path, &buf)
	if err != nil {
		return 0, err
	}
	req.Header.Set("Authorization", "Bearer "+c.token)
	req.Header.Set("Content-Type", "application/json")
	resp, err := c.http.Do(req)
	if err != nil {
		return 0, err
	}
	defer resp.Body.Close()
	if out != nil && resp.StatusCode < 300 {
		if err := json.NewDecoder(resp.Body).Decode(out); err != nil {
			return resp.StatusCode, err
		}
	}
	return resp.StatusCode, nil
}

// TestCrashSafety starts the real binary, posts readings from several clients,
// kills the server with SIGKILL mid-load, restarts it, and checks that every
// reading the server acknowledged is stored exactly once and the file passes
// integrity_check.
func TestCrashSafety(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	bin := buildBinary(t)
	dbPath := filepath.Join(t.TempDir(), "crash.db")

	out, err := exec.Command(bin, "device", "add", "--db", dbPath, "--name", "crash test", "--role", "lead").Output()
	if err != nil {
		t.Fatalf("device add: %v", err)
	}
	token := strings.TrimSpace(string(out))

	cmd, base := startServer(t, bin, dbPath)
	c := &apiClient{base: base, token: token, http: &http.Client{Timeout: 10 * time.Second}}
	var job struct{ ID string }
	if code, err := c.do("POST", "/api/v1/jobs", map[string]any{"name": "Crash test", "units": "ip"}, &job); err != nil || code != 201 {
		t.Fatalf("create job: %d %v", code, err)
	}
	var sys struct{ ID string }
	if code, err := c.do("POST", "/api/v1/jobs/"+job.ID+"/systems", map[string]any{
		"tag": "RTU-1", "kind": "rooftop_unit", "design": map[string]any{"airflow": 4000}}, &sys); err != nil || code != 201 {
		t.Fatalf("create system: %d %v", code, err)
	}
	var outlet struct{ ID string }
	if code, err := c.do("POST", "/api/v1/jobs/"+job.ID+"/outlets", map[string]any{
		"system_id": sys.ID, "tag": "S-1", "kind": "supply", "design_flow": 400, "method": "hood", "factor": 1}, &outlet); err != nil || code != 201 {
		t.Fatalf("create outlet: %d %v", code, err)
	}

	var (
		mu    sync.Mutex
		acked = map[string]bool{}
		wg    sync.WaitGroup
	)
	ctx, cancel := context.WithCancel(context.Background())
	for client := range 6 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; ctx.Err() == nil && i < 2000; i++ {
				batch := make([]map[string]any, 10)
				ids := make([]string, len(batch))
				for j := range batch {
					ids[j] = newUUID()
					batch[j] = map[string]any{
						"id": ids[j], "subject_kind": "outlet", "subject_id": outlet.ID, "quantity": "flow",
						"value": 380 + client + j, "unit": "cfm", "stage": "as_found",
						"technician": fmt.Sprintf("tech %d", client), "taken_at": time.Now().UTC().Format(time.RFC3339),
					}
				}
				var res struct {
					Results []struct{ ID, Status string }
				}
				code, err := c.do("POST", "/api/v1/jobs/"+job.ID+"/readings", map[string]any{"readings": batch}, &res)
				if err != nil || code != 200 {
					continue // the server died mid-request: these were never acknowledged
				}
				mu.Lock()
				for _, r := range res.Results {
					if r.Status == "stored" || r.Status == "duplicate" {
						acked[r.ID] = true
					}
				}
				mu.Unlock()
			}
		}()
	}
	time.Sleep(1500 * time.Millisecond)
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	cmd.Wait()
	cancel()
	wg.Wait()
	if len(acked) < 100 {
		t.Fatalf("only %d readings acknowledged before the kill; the load was too light to test anything", len(acked))
	}

	// Restart: the store must open (integrity check at start-up) and serve.
	cmd2, base2 := startServer(t, bin, dbPath)
	defer func() { cmd2.Process.Signal(syscall.SIGTERM); cmd2.Wait() }()
	c.base = base2
	var got struct {
		Readings []struct{ ID string }
	}
	if code, err := c.do("GET", "/api/v1/jobs/"+job.ID+"/readings", nil, &got); err != nil || code != 200 {
		t.Fatalf("list readings after restart: %d %v", code, err)
	}
	seen := map[string]int{}
	for _, r := range got.Readings {
		seen[r.ID]++
	}
	for id := range acked {
		if seen[id] != 1 {
			t.Errorf("acknowledged reading %s stored %d times, want exactly once", id, seen[id])
		}
	}
	for id, n := range seen {
		if n != 1 {
			t.Errorf("reading %s stored %d times", id, n)
		}
	}
	db, err := sql.Open("sqlite3", "file:"+dbPath+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var ok string
	if err := db.QueryRow("PRAGMA integrity_check").Scan(&ok); err != nil || ok != "ok" {
		t.Errorf("integrity_check after SIGKILL: %q %v", ok, err)
	}
	t.Logf("%d readings acknowledged before SIGKILL, %d stored after restart", len(acked), len(seen))
}

// TestBackupCommand runs `fieldtab device add` and `fieldtab backup` in-process
// and checks the copy holds the device, is private and passes integrity_check.
func TestBackupCommand(t *testing.T) {
	dir := t.TempDir()
	dbPath, out := filepath.Join(dir, "store.db"), filepath.Join(dir, "copy.db")
	if stdout, stderr, code := runMain(t, "", "device", "add", "--db", dbPath, "--name", "script", "--role", "lead"); code != 0 || len(strings.TrimSpace(stdout)) < 40 {
		t.Fatalf("device add: exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	if _, stderr, code := runMain(t, "", "backup", "--db", dbPath, "--out", out); code != 0 {
		t.Fatalf("backup: exit %d: %s", code, stderr)
	}
	if fi, err := os.Stat(out); err != nil || fi.Mode().Perm() != 0o600 {
		t.Fatalf("backup file: %v, mode %v; want 0600", err, fi.Mode().Perm())
	}
	db, err := sql.Open("sqlite3", "file:"+out+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var ok string
	var n int
	if err := db.QueryRow("PRAGMA integrity_check").Scan(&ok); err != nil || ok != "ok" {
		t.Errorf("integrity_check of the copy: %q %v", ok, err)
	}
	if err := db.QueryRow("SELECT COUNT(*) FROM devices").Scan(&n); err != nil || n != 1 {
		t.Errorf("devices in the copy: %d %v, want 1", n, err)
	}
	if _, _, code := runMain(t, "", "backup", "--db", dbPath, "--out", out); code == 0 {
		t.Error("a second backup over an existing file succeeded; it must refuse")
	}
}

// TestServeLoopbackBanner: a server bound to 127.0.0.1 says that phones
// cannot reach it, instead of offering localhost as their address.
func TestServeLoopbackBanner(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	pr, pw := io.Pipe()
	m := NewMain(strings.NewReader(""), pw, io.Discard)
	done := make(chan error, 1)
	go func() {
		done <- m.Run(ctx, []string{"serve", "--db", filepath.Join(t.TempDir(), "site.db"), "--addr", "127.0.0.1:0",
			"--signer-dir", t.TempDir()})
		pw.Close()
	}()
	var banner strings.Builder
	sc := bufio.NewScanner(pr)
	for sc.Scan() {
		banner.WriteString(sc.Text() + "\n")
		if strings.HasPrefix(sc.Text(), "Safety:") {
			break
		}
	}
	cancel()
	go io.Copy(io.Discard, pr) // the shutdown line
	if err := <-done; err != nil {
		t.Fatal(err)
	}
	out := banner.String()
	for _, want := range []string{"no phone can reach this address", "No join link: fieldtab listens only on this computer"} {
		if !strings.Contains(out, want) {
			t.Errorf("the banner lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "on a phone or tablet on the same network at:\n  http://localhost") {
		t.Errorf("the banner offers localhost to phones:\n%s", out)
	}
}
