package main

import (
	"bytes"
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"flag"
	"fmt"
	"html"
	"io"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/signal"
	"path"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"time"

	"github.com/fsnotify/fsnotify"
	"github.com/yuin/goldmark/ast"

	"worth/parse"
)

// watchOptions are the flags of "worth watch".
type watchOptions struct {
	memo  string
	port  int
	pdf   bool
	build buildOptions
	load  loadOptions
	// debounce is how long to wait after a change for the next one
	// before rebuilding (editors save in several steps).
	debounce time.Duration
}

// defaultDebounce gathers the steps of one save (write, rename, chmod)
// into one rebuild while keeping save-to-reload well under 150 ms.
const defaultDebounce = 20 * time.Millisecond

func watch(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("watch", flag.ContinueOnError)
	fs.SetOutput(stderr)
	opt := watchOptions{debounce: defaultDebounce}
	fs.IntVar(&opt.port, "port", 0, "serve the preview on 127.0.0.1 port `N` (default: a free port, printed)")
	fs.BoolVar(&opt.pdf, "pdf", false, "also write MEMO.pdf on every good build (after the preview reloads)")
	fs.StringVar(&opt.build.templateDir, "template", "", "HTML templates folder `DIR` of the organization's own (as for build)")
	fs.BoolVar(&opt.build.allowHTML, "allow-html", false, "let raw HTML in the memo's prose through (as for build)")
	fs.BoolVar(&opt.load.allowOutside, "allow-outside", false, "let the memo read files (cash flows from: FILE.csv) outside its own folder")
	addLimitFlag(fs, &opt.load.limits)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: worth watch [--port N] [options] MEMO.md\n\n"+
			"Builds MEMO.html beside the memo and rebuilds it on every save of the memo or\n"+
			"of a CSV file it reads, and serves a live preview on 127.0.0.1 that reloads\n"+
			"itself. While the memo has an error, the preview shows the errors over the\n"+
			"last good version and the files on disk are left as they were. Ctrl-C stops.\n\nOptions:\n")
		fs.PrintDefaults()
	}
	pos, code, ok := positional(fs, args, stderr, 1, "worth watch: give exactly one memo file")
	if !ok {
		return code
	}
	opt.memo = pos[0]
	if opt.port < 0 || opt.port > 65535 {
		fmt.Fprintf(stderr, "worth watch: --port %d is not a port number\n", opt.port)
		return 2
	}
	if st, err := os.Stat(opt.memo); err != nil || st.IsDir() {
		fmt.Fprintf(stderr, "worth watch: cannot read %s\n", opt.memo)
		return 2
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	p, err := startPreview(ctx, opt, stdout, stderr)
	if err != nil {
		fmt.Fprintf(stderr, "worth watch: %v\n", err)
		return 2
	}
	fmt.Fprintf(stdout, "worth: watching %s; preview at %s (Ctrl-C to stop)\n", opt.memo, p.url)
	<-p.done
	return 0
}

// preview is a running watch: the watcher, the server and the last build.
type preview struct {
	opt   watchOptions
	dir   string // the memo's folder, absolute
	memo  string // the memo, absolute
	html  string // the HTML output beside the memo
	url   string // where the preview is served
	addr  net.Addr
	out   io.Writer
	errw  io.Writer
	nonce string
	done  chan struct{}

	watcher *fsnotify.Watcher

	mu sync.Mutex
	// gen counts builds, good or not; each one is announced.
	gen int
	// page is the last good HTML (as written to disk, without a script).
	page []byte
	// errs are the current errors (nil after a good build) and src the
	// sources they point into, to show the lines.
	errs []*parse.Error
	src  map[string][]byte
	// inputs are the files whose change rebuilds (the memo and the CSV
	// files it reads); served the files the preview may serve, by their
	// path relative to the memo's folder.
	inputs map[string]bool
	served map[string]string
	dirs   map[string]bool
	subs   map[chan int]struct{}
}

// startPreview builds the memo once, starts watching it and serves the
// preview until ctx ends; p.done closes when everything has stopped.
func startPreview(ctx context.Context, opt watchOptions, stdout, stderr io.Writer) (*preview, error) {
	memo, err := filepath.Abs(opt.memo)
	if err != nil {
		return nil, err
	}
	p := &preview{opt: opt, memo: memo, dir: filepath.Dir(memo), html: besideMemo(opt.memo, "html"),
		out: stdout, errw: stderr, done: make(chan struct{}), inputs: map[string]bool{}, dirs: map[string]bool{},
		subs: map[chan int]struct{}{}, served: map[string]string{}}
	var nb [12]byte
	if _, err := rand.Read(nb[:]); err != nil {
		return nil, err
	}
	p.nonce = hex.EncodeToString(nb[:])
	if p.watcher, err = fsnotify.NewWatcher(); err != nil {
		return nil, err
	}
	ln, err := net.Listen("tcp", net.JoinHostPort("127.0.0.1", strconv.Itoa(opt.port)))
	if err != nil {
		p.watcher.Close()
		return nil, err
	}
	p.addr = ln.Addr()
	p.url = "http://" + p.addr.String() + "/"
	p.rebuild()
	srv := &http.Server{Handler: p, ReadHeaderTimeout: 10 * time.Second, BaseContext: func(net.Listener) context.Context { return ctx }}
	var wg sync.WaitGroup
	wg.Add(2)
	go func() {
		defer wg.Done()
		_ = srv.Serve(ln)
	}()
	go func() {
		defer wg.Done()
		p.loop(ctx)
	}()
	go func() {
		<-ctx.Done()
		sctx, cancel := context.WithTimeout(context.Background(), 2*time.Second)
		defer cancel()
		_ = srv.Shutdown(sctx)
		p.watcher.Close()
		wg.Wait()
		close(p.done)
	}()
	return p, nil
}

// loop waits for changes to the memo or its CSV files and rebuilds, once
// the changes have settled for the debounce time.
func (p *preview) loop(ctx context.Context) {
	var timer *time.Timer
	var fire <-chan time.Time
	for {
		select {
		case <-ctx.Done():
			if timer != nil {
				timer.Stop()
			}
			return
		case ev, ok := <-p.watcher.Events:
			if !ok {
				return
			}
			if ev.Op == fsnotify.Chmod || !p.isInput(ev.Name) {
				continue
			}
			if timer == nil {
				timer = time.NewTimer(p.opt.debounce)
			} else {
				timer.Reset(p.opt.debounce)
			}
			fire = timer.C
		case err, ok := <-p.watcher.Errors:
			if !ok {
				return
			}
			fmt.Fprintf(p.errw, "worth watch: %v\n", err)
		case <-fire:
			fire = nil
			p.rebuild()
		}
	}
}

func (p *preview) isInput(name string) bool {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.inputs[absOr(name)]
}

// rebuild reads, computes and renders the memo. A good build writes the
// HTML atomically and replaces the page; a memo with errors keeps the
// last good page and the files on disk as they were. Either way the
// preview is told to reload.
func (p *preview) rebuild() {
	start := time.Now()
	src, err := readMemo(p.opt.memo, p.opt.load.limits) // limits.go
	var l *loaded
	if err == nil {
		l, err = loadSource(p.opt.memo, src, p.opt.load, nil)
	}
	var page, pdf []byte
	if err == nil {
		fmts := []string{"html"}
		if p.opt.pdf {
			fmts = append(fmts, "pdf")
		}
		var outs [][]byte
		if outs, err = renderAll(l.rep, fmts, p.opt.build); err == nil {
			page = outs[0]
			if p.opt.pdf {
				pdf = outs[1]
			}
			err = writeAtomic(p.html, page)
		}
	}
	// What to watch and serve.
	inputs := map[string]bool{p.memo: true}
	if l != nil {
		for _, f := range l.files {
			inputs[absOr(f)] = true
		}
	}
	for f := range inputs {
		if d := filepath.Dir(f); !p.dirs[d] {
			if werr := p.watcher.Add(d); werr == nil {
				p.dirs[d] = true
			} else {
				fmt.Fprintf(p.errw, "worth watch: cannot watch %s: %v\n", d, werr)
			}
		}
	}
	p.mu.Lock()
	p.inputs = inputs
	p.gen++
	gen := p.gen
	if err == nil {
		p.page, p.errs, p.src = page, nil, nil
		p.served = p.referenced(l.memo, l.files)
	} else {
		p.errs = errorsOf(err, p.opt.memo)
		p.src = map[string][]byte{p.opt.memo: src}
		if l != nil {
			for _, f := range l.files {
				if b, rerr := os.ReadFile(f); rerr == nil && len(b) <= maxIncludeBytes {
					p.src[f] = b
				}
			}
		}
	}
	for ch := range p.subs {
		select {
		case ch <- gen:
		default: // a slow client: replace the build it has not read yet
			select {
			case <-ch:
			default:
			}
			ch <- gen
		}
	}
	p.mu.Unlock()
	if err != nil {
		printErr(p.errw, err)
		fmt.Fprintf(p.errw, "worth watch: %s has errors; the preview shows them over the last good version\n", p.opt.memo)
		return
	}
	fmt.Fprintf(p.out, "worth: built %s in %s\n", p.html, time.Since(start).Round(time.Millisecond))
	if pdf != nil {
		if err := writeAtomic(besideMemo(p.opt.memo, "pdf"), pdf); err != nil {
			fmt.Fprintf(p.errw, "worth watch: %v\n", err)
		}
	}
	for _, x := range l.rep.Expectations {
		if !x.Passed {
			fmt.Fprintf(p.errw, "%s:%d:%d: warning: expectation does not hold: %s\n", p.opt.memo, x.Line, x.Col, x.Text)
		}
	}
}

// errorsOf turns an error into positioned errors for the error page.
func errorsOf(err error, file string) []*parse.Error {
	var list parse.ErrorList
	if errors.As(err, &list) {
		return list
	}
	return []*parse.Error{{Pos: parse.Pos{File: file}, Msg: err.Error()}}
}

// referenced lists the files the preview may serve, by URL path: the
// memo's own outputs, its logo, the CSV files it reads and the files its
// prose links to, each only if it is inside the memo's folder.
func (p *preview) referenced(m *parse.Memo, files []string) map[string]string {
	out := map[string]string{}
	add := func(file string) {
		abs := absOr(file)
		if inside(p.dir, abs, true) != nil {
			return
		}
		rel, err := filepath.Rel(p.dir, abs)
		if err != nil {
			return
		}
		out[filepath.ToSlash(rel)] = abs
	}
	if p.opt.pdf {
		add(besideMemo(p.opt.memo, "pdf"))
	}
	for _, f := range files {
		add(f)
	}
	if logo := strings.TrimSpace(m.Front.Logo.Value.Src); logo != "" && !filepath.IsAbs(logo) {
		add(filepath.Join(p.dir, logo))
	}
	if m.Doc != nil {
		_ = ast.Walk(m.Doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
			if !entering {
				return ast.WalkContinue, nil
			}
			var dest []byte
			switch x := n.(type) {
			case *ast.Link:
				dest = x.Destination
			case *ast.Image:
				dest = x.Destination
			default:
				return ast.WalkContinue, nil
			}
			if rel, ok := localLink(string(dest)); ok {
				add(filepath.Join(p.dir, filepath.FromSlash(rel)))
			}
			return ast.WalkContinue, nil
		})
	}
	return out
}

// localLink returns the file path of a relative link ("data/x.csv",
// "plan.pdf#page=2"), or false for a link elsewhere.
func localLink(dest string) (string, bool) {
	u, err := url.Parse(dest)
	if err != nil || u.Scheme != "" || u.Host != "" || u.Path == "" || strings.HasPrefix(u.Path, "/") {
		return "", false
	}
	return u.Path, true
}

// ServeHTTP serves the preview: the page at /, the build events at
// /events, and the files the memo references from its folder; nothing
// else. Requests must come to the loopback address the preview printed
// (a page elsewhere cannot reach it through a DNS name).
func (p *preview) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	if r.Method != http.MethodGet && r.Method != http.MethodHead {
		http.Error(w, "only GET", http.StatusMethodNotAllowed)
		return
	}
	if host := r.Host; host != p.addr.String() && host != "localhost:"+portOf(p.addr) {
		http.Error(w, "this preview answers only at "+p.url, http.StatusForbidden)
		return
	}
	raw := r.URL.EscapedPath()
	name, err := url.PathUnescape(raw)
	if err != nil || strings.ContainsAny(name, "\\\x00") || hasDotDot(name) {
		http.Error(w, "path traversal refused", http.StatusBadRequest)
		return
	}
	w.Header().Set("X-Content-Type-Options", "nosniff")
	switch name {
	case "/":
		p.servePage(w, r)
		return
	case "/events":
		p.serveEvents(w, r)
		return
	}
	rel := strings.TrimPrefix(path.Clean(name), "/")
	p.mu.Lock()
	file, ok := p.served[rel]
	p.mu.Unlock()
	if !ok || inside(p.dir, file, true) != nil {
		http.NotFound(w, r)
		return
	}
	f, err := os.Open(file)
	if err != nil {
		http.NotFound(w, r)
		return
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil || st.IsDir() {
		http.NotFound(w, r)
		return
	}
	http.ServeContent(w, r, filepath.Base(file), st.ModTime(), f)
}

func portOf(a net.Addr) string {
	_, port, _ := net.SplitHostPort(a.String())
	return port
}

func hasDotDot(p string) bool {
	for _, s := range strings.Split(p, "/") {
		if s == ".." {
			return true
		}
	}
	return false
}

// servePage writes the page: the last good HTML with the reload script,
// and over it the errors when the memo has any.
func (p *preview) servePage(w http.ResponseWriter, r *http.Request) {
	p.mu.Lock()
	page, errs, src, gen := p.page, p.errs, p.src, p.gen
	p.mu.Unlock()
	var body []byte
	if page == nil {
		body = []byte("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>worth preview</title></head><body></body></html>\n")
	} else {
		body = page
	}
	script := fmt.Sprintf("<script nonce=\"%s\">%s</script>\n", p.nonce, strings.Replace(reloadScript, "GEN", strconv.Itoa(gen), 1))
	out := injectBeforeBodyEnd(body, []byte(script))
	if len(errs) > 0 {
		out = injectAfterBodyStart(out, []byte(errorBox(errs, src, page != nil)))
	}
	h := w.Header()
	h.Set("Content-Type", "text/html; charset=utf-8")
	h.Set("Cache-Control", "no-store")
	h.Set("Content-Security-Policy", "default-src 'none'; img-src 'self' data:; style-src 'unsafe-inline'; font-src data:; connect-src 'self'; script-src 'nonce-"+p.nonce+"'; base-uri 'none'; form-action 'none'")
	_, _ = w.Write(out)
}

// reloadScript reloads the page when a build newer than the page's (GEN)
// is announced, and keeps the reader's place across the reload. It is the
// only script, served inline with the preview; the HTML file on disk has
// none.
const reloadScript = `(function(){var g=GEN,k="worth-scroll",s=window.sessionStorage,y=s.getItem(k);` +
	`if(y!==null){s.removeItem(k);window.scrollTo(0,+y);}` +
	`var e=new EventSource("/events");e.addEventListener("build",function(m){if(+m.data!==g){s.setItem(k,String(window.scrollY));e.close();location.reload();}});})();`

// injectBeforeBodyEnd puts s before the page's last </body> (or at its
// end).
func injectBeforeBodyEnd(page, s []byte) []byte {
	i := bytes.LastIndex(page, []byte("</body>"))
	if i < 0 {
		return append(append([]byte{}, page...), s...)
	}
	out := make([]byte, 0, len(page)+len(s))
	out = append(out, page[:i]...)
	out = append(out, s...)
	return append(out, page[i:]...)
}

// injectAfterBodyStart puts s just inside the page's <body> tag (or at
// its start).
func injectAfterBodyStart(page, s []byte) []byte {
	i := bytes.Index(page, []byte("<body"))
	if i >= 0 {
		if j := bytes.IndexByte(page[i:], '>'); j >= 0 {
			i += j + 1
		} else {
			i = -1
		}
	}
	if i < 0 {
		i = 0
	}
	out := make([]byte, 0, len(page)+len(s))
	out = append(out, page[:i]...)
	out = append(out, s...)
	return append(out, page[i:]...)
}

// errorBox is the error panel of the preview: every error with its
// position and the source line it points at, over the last good memo.
func errorBox(errs []*parse.Error, src map[string][]byte, overGood bool) string {
	var b strings.Builder
	b.WriteString(`<div id="worth-errors" role="alert" style="position:sticky;top:0;z-index:10;margin:0 0 1rem;padding:1rem 1.25rem;background:#fff4f2;border:2px solid #b3261e;border-radius:6px;font:15px/1.45 system-ui,sans-serif;color:#3b0d0a;max-height:45vh;overflow:auto;box-shadow:0 4px 12px rgba(0,0,0,.15)">`)
	n := len(errs)
	title := "The memo has an error"
	if n > 1 {
		title = fmt.Sprintf("The memo has %d errors", n)
	}
	fmt.Fprintf(&b, `<p style="margin:0 0 .5rem;font-weight:700">%s. `, title)
	if overGood {
		b.WriteString(`Below is the last good version; the files on disk are unchanged.`)
	} else {
		b.WriteString(`No good version has been built yet.`)
	}
	b.WriteString("</p>\n<ol style=\"margin:0;padding-left:1.4rem\">\n")
	for _, e := range errs {
		fmt.Fprintf(&b, `<li style="margin:.4rem 0"><code style="font-weight:600">%s</code> %s`, html.EscapeString(e.Pos.String()), html.EscapeString(e.Msg))
		if line := sourceLine(src[e.Pos.File], e.Pos.Line); line != "" {
			caret := ""
			if e.Pos.Col > 0 {
				caret = "\n" + strings.Repeat(" ", len([]rune(numberedPrefix(e.Pos.Line)))+e.Pos.Col-1) + "^"
			}
			fmt.Fprintf(&b, "<pre style=\"margin:.3rem 0 0;padding:.4rem .6rem;background:#fff;border:1px solid #e8c4bf;overflow:auto;font:13px/1.4 ui-monospace,monospace\">%s%s</pre>",
				html.EscapeString(numberedPrefix(e.Pos.Line)+line), caret)
		}
		b.WriteString("</li>\n")
	}
	b.WriteString("</ol></div>\n")
	return b.String()
}

func numberedPrefix(line int) string { return fmt.Sprintf("%4d | ", line) }

// sourceLine is line n (1-based) of src, tabs shown as spaces.
func sourceLine(src []byte, n int) string {
	if n <= 0 || src == nil {
		return ""
	}
	lines := bytes.Split(src, []byte("\n"))
	if n > len(lines) {
		return ""
	}
	return strings.ReplaceAll(strings.TrimRight(string(lines[n-1]), "\r"), "\t", " ")
}

// serveEvents streams a "build" event with the build number now and after
// every build, until the client leaves or the preview stops.
func (p *preview) serveEvents(w http.ResponseWriter, r *http.Request) {
	fl, ok := w.(http.Flusher)
	if !ok {
		http.Error(w, "streaming unsupported", http.StatusInternalServerError)
		return
	}
	ch := make(chan int, 1)
	p.mu.Lock()
	p.subs[ch] = struct{}{}
	gen := p.gen
	p.mu.Unlock()
	defer func() {
		p.mu.Lock()
		delete(p.subs, ch)
		p.mu.Unlock()
	}()
	h := w.Header()
	h.Set("Content-Type", "text/event-stream")
	h.Set("Cache-Control", "no-store")
	fmt.Fprintf(w, "retry: 500\nevent: build\ndata: %d\n\n", gen)
	fl.Flush()
	keep := time.NewTicker(20 * time.Second)
	defer keep.Stop()
	for {
		select {
		case <-r.Context().Done():
			return
		case g := <-ch:
			fmt.Fprintf(w, "event: build\ndata: %d\n\n", g)
			fl.Flush()
		case <-keep.C:
			fmt.Fprint(w, ": keep-alive\n\n")
			fl.Flush()
		}
	}
}
