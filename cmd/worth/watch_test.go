package main

import (
	"bufio"
	"context"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// The watch tests run the preview in-process on 127.0.0.1, edit files
// and wait for the reload event, each wait bounded; the preview stops by
// itself when the test ends (or after a minute at most).

const eventWait = 15 * time.Second

// testPreview starts a preview of memo (port 0: a free one) and stops it
// when the test ends.
func testPreview(t testing.TB, memo string) *preview {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	p, err := startPreview(ctx, watchOptions{memo: memo, debounce: defaultDebounce}, io.Discard, io.Discard)
	if err != nil {
		cancel()
		t.Fatal(err)
	}
	t.Cleanup(func() {
		cancel()
		select {
		case <-p.done:
		case <-time.After(10 * time.Second):
			t.Error("the preview did not stop")
		}
	})
	return p
}

// events subscribes to the preview's build events.
func events(t testing.TB, p *preview) <-chan int {
	t.Helper()
	resp, err := http.Get(p.url + "events")
	if err != nil {
		t.Fatal(err)
	}
	if ct := resp.Header.Get("Content-Type"); ct != "text/event-stream" {
		t.Fatalf("events: Content-Type %q", ct)
	}
	ch := make(chan int, 16)
	go func() {
		defer resp.Body.Close()
		defer close(ch)
		sc := bufio.NewScanner(resp.Body)
		for sc.Scan() {
			if d, ok := strings.CutPrefix(sc.Text(), "data: "); ok {
				if n, err := strconv.Atoi(d); err == nil {
					ch <- n
				}
			}
		}
	}()
	t.Cleanup(func() { resp.Body.Close() })
	return ch
}

// waitBuild waits, bounded, for the event of build gen (or a later one).
func waitBuild(t testing.TB, ch <-chan int, gen int) {
	t.Helper()
	deadline := time.After(eventWait)
	for {
		select {
		case n, ok := <-ch:
			if !ok {
				t.Fatalf("the event stream ended before build %d", gen)
			}
			if n >= gen {
				return
			}
		case <-deadline:
			t.Fatalf("no event for build %d within %s", gen, eventWait)
		}
	}
}

// waitUntil waits, bounded, for a build event after which cond holds (an
// editor's save may take more than one build to settle).
func waitUntil(t testing.TB, ch <-chan int, what string, cond func() bool) {
	t.Helper()
	deadline := time.After(eventWait)
	for {
		select {
		case _, ok := <-ch:
			if !ok {
				t.Fatalf("the event stream ended before %s", what)
			}
			if cond() {
				return
			}
		case <-deadline:
			t.Fatalf("no build event brought %s within %s", what, eventWait)
		}
	}
}

func get(t testing.TB, url string) (int, string) {
	t.Helper()
	resp, err := http.Get(url)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp.StatusCode, string(b)
}

// replaceIn edits a file in place (a plain write, as most editors do),
// or through a temporary file renamed over it (as others do).
func replaceIn(t testing.TB, path, old, new string, rename bool) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	if !strings.Contains(s, old) {
		t.Fatalf("%s holds no %q", path, old)
	}
	s = strings.Replace(s, old, new, 1)
	if !rename {
		if err := os.WriteFile(path, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	tmp := path + ".swp"
	if err := os.WriteFile(tmp, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Rename(tmp, path); err != nil {
		t.Fatal(err)
	}
}

// chillerCopy copies the CSV-fed test memo and its CSV into a new folder.
func chillerCopy(t testing.TB) (memo, csv string) {
	t.Helper()
	dir := t.TempDir()
	memo, csv = filepath.Join(dir, "rink-chiller.md"), filepath.Join(dir, "retrofit.csv")
	for _, f := range []string{"rink-chiller.md", "retrofit.csv"} {
		b, err := os.ReadFile(filepath.Join(repoRoot, "testdata", "csv", f))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, f), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return memo, csv
}

// TestWatch: an edit of the memo, and of a CSV it reads, is followed by a
// reload event and the new figures served and written; a bad edit by an
// error page (the errors with their lines over the last good memo) while
// the HTML on disk stays as it was; the next good save recovers. The
// file on disk never holds a script; the served page holds only the
// inline reload script.
func TestWatch(t *testing.T) {
	memo, csv := chillerCopy(t)
	p := testPreview(t, memo)
	if host, _, _ := net.SplitHostPort(p.addr.String()); host != "127.0.0.1" {
		t.Fatalf("the preview listens on %s, not loopback", p.addr)
	}
	ev := events(t, p)
	waitBuild(t, ev, 1)
	out := filepath.Join(filepath.Dir(memo), "rink-chiller.html")
	page := func() string {
		code, body := get(t, p.url)
		if code != 200 {
			t.Fatalf("GET /: %d", code)
		}
		return body
	}
	onDisk := func() string { return readFile(t, out) }
	body := page()
	if !strings.Contains(body, "$610,000") || !strings.Contains(body, "$330,000") {
		t.Fatalf("the first build does not show the memo's figures")
	}
	if strings.Count(body, "<script") != 1 || !strings.Contains(body, `new EventSource("/events")`) || strings.Contains(body, "src=") && strings.Contains(body, "<script src") {
		t.Errorf("the page should hold exactly one inline script, the reload")
	}
	if strings.Contains(onDisk(), "<script") {
		t.Errorf("the HTML file on disk holds a script")
	}

	// 1. Edit the memo.
	replaceIn(t, memo, "first cost: 610k", "first cost: 655k", false)
	waitUntil(t, ev, "the new first cost", func() bool {
		body := page()
		return strings.Contains(body, "$655,000") && !strings.Contains(body, "$610,000")
	})
	if d := onDisk(); !strings.Contains(d, "$655,000") || strings.Contains(d, "<script") {
		t.Errorf("after the edit, the file on disk is not the new report")
	}

	// 2. Edit the CSV it reads (saved through a rename).
	replaceIn(t, csv, "0,330000,cost", "0,345000,cost", true)
	waitUntil(t, ev, "the CSV's new row", func() bool { return strings.Contains(page(), "$345,000") })
	good := onDisk()

	// 3. A bad edit: errors over the last good memo; the file untouched.
	replaceIn(t, memo, "annual cost: 21,000", "annual cost: 21,000 + nosuch", true)
	waitUntil(t, ev, "the error page", func() bool { return strings.Contains(page(), "worth-errors") })
	body = page()
	for _, want := range []string{`id="worth-errors"`, "The memo has an error", memo + ":23:23", "unknown name &#34;nosuch&#34;", "  23 | annual cost: 21,000 + nosuch", "$345,000", "$655,000"} {
		if !strings.Contains(body, want) {
			t.Errorf("the error page lacks %q", want)
		}
	}
	if onDisk() != good {
		t.Errorf("a bad edit changed the HTML on disk")
	}

	// 4. Recovery.
	replaceIn(t, memo, "annual cost: 21,000 + nosuch", "annual cost: 23,000", false)
	waitUntil(t, ev, "recovery", func() bool {
		body := page()
		return !strings.Contains(body, "worth-errors") && strings.Contains(body, "$23,000")
	})
	if !strings.Contains(onDisk(), "$23,000") {
		t.Errorf("the file on disk did not recover")
	}
}

// TestWatchServes: the preview serves the page, the events and the files
// the memo references from its folder, and nothing else: no other file of
// the folder, nothing through .. (plain or encoded), no other host name
// (a web page elsewhere cannot reach it by a DNS name), no other method.
func TestWatchServes(t *testing.T) {
	memo, _ := chillerCopy(t)
	dir := filepath.Dir(memo)
	writeFile(t, filepath.Join(dir, "private.txt"), "not referenced\n")
	replaceIn(t, memo, "as exported.", "as exported ([the data](retrofit.csv), [elsewhere](https://example.invalid/x), [up](../secret.txt)).", false)
	writeFile(t, filepath.Join(filepath.Dir(dir), "secret.txt"), "outside\n")
	p := testPreview(t, memo)
	host := p.addr.String()
	cases := []struct {
		method, path, host string
		code               int
	}{
		{"GET", "/", host, 200},
		{"HEAD", "/", host, 200},
		{"GET", "/", "localhost:" + portOf(p.addr), 200},
		{"GET", "/retrofit.csv", host, 200},
		{"GET", "/private.txt", host, 404},
		{"GET", "/rink-chiller.md", host, 404},
		{"GET", "/rink-chiller.html", host, 404},
		{"GET", "/../secret.txt", host, 400},
		{"GET", "/%2e%2e/secret.txt", host, 400},
		{"GET", "/..%2fsecret.txt", host, 400},
		{"GET", "/x/%2e%2e/%2e%2e/secret.txt", host, 400},
		{"GET", "/secret.txt", host, 404},
		{"GET", "/", "evil.example", 403},
		{"GET", "/", "evil.example:" + portOf(p.addr), 403},
		{"POST", "/", host, 405},
	}
	for _, c := range cases {
		conn, err := net.Dial("tcp", host)
		if err != nil {
			t.Fatal(err)
		}
		conn.SetDeadline(time.Now().Add(5 * time.Second))
		// A raw request, so that the path reaches the server as written.
		_, _ = io.WriteString(conn, c.method+" "+c.path+" HTTP/1.1\r\nHost: "+c.host+"\r\nConnection: close\r\n\r\n")
		resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
		if err != nil {
			t.Fatalf("%s %s: %v", c.method, c.path, err)
		}
		body, _ := io.ReadAll(resp.Body)
		conn.Close()
		if resp.StatusCode != c.code {
			t.Errorf("%s %s (Host %s): %d, want %d", c.method, c.path, c.host, resp.StatusCode, c.code)
		}
		if c.code != 200 && strings.Contains(string(body), "outside") {
			t.Errorf("%s %s leaked a file outside the memo's folder", c.method, c.path)
		}
		if c.path == "/" && c.code == 200 && c.method == "GET" {
			if csp := resp.Header.Get("Content-Security-Policy"); !strings.Contains(csp, "script-src 'nonce-") || !strings.Contains(csp, "default-src 'none'") {
				t.Errorf("the page's Content-Security-Policy is %q", csp)
			}
		}
	}
}

// BenchmarkRebuild measures one rebuild of each example as the preview
// does it on a save: read, parse, compute, render the HTML and write it
// atomically, then announce it.
func BenchmarkRebuild(b *testing.B) {
	for _, name := range []string{"depot-roof", "digester-gas", "water-main-lining"} {
		b.Run(name, func(b *testing.B) {
			dir := b.TempDir()
			memo := filepath.Join(dir, name+".md")
			src, err := os.ReadFile(filepath.Join(repoRoot, "examples", name+".md"))
			if err != nil {
				b.Fatal(err)
			}
			if err := os.WriteFile(memo, src, 0o644); err != nil {
				b.Fatal(err)
			}
			p := testPreview(b, memo)
			b.ResetTimer()
			for b.Loop() {
				p.rebuild()
			}
		})
	}
}

// BenchmarkSaveToReload measures the whole loop a writer sees: a save of
// the memo, the debounce, the rebuild, and the reload event arriving at a
// client of the preview.
func BenchmarkSaveToReload(b *testing.B) {
	for _, name := range []string{"depot-roof", "digester-gas", "water-main-lining"} {
		b.Run(name, func(b *testing.B) {
			dir := b.TempDir()
			memo := filepath.Join(dir, name+".md")
			src, err := os.ReadFile(filepath.Join(repoRoot, "examples", name+".md"))
			if err != nil {
				b.Fatal(err)
			}
			if err := os.WriteFile(memo, src, 0o644); err != nil {
				b.Fatal(err)
			}
			p := testPreview(b, memo)
			ev := events(b, p)
			waitBuild(b, ev, 1)
			gen := 1
			b.ResetTimer()
			for b.Loop() {
				// Each save differs (a trailing line), as an edit would.
				if err := os.WriteFile(memo, append(src, []byte("\n"+strconv.Itoa(gen)+"\n")...), 0o644); err != nil {
					b.Fatal(err)
				}
				gen++
				waitBuild(b, ev, gen)
			}
		})
	}
}
