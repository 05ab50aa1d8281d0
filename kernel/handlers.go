package kernel

import (
	"context"
	"errors"
	"fmt"
	"runtime/debug"
	"sort"
	"strings"
	"time"

	"lsys/display"
	"lsys/lang"
)

func (k *Kernel) routes() {
	for _, mux := range []*Mux{k.shellMux, k.controlMux} {
		mux.HandleFunc("kernel_info_request", k.kernelInfo)
		mux.HandleFunc("shutdown_request", k.shutdown)
	}
	k.shellMux.HandleFunc("execute_request", k.execute)
	k.shellMux.HandleFunc("is_complete_request", k.isComplete)
	k.shellMux.HandleFunc("complete_request", k.complete)
	k.shellMux.HandleFunc("inspect_request", k.inspect)
	k.shellMux.HandleFunc("history_request", k.historyRequest)
	k.shellMux.HandleFunc("comm_info_request", func(r *Request) {
		r.Reply("comm_info_reply", map[string]any{"status": "ok", "comms": map[string]any{}})
	})
	// We open no comms; messages for comms are accepted and ignored, as the
	// protocol asks of kernels without comm targets.
	for _, t := range []string{"comm_open", "comm_msg", "comm_close"} {
		k.shellMux.HandleFunc(t, func(r *Request) {})
	}
	k.controlMux.HandleFunc("interrupt_request", func(r *Request) {
		k.Interrupt()
		r.Reply("interrupt_reply", map[string]any{"status": "ok"})
	})
}

func (k *Kernel) kernelInfo(r *Request) {
	links := []map[string]string{}
	if k.cfg.HelpURL != "" {
		links = append(links, map[string]string{"text": "lsys language reference", "url": k.cfg.HelpURL})
	}
	r.Reply("kernel_info_reply", map[string]any{
		"status":                 "ok",
		"protocol_version":       ProtocolVersion,
		"implementation":         "lsys",
		"implementation_version": k.cfg.Version,
		"language_info":          lang.LanguageInfo(),
		"banner": "lsys " + k.cfg.Version + ": linear dynamic systems in notebooks.\n" +
			"Results describe models; validate them against tests of the real plant.",
		"help_links": links,
		"debugger":   false,
	})
}

func (k *Kernel) shutdown(r *Request) {
	var req struct {
		Restart bool `json:"restart"`
	}
	_ = r.Decode(&req)
	r.Reply("shutdown_reply", map[string]any{"status": "ok", "restart": req.Restart})
	k.Interrupt()
	k.Shutdown(req.Restart)
}

type executeRequest struct {
	Code            string            `json:"code"`
	Silent          bool              `json:"silent"`
	StoreHistory    *bool             `json:"store_history"`
	UserExpressions map[string]string `json:"user_expressions"`
	AllowStdin      bool              `json:"allow_stdin"`
	StopOnError     *bool             `json:"stop_on_error"`
}

type historyEntry struct {
	line   int
	input  string
	output any // text/plain of the result, or nil
}

func (k *Kernel) execute(r *Request) {
	var req executeRequest
	if err := r.Decode(&req); err != nil {
		r.Reply("execute_reply", errorContent("ProtocolError", "execute_request content is not valid: "+err.Error(), nil, k.execCount))
		return
	}
	store := !req.Silent && (req.StoreHistory == nil || *req.StoreHistory)
	stopOnError := req.StopOnError == nil || *req.StopOnError
	if store {
		k.execCount++
	}
	count := k.execCount
	if !req.Silent {
		r.Publish("execute_input", map[string]any{"code": req.Code, "execution_count": count})
	}
	out := &cellOutput{r: r, silent: req.Silent}
	value, err := k.runCell(req.Code, out)
	var histOut any
	if err != nil {
		ename, evalue, tb := describeError(err)
		if !req.Silent {
			r.Publish("error", map[string]any{"ename": ename, "evalue": evalue, "traceback": tb})
		}
		reply := errorContent(ename, evalue, tb, count)
		failedAt := time.Now()
		r.Reply("execute_reply", reply)
		if store {
			k.history = append(k.history, historyEntry{line: count, input: req.Code})
		}
		if stopOnError {
			k.abortBefore = failedAt // the dispatcher aborts once this request is idle
		}
		return
	}
	if value != nil && !req.Silent {
		b := k.render(value)
		r.Publish("execute_result", map[string]any{"execution_count": count, "data": b.Data, "metadata": b.Metadata})
		histOut = historySummary(b.Data[display.Text])
	}
	if store {
		k.history = append(k.history, historyEntry{line: count, input: req.Code, output: histOut})
	}
	payload := []any{}
	for _, text := range out.pages {
		payload = append(payload, map[string]any{"source": "page", "data": map[string]any{display.Text: text}, "start": 0})
	}
	r.Reply("execute_reply", map[string]any{
		"status": "ok", "execution_count": count, "payload": payload,
		"user_expressions": k.userExpressions(req.UserExpressions),
	})
}

// runCell evaluates a cell in its own goroutine under a context that an
// interrupt cancels, so control and heartbeat stay answered meanwhile. A
// panic that escapes the language becomes the cell's error.
func (k *Kernel) runCell(code string, out lang.Output) (value any, err error) {
	ctx, cancel := context.WithCancel(context.Background())
	k.runMu.Lock()
	k.cancel = cancel
	k.runMu.Unlock()
	defer func() {
		k.runMu.Lock()
		k.cancel = nil
		k.runMu.Unlock()
		cancel()
	}()
	type result struct {
		v   any
		err error
	}
	done := make(chan result, 1)
	go func() {
		defer func() {
			if p := recover(); p != nil {
				k.log.Printf("cell panicked: %v\n%s", p, debug.Stack())
				done <- result{nil, &internalError{fmt.Sprint(p)}}
			}
		}()
		v, err := k.lang.Run(ctx, code, out)
		done <- result{v, err}
	}()
	res := <-done
	return res.v, res.err
}

type internalError struct{ msg string }

func (e *internalError) Error() string {
	return "internal error: " + e.msg + "\nThe session and its bindings are intact. Please report this cell so it can be fixed."
}

// describeError turns an evaluation error into the protocol's ename, evalue
// and traceback lines.
func describeError(err error) (ename, evalue string, traceback []string) {
	var ie *internalError
	if errors.As(err, &ie) {
		msg := err.Error()
		return "InternalError", strings.SplitN(msg, "\n", 2)[0], strings.Split(msg, "\n")
	}
	return lang.Describe(err)
}

func errorContent(ename, evalue string, tb []string, count int) map[string]any {
	if tb == nil {
		tb = []string{}
	}
	return map[string]any{"status": "error", "ename": ename, "evalue": evalue, "traceback": tb, "execution_count": count}
}

// abortQueued answers execute requests that were already waiting when a
// cell failed with status "aborted" (stop_on_error) and serves the other
// waiting requests as usual. Requests that arrive later run normally: the
// client sent them after it could see the error.
func (k *Kernel) abortQueued(queue <-chan *Message, failedAt time.Time) {
	for {
		select {
		case msg, ok := <-queue:
			if !ok {
				return
			}
			q := &Request{k: k, Msg: msg, sock: k.shell, channel: "shell"}
			if msg.Header.MsgType == "execute_request" && msg.Received.Before(failedAt) {
				k.publishStatus(msg, "busy")
				q.Reply("execute_reply", map[string]any{"status": "aborted", "execution_count": k.execCount})
				k.publishStatus(msg, "idle")
				continue
			}
			k.handle(q, k.shellMux)
			if msg.Header.MsgType == "execute_request" {
				return // it ran normally; the dispatcher takes it from here
			}
		default:
			return
		}
	}
}

func (k *Kernel) userExpressions(exprs map[string]string) map[string]any {
	out := map[string]any{}
	names := make([]string, 0, len(exprs))
	for n := range exprs {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		v, err := k.runCell(exprs[n], discard{})
		if err != nil {
			ename, evalue, tb := describeError(err)
			out[n] = map[string]any{"status": "error", "ename": ename, "evalue": evalue, "traceback": tb}
			continue
		}
		b := k.render(v)
		out[n] = map[string]any{"status": "ok", "data": b.Data, "metadata": b.Metadata}
	}
	return out
}

func (k *Kernel) isComplete(r *Request) {
	var req struct {
		Code string `json:"code"`
	}
	_ = r.Decode(&req)
	status, indent := k.lang.IsComplete(req.Code)
	content := map[string]any{"status": status}
	if status == "incomplete" {
		content["indent"] = indent
	}
	r.Reply("is_complete_reply", content)
}

func (k *Kernel) complete(r *Request) {
	var req struct {
		Code      string `json:"code"`
		CursorPos *int   `json:"cursor_pos"`
	}
	_ = r.Decode(&req)
	cur := len([]rune(req.Code))
	if req.CursorPos != nil && *req.CursorPos >= 0 && *req.CursorPos <= cur {
		cur = *req.CursorPos
	}
	matches, start, end := k.lang.Complete(req.Code, cur)
	if matches == nil {
		matches = []string{}
	}
	r.Reply("complete_reply", map[string]any{"status": "ok", "matches": matches,
		"cursor_start": start, "cursor_end": end, "metadata": map[string]any{}})
}

func (k *Kernel) inspect(r *Request) {
	var req struct {
		Code        string `json:"code"`
		CursorPos   *int   `json:"cursor_pos"`
		DetailLevel int    `json:"detail_level"`
	}
	_ = r.Decode(&req)
	cur := len([]rune(req.Code))
	if req.CursorPos != nil && *req.CursorPos >= 0 && *req.CursorPos <= cur {
		cur = *req.CursorPos
	}
	text, found := k.lang.Inspect(req.Code, cur)
	data := map[string]any{}
	if found {
		data[display.Text] = text
	}
	r.Reply("inspect_reply", map[string]any{"status": "ok", "found": found, "data": data, "metadata": map[string]any{}})
}

// historySession is the session number history entries carry: this kernel
// keeps the history of its own session only.
const historySession = 1

func (k *Kernel) historyRequest(r *Request) {
	var req struct {
		Output         bool   `json:"output"`
		Raw            bool   `json:"raw"`
		HistAccessType string `json:"hist_access_type"`
		Session        int    `json:"session"`
		Start          int    `json:"start"`
		Stop           int    `json:"stop"`
		N              int    `json:"n"`
		Pattern        string `json:"pattern"`
		Unique         bool   `json:"unique"`
	}
	_ = r.Decode(&req)
	var picked []historyEntry
	switch req.HistAccessType {
	case "range":
		if req.Session == 0 || req.Session == historySession || req.Session == -1 {
			for _, h := range k.history {
				if h.line >= req.Start && (req.Stop <= 0 || h.line < req.Stop) {
					picked = append(picked, h)
				}
			}
		}
	case "search":
		pattern := req.Pattern
		if pattern == "" {
			pattern = "*"
		}
		seen := map[string]bool{}
		// Newest first, so "unique" keeps the latest of each input.
		for i := len(k.history) - 1; i >= 0; i-- {
			h := k.history[i]
			if !globMatch(pattern, h.input) {
				continue
			}
			if req.Unique {
				if seen[h.input] {
					continue
				}
				seen[h.input] = true
			}
			picked = append([]historyEntry{h}, picked...)
			if req.N > 0 && len(picked) == req.N {
				break
			}
		}
	default: // "tail"
		picked = k.history
		if req.N > 0 && len(picked) > req.N {
			picked = picked[len(picked)-req.N:]
		}
	}
	rows := make([]any, 0, len(picked))
	for _, h := range picked {
		if req.Output {
			rows = append(rows, []any{historySession, h.line, []any{h.input, h.output}})
		} else {
			rows = append(rows, []any{historySession, h.line, h.input})
		}
	}
	r.Reply("history_reply", map[string]any{"status": "ok", "history": rows})
}

// cellOutput forwards what a cell produces to iopub; help text goes to the
// front end's pager through the reply's page payload.
type cellOutput struct {
	r      *Request
	silent bool
	pages  []string
}

// Page implements lang.Pager.
func (o *cellOutput) Page(text string) {
	if !o.silent {
		o.pages = append(o.pages, text)
	}
}

func (o *cellOutput) Stdout(text string) { o.stream("stdout", text) }
func (o *cellOutput) Stderr(text string) { o.stream("stderr", text) }

func (o *cellOutput) stream(name, text string) {
	if o.silent || text == "" {
		return
	}
	o.r.Publish("stream", map[string]any{"name": name, "text": text})
}

func (o *cellOutput) Display(v any, id string)       { o.display("display_data", v, id) }
func (o *cellOutput) UpdateDisplay(v any, id string) { o.display("update_display_data", v, id) }

func (o *cellOutput) display(msgType string, v any, id string) {
	if o.silent {
		return
	}
	b := o.r.k.render(v)
	transient := map[string]any{}
	if id != "" {
		transient["display_id"] = id
	}
	o.r.Publish(msgType, map[string]any{"data": b.Data, "metadata": b.Metadata, "transient": transient})
}

func (o *cellOutput) ClearOutput(wait bool) {
	if !o.silent {
		o.r.Publish("clear_output", map[string]any{"wait": wait})
	}
}

// discard is an Output that drops everything (user_expressions).
type discard struct{}

func (discard) Stdout(string)             {}
func (discard) Stderr(string)             {}
func (discard) Display(any, string)       {}
func (discard) UpdateDisplay(any, string) {}
func (discard) ClearOutput(bool)          {}

// render renders a value for the front end. A renderer that panics must not
// cost the cell its reply: the panic becomes a text note instead.
func (k *Kernel) render(v any) display.Bundle {
	b, err := display.RenderSafe(v, display.Options{})
	if err != nil {
		k.log.Print(err)
	}
	return b
}

// historySummary is what history keeps of a result: its first line, at most
// 200 bytes. Keeping every result's full text would hold megabytes per
// cell for the life of the kernel; the notebook itself has the outputs.
func historySummary(v any) any {
	s, ok := v.(string)
	if !ok {
		return nil
	}
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		s = s[:i] + " ..."
	}
	if len(s) > 200 {
		s = strings.ToValidUTF8(s[:200], "") + " ..."
	}
	return s
}
