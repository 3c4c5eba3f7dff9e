package server

// The browser tests' harness: Debian's Chromium driven by chromedp against
// the real handler stack over a real store, served on a real listener on
// 127.0.0.1 (a secure context, so the app's service worker may register).
// One browser serves every test; each test gets its own browser context, so
// IndexedDB, caches and service workers never leak from one test to the next.
// The scenarios are in browser_flows_test.go.

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"fieldtab/schema"
)

// chromiumPath is Debian's Chromium, which test.sh installs.
const chromiumPath = "/usr/bin/chromium"

// waitTimeout bounds each wait for the page; syncTimeout a wait for the
// outbox to drain, which may take a retry interval or two (10 s each).
const (
	waitTimeout = 10 * time.Second
	syncTimeout = 40 * time.Second
)

// Screen sizes of the screenshots, CSS pixels.
var (
	phoneSize  = [2]int64{390, 844}
	tabletSize = [2]int64{820, 1180}
)

// chrome is the one browser every test shares; it starts on first use and
// stops in TestMain.
var chrome struct {
	once   sync.Once
	ctx    context.Context
	cancel context.CancelFunc
	dir    string
	err    error
}

func TestMain(m *testing.M) {
	code := m.Run()
	if chrome.cancel != nil {
		chrome.cancel()
	}
	if chrome.dir != "" {
		os.RemoveAll(chrome.dir)
	}
	os.Exit(code)
}

// browser returns the shared browser's context, starting it the first time.
// Without Chromium the test is skipped, except under CI, where it fails.
func browser(t *testing.T) context.Context {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("Debian's Chromium is not at %s, and CI is set, so the browser tests may not be skipped: "+
				"./test.sh installs the chromium package when run as root", chromiumPath)
		}
		t.Skipf("Debian's Chromium is not at %s: install the chromium package (./test.sh does, as root) to run the browser tests", chromiumPath)
	}
	chrome.once.Do(func() {
		chrome.dir, chrome.err = os.MkdirTemp("", "fieldtab-chromium-")
		if chrome.err != nil {
			return
		}
		opts := append(chromedp.DefaultExecAllocatorOptions[:],
			chromedp.ExecPath(chromiumPath),
			chromedp.NoSandbox, // root in a container has no user namespace for the sandbox
			chromedp.UserDataDir(filepath.Join(chrome.dir, "profile")),
			// Its shared-memory files too, so that nothing is left in /tmp.
			chromedp.Env("TMPDIR="+chrome.dir),
			chromedp.WindowSize(int(phoneSize[0]), int(phoneSize[1])),
		)
		actx, acancel := chromedp.NewExecAllocator(context.Background(), opts...)
		bctx, bcancel := chromedp.NewContext(actx)
		chrome.ctx, chrome.cancel = bctx, func() { bcancel(); acancel() }
		chrome.err = chromedp.Do(bctx) // starts the browser with no deadline
	})
	if chrome.err != nil {
		t.Fatalf("start Chromium (%s): %v", chromiumPath, chrome.err)
	}
	return chrome.ctx
}

// appServer is fieldtab's real handler stack over a store in a temp file,
// served on 127.0.0.1. It can be stopped and started again on the same port
// over the same file, as a restarted fieldtab would be.
type appServer struct {
	t    *testing.T
	path string // the store's file
	addr string // host:port, fixed after the first start
	URL  string // http://127.0.0.1:port
	skew time.Duration
	db   *schema.DB
	srv  *Server
	hs   *http.Server
	lead string // a lead's device token
	mu   sync.Mutex
	log  []string       // "METHOD path" of each API request
	sent map[string]int // reading id → times posted to the readings endpoint
	// cut, while set, drops every request unanswered, as no network would;
	// escaped lists those dropped (see page.setOffline).
	cut     bool
	escaped []string
}

// startApp opens a fresh store and serves it on a free port of 127.0.0.1.
func startApp(t *testing.T) *appServer {
	t.Helper()
	return startAppSkewed(t, 0)
}

// startAppSkewed is startApp with the server's clock (store and server)
// off real time by skew.
func startAppSkewed(t *testing.T, skew time.Duration) *appServer {
	t.Helper()
	a := &appServer{t: t, path: filepath.Join(t.TempDir(), "fieldtab.db"), addr: "127.0.0.1:0", skew: skew, sent: map[string]int{}}
	a.start()
	t.Cleanup(a.stop)
	var err error
	if _, a.lead, err = a.db.CreateDevice(context.Background(), schema.Actor{Name: "test"}, "Lead laptop", schema.RoleLead); err != nil {
		t.Fatalf("create lead device: %v", err)
	}
	return a
}

// start opens the store and serves it; after a stop, on the same port.
func (a *appServer) start() {
	a.t.Helper()
	ctx := context.Background()
	db, err := schema.Open(ctx, a.path)
	if err != nil {
		a.t.Fatalf("open store %s: %v", a.path, err)
	}
	a.db, a.srv = db, New(db, a.addr, nil)
	if a.skew != 0 {
		now := func() time.Time { return time.Now().Add(a.skew) }
		db.Now, a.srv.Now = now, now
	}
	var ln net.Listener
	// The port was just freed by this process; the kernel gives it back at
	// once (Go sets SO_REUSEADDR), but allow a moment.
	for deadline := time.Now().Add(5 * time.Second); ; {
		ln, err = net.Listen("tcp", a.addr)
		if err == nil || !errors.Is(err, syscall.EADDRINUSE) || time.Now().After(deadline) {
			break
		}
		time.Sleep(50 * time.Millisecond)
	}
	if err != nil {
		db.Close()
		a.t.Fatalf("listen on %s: %v", a.addr, err)
	}
	a.addr = ln.Addr().String()
	a.URL = "http://" + a.addr
	hs := &http.Server{Handler: a.record(a.srv.Handler()), ReadHeaderTimeout: 10 * time.Second}
	a.hs = hs
	go func() { _ = hs.Serve(ln) }() // ErrServerClosed once stopped
}

// stopHTTP stops serving (the port is closed, the store stays open), waiting
// for requests in flight.
func (a *appServer) stopHTTP() {
	if a.hs == nil {
		return
	}
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
	defer cancel()
	if err := a.hs.Shutdown(ctx); err != nil {
		a.t.Errorf("stop serving: %v", err)
	}
	if err := a.srv.Close(ctx); err != nil {
		a.t.Errorf("close server: %v", err)
	}
	a.hs = nil
}

// stop stops serving and closes the store, as a fieldtab that exits.
func (a *appServer) stop() {
	a.stopHTTP()
	if a.db != nil {
		if err := a.db.Close(); err != nil {
			a.t.Errorf("close store: %v", err)
		}
		a.db = nil
	}
}

// restart is stop then start: a new process over the same file and port,
// so a new boot ID.
func (a *appServer) restart() {
	a.stop()
	a.start()
}

// record wraps the handler stack to note each API request and the reading
// IDs each readings batch carries, so a test can tell what the app sent.
func (a *appServer) record(h http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		a.mu.Lock()
		if a.cut {
			a.escaped = append(a.escaped, r.Method+" "+r.URL.Path)
			a.mu.Unlock()
			panic(http.ErrAbortHandler) // close the connection with no answer
		}
		a.mu.Unlock()
		if strings.HasPrefix(r.URL.Path, "/api/") {
			var ids []string
			if r.Method == http.MethodPost && strings.HasSuffix(r.URL.Path, "/readings") {
				body, _ := io.ReadAll(io.LimitReader(r.Body, maxBody+1))
				r.Body = io.NopCloser(bytes.NewReader(body))
				var batch struct {
					Readings []struct {
						ID string `json:"id"`
					} `json:"readings"`
				}
				_ = json.Unmarshal(body, &batch)
				for _, rd := range batch.Readings {
					ids = append(ids, rd.ID)
				}
			}
			a.mu.Lock()
			a.log = append(a.log, r.Method+" "+r.URL.Path)
			for _, id := range ids {
				a.sent[id]++
			}
			a.mu.Unlock()
		}
		h.ServeHTTP(w, r)
	})
}

// requests returns how many API requests have come in so far, and of them
// how many posted readings.
func (a *appServer) requests() (all, readingPosts int) {
	a.mu.Lock()
	defer a.mu.Unlock()
	for _, l := range a.log {
		if strings.HasPrefix(l, "POST ") && strings.HasSuffix(l, "/readings") {
			readingPosts++
		}
	}
	return len(a.log), readingPosts
}

// sentIDs returns a copy of the reading IDs posted, with their counts.
func (a *appServer) sentIDs() map[string]int {
	a.mu.Lock()
	defer a.mu.Unlock()
	m := make(map[string]int, len(a.sent))
	for k, v := range a.sent {
		m[k] = v
	}
	return m
}

// api calls the API with the lead's token and decodes a 2xx answer into out.
func (a *appServer) api(method, path string, body, out any) {
	a.t.Helper()
	var rd io.Reader
	if body != nil {
		b, err := json.Marshal(body)
		if err != nil {
			a.t.Fatalf("encode %s %s: %v", method, path, err)
		}
		rd = bytes.NewReader(b)
	}
	req, err := http.NewRequest(method, a.URL+"/api/v1"+path, rd)
	if err != nil {
		a.t.Fatal(err)
	}
	req.Header.Set("Authorization", "Bearer "+a.lead)
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		a.t.Fatalf("%s %s: %v", method, path, err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	if resp.StatusCode/100 != 2 {
		a.t.Fatalf("%s %s: status %d: %s", method, path, resp.StatusCode, b)
	}
	if out != nil {
		if err := json.Unmarshal(b, out); err != nil {
			a.t.Fatalf("%s %s: decode %s: %v", method, path, b, err)
		}
	}
}

// readings returns every reading of job in the store.
func (a *appServer) readings(job string) []schema.Reading {
	a.t.Helper()
	rs, err := a.db.Readings(context.Background(), job)
	if err != nil {
		a.t.Fatalf("readings of job %s: %v", job, err)
	}
	return rs
}

// waitReadings waits up to the sync timeout for the store to hold n
// readings of job.
func (a *appServer) waitReadings(job string, n int) {
	a.t.Helper()
	deadline := time.Now().Add(syncTimeout)
	for {
		got := len(a.readings(job))
		if got == n {
			return
		}
		if got > n || time.Now().After(deadline) {
			a.t.Fatalf("the store holds %d readings of the job, want %d (waited up to %s)", got, n, syncTimeout)
		}
		time.Sleep(100 * time.Millisecond)
	}
}

// page is one browser tab, in a browser context of its own, with the
// console it wrote to.
type page struct {
	t   *testing.T
	ctx context.Context
	app *appServer

	mu      sync.Mutex
	console []chromedp.ConsoleMessage
	shotDir string
}

// newPage opens a tab in a fresh browser context (its own storage) at phone
// size, collecting what the page writes to the console.
func newPage(t *testing.T, app *appServer) *page {
	t.Helper()
	ctx, cancel := chromedp.NewContext(browser(t), chromedp.WithNewBrowserContext())
	p := &page{t: t, ctx: ctx, app: app}
	msgs := chromedp.Console(ctx)
	done := make(chan struct{})
	go func() {
		defer close(done)
		for m, err := range msgs {
			if err != nil {
				return
			}
			p.mu.Lock()
			p.console = append(p.console, m)
			p.mu.Unlock()
		}
	}()
	t.Cleanup(func() {
		cancel()
		<-done
	})
	if err := chromedp.Do(p.ctx, chromedp.EmulateViewport(phoneSize[0], phoneSize[1])); err != nil {
		t.Fatalf("open a tab: %v", err)
	}
	return p
}

// run runs actions with the wait timeout; a failure ends the test with the
// page's state.
func (p *page) run(what string, actions ...chromedp.Action[chromedp.Void]) {
	p.t.Helper()
	ctx, cancel := context.WithTimeout(p.ctx, waitTimeout)
	defer cancel()
	if err := chromedp.Do(ctx, actions...); err != nil {
		p.fail("%s: %v", what, err)
	}
}

// navigate loads url (relative to the app's address when it starts with /).
func (p *page) navigate(url string) {
	p.t.Helper()
	if strings.HasPrefix(url, "/") {
		url = p.app.URL + url
	}
	p.run("load "+url, chromedp.Navigate(url))
}

// js is s as a JavaScript string literal.
func js(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

// q is a JavaScript expression for the first element matching the CSS selector sel.
func q(sel string) string { return "document.querySelector(" + js(sel) + ")" }

// eval evaluates expr in the page and decodes its value into T.
func eval[T any](p *page, expr string, opts ...chromedp.EvaluateOption) T {
	p.t.Helper()
	return evalWithin[T](p, waitTimeout, expr, opts...)
}

// evalWithin is eval allowing timeout for a promise to settle.
func evalWithin[T any](p *page, timeout time.Duration, expr string, opts ...chromedp.EvaluateOption) T {
	p.t.Helper()
	ctx, cancel := context.WithTimeout(p.ctx, timeout)
	defer cancel()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](expr, opts...))
	if err != nil {
		p.fail("evaluate %s: %v", expr, err)
	}
	return v
}

// awaitPromise makes an evaluation wait for the promise its expression returns.
func awaitPromise(params *runtime.EvaluateParams) { params.AwaitPromise = new(true) }

// truthy is the value of expr as a boolean, false when it throws; it does not
// fail the test when the page is between documents.
func (p *page) truthy(expr string) (bool, error) {
	ctx, cancel := context.WithTimeout(p.ctx, 2*time.Second)
	defer cancel()
	return chromedp.Run(ctx, chromedp.Evaluate[bool]("(() => { try { return !!("+expr+"); } catch (e) { return false; } })()"))
}

// waitFor polls expr (a JavaScript expression) until it is truthy, for up to
// timeout; then it fails the test saying what was awaited and what the page
// showed.
func (p *page) waitFor(what, expr string, timeout time.Duration) {
	p.t.Helper()
	deadline := time.Now().Add(timeout)
	var lastErr error
	for {
		ok, err := p.truthy(expr)
		if ok {
			return
		}
		lastErr = err
		if time.Now().After(deadline) {
			break
		}
		time.Sleep(100 * time.Millisecond)
	}
	msg := fmt.Sprintf("waited %s for %s (%s)", timeout, what, expr)
	if lastErr != nil {
		msg += fmt.Sprintf("; last evaluation failed: %v", lastErr)
	}
	p.fail("%s", msg)
}

// wait is waitFor with the usual timeout.
func (p *page) wait(what, expr string) {
	p.t.Helper()
	p.waitFor(what, expr, waitTimeout)
}

// waitSel waits for an element matching sel.
func (p *page) waitSel(sel string) {
	p.t.Helper()
	p.wait(sel, q(sel))
}

// click waits for sel and clicks it as a user would (mouse events at its
// centre, after scrolling it into view).
func (p *page) click(sel string) {
	p.t.Helper()
	p.waitSel(sel)
	p.run("click "+sel, chromedp.Click(chromedp.CSS(sel)))
}

// typeInto empties the input sel and types text into it key by key.
func (p *page) typeInto(sel, text string) {
	p.t.Helper()
	p.waitSel(sel)
	p.run("type into "+sel,
		chromedp.Evaluate[chromedp.Void]("(() => { const el = "+q(sel)+"; el.focus(); el.value = ''; "+
			"el.dispatchEvent(new Event('input', {bubbles: true})); })()"),
		chromedp.SendKeys(chromedp.CSS(sel), text))
}

// choose selects the option of the <select> sel whose value is value, as a
// user's pick would (input and change events).
func (p *page) choose(sel, value string) {
	p.t.Helper()
	p.waitSel(sel)
	opts := eval[[]string](p, "Array.from("+q(sel)+".options || [], o => o.value)")
	found := false
	for _, o := range opts {
		found = found || o == value
	}
	if !found {
		p.fail("%s has no option %q; its options are %q", sel, value, opts)
	}
	p.run("choose "+value+" in "+sel, chromedp.Evaluate[chromedp.Void]("(() => { const el = "+q(sel)+"; el.focus(); el.value = "+js(value)+
		"; el.dispatchEvent(new Event('input', {bubbles: true})); el.dispatchEvent(new Event('change', {bubbles: true})); })()"))
}

// text is the textContent of the first element matching sel ("" when none).
func (p *page) text(sel string) string {
	p.t.Helper()
	return eval[string](p, "(() => { const el = "+q(sel)+"; return el ? el.textContent : ''; })()")
}

// attr is attribute name of the first element matching sel ("" when none).
func (p *page) attr(sel, name string) string {
	p.t.Helper()
	return eval[string](p, "(() => { const el = "+q(sel)+"; return el ? (el.getAttribute("+js(name)+") || '') : ''; })()")
}

// count is the number of elements matching sel.
func (p *page) count(sel string) int {
	p.t.Helper()
	return eval[int](p, "document.querySelectorAll("+js(sel)+").length")
}

// waitSync waits for the sync indicator to show attribute name = value.
func (p *page) waitSync(name, value string, timeout time.Duration) {
	p.t.Helper()
	sel := "[data-test=sync-status]"
	p.waitFor(fmt.Sprintf("%s with %s=%q", sel, name, value),
		q(sel)+" && "+q(sel)+".getAttribute("+js(name)+") === "+js(value), timeout)
}

// consoleErrors returns the console messages that are errors or exceptions;
// without includeNetwork, less those of the network's own log (a refused
// connection while offline is expected in some tests).
func (p *page) consoleErrors(includeNetwork bool) []string {
	p.mu.Lock()
	defer p.mu.Unlock()
	var out []string
	for _, m := range p.console {
		if m.Type != chromedp.ConsoleError && m.Type != chromedp.ConsoleException {
			continue
		}
		if !includeNetwork && m.Source == "network" {
			continue
		}
		out = append(out, consoleLine(m))
	}
	return out
}

// consoleLine is a console message with where it came from.
func consoleLine(m chromedp.ConsoleMessage) string {
	s := m.String()
	if m.URL != "" {
		s += " (" + m.URL + ":" + strconv.FormatInt(m.Line+1, 10) + ")"
	}
	return s
}

// checkConsole fails the test if the page wrote an error or threw; with
// network false, failed loads logged by the network are let through.
func (p *page) checkConsole(network bool) {
	p.t.Helper()
	if errs := p.consoleErrors(network); len(errs) > 0 {
		p.t.Errorf("the page wrote %d errors to the console:\n  %s", len(errs), strings.Join(errs, "\n  "))
	}
}

// keptDir is where failure screenshots go: FIELDTAB_SCREENSHOTS when set,
// else a directory that outlives the test so the picture can be looked at.
func keptDir(t *testing.T) string {
	if d := os.Getenv("FIELDTAB_SCREENSHOTS"); d != "" {
		return d
	}
	d, err := os.MkdirTemp("", "fieldtab-browser-failure-")
	if err != nil {
		t.Logf("no directory for the failure screenshot: %v", err)
		return ""
	}
	return d
}

// fail ends the test with msg and what the page shows: its address, the sync
// indicator, its text, the console, and a screenshot saved to a file.
func (p *page) fail(format string, args ...any) {
	p.t.Helper()
	var b strings.Builder
	fmt.Fprintf(&b, format, args...)
	ctx, cancel := context.WithTimeout(p.ctx, 5*time.Second)
	defer cancel()
	state, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(() => {
		const s = document.querySelector('[data-test=sync-status]');
		const tests = Array.from(document.querySelectorAll('[data-test]'), e => {
			const a = Array.from(e.attributes).filter(x => x.name.startsWith('data-')).map(x => x.name + '=' + JSON.stringify(x.value)).join(' ');
			return '  <' + e.tagName.toLowerCase() + ' ' + a + '>';
		});
		return 'page: ' + location.href + '\nsync-status: ' + (s ? s.outerHTML : '(none)') +
			'\ndata-test elements:\n' + tests.slice(0, 80).join('\n') + (tests.length > 80 ? '\n  …' : '') +
			'\ntext:\n' + (document.body ? document.body.innerText : '(no body)').slice(0, 3000);
	})()`))
	if err != nil {
		fmt.Fprintf(&b, "\n(could not read the page: %v)", err)
	} else {
		b.WriteString("\n" + state)
	}
	p.mu.Lock()
	if n := len(p.console); n > 0 {
		b.WriteString("\nconsole:")
		for _, m := range p.console[max(0, n-30):] {
			b.WriteString("\n  " + consoleLine(m))
		}
	}
	p.mu.Unlock()
	if png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot()); err == nil {
		if dir := keptDir(p.t); dir != "" {
			name := filepath.Join(dir, "failure-"+regexp.MustCompile(`[^A-Za-z0-9]+`).ReplaceAllString(p.t.Name(), "_")+".png")
			if err := os.WriteFile(name, png, 0o644); err == nil {
				fmt.Fprintf(&b, "\nscreenshot: %s", name)
			}
		}
	}
	p.t.Fatal(b.String())
}

// screenshotDir is where the README's screenshots go: FIELDTAB_SCREENSHOTS,
// or the test's temp dir.
func (p *page) screenshotDir() string {
	if p.shotDir == "" {
		p.shotDir = os.Getenv("FIELDTAB_SCREENSHOTS")
		if p.shotDir == "" {
			p.shotDir = p.t.TempDir()
		} else if err := os.MkdirAll(p.shotDir, 0o755); err != nil {
			p.t.Fatalf("screenshot directory: %v", err)
		}
	}
	return p.shotDir
}

// screenshots saves what the page shows at phone and at tablet size, as
// phone-NAME.png and tablet-NAME.png, scrolling sel (if any) into view; the
// page is left at phone size.
func (p *page) screenshots(name, sel string) {
	p.t.Helper()
	dir := p.screenshotDir()
	for _, s := range []struct {
		kind string
		size [2]int64
	}{{"phone", phoneSize}, {"tablet", tabletSize}} {
		p.run("resize to "+s.kind, chromedp.EmulateViewport(s.size[0], s.size[1]))
		if sel != "" {
			p.run("scroll to "+sel, chromedp.Evaluate[chromedp.Void](q(sel)+".scrollIntoView({block: 'center'})"))
		}
		// Let layout settle: two frames after the resize.
		p.run("settle", chromedp.Evaluate[chromedp.Void](
			"new Promise(r => requestAnimationFrame(() => requestAnimationFrame(r)))", awaitPromise))
		ctx, cancel := context.WithTimeout(p.ctx, waitTimeout)
		png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
		cancel()
		if err != nil {
			p.fail("screenshot %s at %s size: %v", name, s.kind, err)
		}
		file := filepath.Join(dir, s.kind+"-"+name+".png")
		if err := os.WriteFile(file, png, 0o644); err != nil {
			p.t.Fatalf("save screenshot: %v", err)
		}
		p.t.Logf("screenshot %s", file)
	}
	p.run("resize to phone", chromedp.EmulateViewport(phoneSize[0], phoneSize[1]))
}

// setOffline turns the tab's network off or on: requests fail as with no
// connection (the service worker's too) and navigator.onLine follows.
// Chromium's emulation does not hold back the service worker's own fetches
// (it refreshes its cache from the network) and once let an API request of
// the page through, so while offline the test server also drops, unanswered,
// any request that reaches it; the test log counts them.
func (p *page) setOffline(offline bool) {
	p.t.Helper()
	if !offline {
		p.app.mu.Lock()
		p.app.cut = false
		if len(p.app.escaped) > 0 {
			n := map[string]int{}
			for _, r := range p.app.escaped {
				n[r]++
			}
			var list []string
			for r, c := range n {
				list = append(list, fmt.Sprintf("%s ×%d", r, c))
			}
			sort.Strings(list)
			p.t.Logf("%d requests got past Chromium's offline emulation; the test server dropped them: %s",
				len(p.app.escaped), strings.Join(list, ", "))
		}
		p.app.escaped = nil
		p.app.mu.Unlock()
	} else {
		defer func() {
			p.app.mu.Lock()
			p.app.cut = true
			p.app.mu.Unlock()
		}()
	}
	setNet := func(ctx context.Context, t *chromedp.Target) error {
		conds := []*network.Conditions{}
		if offline {
			conds = append(conds, &network.Conditions{Offline: true, DownloadThroughput: -1, UploadThroughput: -1})
		}
		emulateSW := offline
		if _, err := cdp.Call(ctx, t, network.EmulateNetworkConditionsByRule, network.EmulateNetworkConditionsByRuleParams{
			EmulateOfflineServiceWorker: &emulateSW, MatchedNetworkConditions: conds}); err != nil {
			return err
		}
		_, err := cdp.Call(ctx, t, network.OverrideNetworkState, network.OverrideNetworkStateParams{
			Offline: offline, DownloadThroughput: -1, UploadThroughput: -1})
		return err
	}
	p.run(fmt.Sprintf("set the network offline=%v", offline),
		chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
			_, err := cdp.Call(ctx, t, network.Enable, network.EnableParams{})
			return err
		}),
		chromedp.Func(setNet))
}

var (
	thousands = regexp.MustCompile(`(\d)[,\x{2009}\x{202f} ](\d{3})`)
	number    = regexp.MustCompile(`[-−]?\d+(\.\d+)?`)
)

// numbers returns the numbers written in s, with thousands separators
// (comma, thin or plain space) dropped.
func numbers(s string) []float64 {
	// Twice, as matches cannot overlap: 1,234,567.
	s = thousands.ReplaceAllString(thousands.ReplaceAllString(s, "$1$2"), "$1$2")
	var out []float64
	for _, m := range number.FindAllString(s, -1) {
		if v, err := strconv.ParseFloat(strings.Replace(m, "−", "-", 1), 64); err == nil {
			out = append(out, v)
		}
	}
	return out
}

// TestBrowserSmoke loads the app on a device that has not joined: the page
// has the strict CSP, is a secure context, shows the join screen and writes
// no error to the console.
func TestBrowserSmoke(t *testing.T) {
	app := startApp(t)
	p := newPage(t, app)
	ctx, cancel := context.WithTimeout(p.ctx, waitTimeout)
	defer cancel()
	resp, err := chromedp.Run(ctx, chromedp.NavigateResponse(app.URL+"/"))
	if err != nil {
		p.fail("load /: %v", err)
	}
	if resp.Status != 200 {
		t.Fatalf("GET / answered %d", resp.Status)
	}
	var csp string
	for k, v := range resp.Headers {
		if strings.EqualFold(k, "Content-Security-Policy") {
			csp = fmt.Sprint(v)
		}
	}
	if csp != appCSP {
		t.Errorf("Content-Security-Policy of / is %q, want %q", csp, appCSP)
	}
	p.wait("a secure context", "window.isSecureContext")
	// A device that has not joined is shown the join screen.
	p.waitSel("[data-test=join-code]")
	p.waitSel("[data-test=sync-status]")
	p.wait("the document to finish loading", "document.readyState === 'complete'")
	p.checkConsole(true)
}

// TestBrowserHarnessRestart checks the harness itself: the server stops,
// refuses connections, and comes back on the same port over the same store
// with a new boot ID.
func TestBrowserHarnessRestart(t *testing.T) {
	app := startApp(t)
	health := func() (string, error) {
		resp, err := http.Get(app.URL + "/api/v1/health")
		if err != nil {
			return "", err
		}
		defer resp.Body.Close()
		var h struct {
			BootID string `json:"boot_id"`
		}
		err = json.NewDecoder(resp.Body).Decode(&h)
		return h.BootID, err
	}
	before, err := health()
	if err != nil {
		t.Fatal(err)
	}
	url := app.URL
	app.stop()
	if _, err := health(); err == nil {
		t.Fatal("the server still answers after stop")
	}
	app.start()
	if app.URL != url {
		t.Fatalf("restarted at %s, want %s", app.URL, url)
	}
	after, err := health()
	if err != nil {
		t.Fatalf("after restart: %v", err)
	}
	if after == before || after == "" {
		t.Fatalf("boot ID %q after restart, %q before: want a new one", after, before)
	}
}
