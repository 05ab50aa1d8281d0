package kernel_test

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/go-zeromq/zmq4"

	"lsys/kernel"
)

// wireClient speaks the wire protocol to a kernel subprocess directly, so the
// tests see exactly what goes over the sockets.
type wireClient struct {
	t                     *testing.T
	ctx                   context.Context
	cancel                context.CancelFunc
	shell, control, iopub zmq4.Socket
	hb                    zmq4.Socket
	signer                *kernel.Signer
	session               string
	cmd                   *exec.Cmd
	stderr                *syncBuffer
	exited                chan error

	mu      sync.Mutex
	inboxes map[zmq4.Socket]chan received
}

type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

func freePorts(t *testing.T, n int) []int {
	var ports []int
	var ls []net.Listener
	for i := 0; i < n; i++ {
		l, err := net.Listen("tcp", "127.0.0.1:0")
		if err != nil {
			t.Fatal(err)
		}
		ls = append(ls, l)
		ports = append(ports, l.Addr().(*net.TCPAddr).Port)
	}
	for _, l := range ls {
		l.Close()
	}
	return ports
}

func startWire(t *testing.T) *wireClient {
	t.Helper()
	return startWireEnv(t, nil)
}

// startWireEnv is startWire with extra environment variables for the kernel.
func startWireEnv(t *testing.T, env []string) *wireClient {
	t.Helper()
	bin, _ := buildKernel(t)
	p := freePorts(t, 5)
	key := "a-test-key-that-is-not-secret"
	conn := kernel.Connection{Transport: "tcp", IP: "127.0.0.1", ShellPort: p[0], ControlPort: p[1],
		StdinPort: p[2], IOPubPort: p[3], HBPort: p[4], SignatureScheme: "hmac-sha256", Key: key}
	b, _ := json.Marshal(conn)
	cf := filepath.Join(t.TempDir(), "connection.json")
	if err := os.WriteFile(cf, b, 0o600); err != nil {
		t.Fatal(err)
	}
	c := &wireClient{t: t, session: "wire-test", stderr: &syncBuffer{}, exited: make(chan error, 1)}
	c.signer, _ = kernel.NewSigner("hmac-sha256", key)
	c.cmd = exec.Command(bin, "kernel", cf)
	c.cmd.Env = append(os.Environ(), env...)
	c.cmd.Stderr = c.stderr
	if err := c.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { c.exited <- c.cmd.Wait() }()
	c.ctx, c.cancel = context.WithCancel(context.Background())
	c.shell = zmq4.NewDealer(c.ctx, zmq4.WithID(zmq4.SocketIdentity("wire-shell")))
	c.control = zmq4.NewDealer(c.ctx, zmq4.WithID(zmq4.SocketIdentity("wire-control")))
	c.iopub = zmq4.NewSub(c.ctx)
	c.hb = zmq4.NewReq(c.ctx)
	dial := func(s zmq4.Socket, port int) {
		deadline := time.Now().Add(10 * time.Second)
		for {
			err := s.Dial(conn.Endpoint(port))
			if err == nil {
				return
			}
			if time.Now().After(deadline) {
				t.Fatalf("dial %d: %v\nkernel stderr:\n%s", port, err, c.stderr)
			}
			time.Sleep(50 * time.Millisecond)
		}
	}
	dial(c.shell, p[0])
	dial(c.control, p[1])
	dial(c.iopub, p[3])
	dial(c.hb, p[4])
	if err := c.iopub.SetOption(zmq4.OptionSubscribe, ""); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if c.cmd.ProcessState == nil {
			c.cmd.Process.Kill()
		}
		c.cancel()
		for _, s := range []zmq4.Socket{c.shell, c.control, c.iopub, c.hb} {
			s.Close()
		}
	})
	// The kernel is up once kernel_info is answered.
	c.request(c.shell, "kernel_info_request", map[string]any{}, "")
	c.recvReply(c.shell, "kernel_info_reply", 10*time.Second)
	return c
}

// request sends a message; sig overrides the signature ("" signs properly,
// "-" sends an empty signature).
func (c *wireClient) request(sock zmq4.Socket, msgType string, content any, sig string) string {
	body, _ := json.Marshal(content)
	id := fmt.Sprintf("%s-%d", msgType, time.Now().UnixNano())
	m := &kernel.Message{Header: kernel.Header{MsgID: id, Session: c.session, Username: "test",
		Date: time.Now().UTC().Format(time.RFC3339), MsgType: msgType, Version: kernel.ProtocolVersion}, Content: body}
	frames, err := kernel.Encode(m, c.signer)
	if err != nil {
		c.t.Fatal(err)
	}
	switch sig {
	case "":
	case "-":
		frames[1] = []byte{}
	default:
		frames[1] = []byte(sig)
	}
	if err := sock.Send(zmq4.NewMsgFrom(frames...)); err != nil {
		c.t.Fatal(err)
	}
	return id
}

func (c *wireClient) recv(sock zmq4.Socket, timeout time.Duration) (*kernel.Message, error) {
	ch := c.inbox(sock)
	select {
	case r := <-ch:
		if r.err != nil {
			return nil, r.err
		}
		return kernel.Decode(r.m.Frames, c.signer)
	case <-time.After(timeout):
		return nil, fmt.Errorf("no message within %v", timeout)
	}
}

type received struct {
	m   zmq4.Msg
	err error
}

// inbox returns the channel fed by the one reader goroutine of sock, so a
// receive that timed out cannot swallow a later message.
func (c *wireClient) inbox(sock zmq4.Socket) chan received {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.inboxes == nil {
		c.inboxes = map[zmq4.Socket]chan received{}
	}
	ch, ok := c.inboxes[sock]
	if !ok {
		ch = make(chan received, 1024)
		c.inboxes[sock] = ch
		go func() {
			for {
				m, err := sock.Recv()
				ch <- received{m, err}
				if err != nil {
					return
				}
			}
		}()
	}
	return ch
}

// recvReply waits for a reply of msgType, skipping others.
func (c *wireClient) recvReply(sock zmq4.Socket, msgType string, timeout time.Duration) *kernel.Message {
	c.t.Helper()
	deadline := time.Now().Add(timeout)
	for {
		m, err := c.recv(sock, time.Until(deadline))
		if err != nil {
			c.t.Fatalf("waiting for %s: %v\nkernel stderr:\n%s", msgType, err, c.stderr)
		}
		if m.Header.MsgType == msgType {
			return m
		}
	}
}

func (c *wireClient) execute(code string) map[string]any {
	c.t.Helper()
	c.request(c.shell, "execute_request", map[string]any{"code": code, "silent": false, "store_history": true,
		"user_expressions": map[string]any{}, "allow_stdin": false, "stop_on_error": true}, "")
	m := c.recvReply(c.shell, "execute_reply", 30*time.Second)
	var content map[string]any
	json.Unmarshal(m.Content, &content)
	return content
}

func TestForgedAndUnsignedAreNotExecuted(t *testing.T) {
	c := startWire(t)
	for _, sig := range []string{strings.Repeat("ab", 32), "-"} {
		c.request(c.shell, "execute_request", map[string]any{"code": "marker = 1", "silent": false}, sig)
	}
	// The kernel still answers, and the marker was never bound.
	r := c.execute("marker + 1")
	if r["status"] != "error" {
		t.Fatalf("a forged or unsigned execute_request was executed: %v", r)
	}
	// stderr reaches the test through a pipe copier of its own, so the log
	// line may trail the reply a little.
	logged := false
	for deadline := time.Now().Add(3 * time.Second); time.Now().Before(deadline); time.Sleep(20 * time.Millisecond) {
		if strings.Count(c.stderr.String(), "dropped") >= 2 {
			logged = true
			break
		}
	}
	if !logged {
		t.Errorf("the two dropped messages were not both logged; stderr:\n%s", c.stderr)
	}
	if r := c.execute("ok = 2"); r["status"] != "ok" {
		t.Fatalf("kernel did not answer a properly signed request: %v", r)
	}
}

func TestHeartbeatWhileCellRuns(t *testing.T) {
	c := startWire(t)
	c.request(c.shell, "execute_request", map[string]any{"code": "pause(5)", "silent": false}, "")
	time.Sleep(300 * time.Millisecond)
	start := time.Now()
	for i := 0; time.Since(start) < 4*time.Second; i++ {
		ping := []byte(fmt.Sprintf("ping %d", i))
		if err := c.hb.Send(zmq4.NewMsg(ping)); err != nil {
			t.Fatal(err)
		}
		type res struct {
			m   zmq4.Msg
			err error
		}
		ch := make(chan res, 1)
		go func() { m, err := c.hb.Recv(); ch <- res{m, err} }()
		select {
		case r := <-ch:
			if r.err != nil || !bytes.Equal(r.m.Bytes(), ping) {
				t.Fatalf("heartbeat echo %q, %v; want %q", r.m.Bytes(), r.err, ping)
			}
		case <-time.After(time.Second):
			t.Fatalf("heartbeat not echoed within 1 s while a cell runs")
		}
		time.Sleep(250 * time.Millisecond)
	}
	m := c.recvReply(c.shell, "execute_reply", 10*time.Second)
	if !strings.Contains(string(m.Content), `"ok"`) {
		t.Fatalf("pause(5) did not finish ok: %s", m.Content)
	}
}

func TestInterruptKeepsBindings(t *testing.T) {
	c := startWire(t)
	if r := c.execute("kept = 41"); r["status"] != "ok" {
		t.Fatalf("binding failed: %v", r)
	}
	c.request(c.shell, "execute_request", map[string]any{"code": "pause(60)", "silent": false}, "")
	time.Sleep(500 * time.Millisecond)
	sent := time.Now()
	c.request(c.control, "interrupt_request", map[string]any{}, "")
	c.recvReply(c.control, "interrupt_reply", 5*time.Second)
	m := c.recvReply(c.shell, "execute_reply", 5*time.Second)
	if d := time.Since(sent); d > time.Second {
		t.Fatalf("interrupted cell ended %v after the interrupt; want within 1 s", d)
	}
	if !strings.Contains(string(m.Content), `"error"`) {
		t.Fatalf("interrupted cell reply: %s", m.Content)
	}
	r := c.execute("kept + 1")
	if r["status"] != "ok" {
		t.Fatalf("after the interrupt: %v", r)
	}
}

func TestShutdownWithRestart(t *testing.T) {
	c := startWire(t)
	c.request(c.control, "shutdown_request", map[string]any{"restart": true}, "")
	m := c.recvReply(c.control, "shutdown_reply", 5*time.Second)
	var content struct {
		Status  string `json:"status"`
		Restart bool   `json:"restart"`
	}
	json.Unmarshal(m.Content, &content)
	if content.Status != "ok" || !content.Restart {
		t.Fatalf("shutdown_reply %s", m.Content)
	}
	select {
	case err := <-c.exited:
		if err != nil {
			t.Fatalf("kernel exited with %v\n%s", err, c.stderr)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("kernel did not exit within 5 s of shutdown_request")
	}
}

// TestStopOnErrorAbortsQueued: requests queued behind a failing cell are
// answered "aborted" and not run (stop_on_error, the protocol's default).
func TestStopOnErrorAbortsQueued(t *testing.T) {
	c := startWire(t)
	c.request(c.shell, "execute_request", map[string]any{"code": "pause(0.3)\nno_such_name", "silent": false, "stop_on_error": true}, "")
	c.request(c.shell, "execute_request", map[string]any{"code": "after_error = 1", "silent": false}, "")
	var statuses []string
	for len(statuses) < 2 {
		m := c.recvReply(c.shell, "execute_reply", 10*time.Second)
		var content struct {
			Status string `json:"status"`
		}
		json.Unmarshal(m.Content, &content)
		statuses = append(statuses, content.Status)
	}
	if statuses[0] != "error" || statuses[1] != "aborted" {
		t.Fatalf("replies %v; want [error aborted]", statuses)
	}
	if r := c.execute("after_error"); r["status"] != "error" {
		t.Fatalf("an aborted cell was run: %v", r)
	}
}

// TestIOPubAroundExecute: busy, execute_input, the result and idle, each
// with the request as parent header.
func TestIOPubAroundExecute(t *testing.T) {
	c := startWire(t)
	// Let the subscription settle, then drain what kernel_info produced.
	time.Sleep(300 * time.Millisecond)
	for {
		if _, err := c.recv(c.iopub, 200*time.Millisecond); err != nil {
			break
		}
	}
	id := c.request(c.shell, "execute_request", map[string]any{"code": "print(\"x\")\n6 * 7", "silent": false, "store_history": true}, "")
	var got []string
	for len(got) == 0 || got[len(got)-1] != "status:idle" {
		m, err := c.recv(c.iopub, 10*time.Second)
		if err != nil {
			t.Fatalf("iopub: %v (so far %v)", err, got)
		}
		var parent kernel.Header
		json.Unmarshal(m.ParentRaw, &parent)
		if parent.MsgID != id {
			t.Fatalf("iopub %s has parent %q; want %q", m.Header.MsgType, parent.MsgID, id)
		}
		name := m.Header.MsgType
		if name == "status" {
			var s struct {
				State string `json:"execution_state"`
			}
			json.Unmarshal(m.Content, &s)
			name += ":" + s.State
		}
		got = append(got, name)
	}
	want := "status:busy execute_input stream execute_result status:idle"
	if strings.Join(got, " ") != want {
		t.Fatalf("iopub sequence %v; want %s", got, want)
	}
	c.recvReply(c.shell, "execute_reply", 5*time.Second)
}

// TestSIGINTInterrupts: Jupyter's signal interrupt mode sends SIGINT; it
// must end the running cell, not the kernel.
func TestSIGINTInterrupts(t *testing.T) {
	c := startWire(t)
	c.request(c.shell, "execute_request", map[string]any{"code": "pause(60)", "silent": false}, "")
	time.Sleep(500 * time.Millisecond)
	sent := time.Now()
	if err := c.cmd.Process.Signal(os.Interrupt); err != nil {
		t.Fatal(err)
	}
	c.recvReply(c.shell, "execute_reply", 5*time.Second)
	if d := time.Since(sent); d > time.Second {
		t.Fatalf("cell ended %v after SIGINT; want within 1 s", d)
	}
	if r := c.execute("1 + 1"); r["status"] != "ok" {
		t.Fatalf("kernel after SIGINT: %v", r)
	}
}

// TestShutdownOnShell: shutdown_request is also accepted on shell.
func TestShutdownOnShell(t *testing.T) {
	c := startWire(t)
	c.request(c.shell, "shutdown_request", map[string]any{"restart": false}, "")
	c.recvReply(c.shell, "shutdown_reply", 5*time.Second)
	select {
	case err := <-c.exited:
		if err != nil {
			t.Fatalf("kernel exited with %v\n%s", err, c.stderr)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("kernel did not exit within 5 s of shutdown_request on shell")
	}
}

// TestOrphanExits: a kernel whose Jupyter parent (JPY_PARENT_PID) is gone
// exits within 2 s, even with a cell running, instead of running on.
func TestOrphanExits(t *testing.T) {
	parent := exec.Command("sleep", "60")
	if err := parent.Start(); err != nil {
		t.Fatal(err)
	}
	c := startWireEnv(t, []string{fmt.Sprintf("JPY_PARENT_PID=%d", parent.Process.Pid)})
	c.request(c.shell, "execute_request", map[string]any{"code": "pause(60)", "silent": false}, "")
	time.Sleep(300 * time.Millisecond)
	parent.Process.Kill()
	parent.Wait()
	gone := time.Now()
	select {
	case <-c.exited:
		if d := time.Since(gone); d > 2*time.Second {
			t.Fatalf("kernel exited %v after its parent; want within 2 s", d)
		}
	case <-time.After(5 * time.Second):
		t.Fatalf("kernel still running 5 s after its parent ended\n%s", c.stderr)
	}
}

// TestSIGTERMDuringCell: SIGTERM interrupts the running cell and the
// kernel exits within 2 s (service managers give a few seconds).
func TestSIGTERMDuringCell(t *testing.T) {
	c := startWire(t)
	c.request(c.shell, "execute_request", map[string]any{"code": "pause(60)", "silent": false}, "")
	time.Sleep(300 * time.Millisecond)
	sent := time.Now()
	if err := c.cmd.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	select {
	case <-c.exited:
		if d := time.Since(sent); d > 2*time.Second {
			t.Fatalf("kernel exited %v after SIGTERM; want within 2 s", d)
		}
	case <-time.After(5 * time.Second):
		t.Fatalf("kernel still running 5 s after SIGTERM\n%s", c.stderr)
	}
}

// TestMemoryProbesKeepKernel: under a 64 MiB budget, a string doubled
// without end, a system stacked on itself and a sampled response with a
// horizon of 1e12 s are refused with a message; the kernel and the
// bindings made before them survive.
func TestMemoryProbesKeepKernel(t *testing.T) {
	c := startWireEnv(t, []string{"LSYS_MEMORY=64M"})
	if r := c.execute("keep = 42"); r["status"] != "ok" {
		t.Fatalf("keep = 42: %v", r)
	}
	for _, probe := range []string{
		"f(x, k) = if k == 0 then x else f(x + x, k - 1)\nf(\"ab\", 40)",
		"G = system(1/(s+1))\ng(x, k) = if k == 0 then x else g(stack(x, x), k - 1)\ng(G, 15)",
		"response(sample(1/(s+1), 0.1), step, until: 1e12)",
	} {
		if r := c.execute(probe); r["status"] != "error" {
			t.Errorf("%q: status %v, want an error", probe, r["status"])
		}
	}
	r := c.execute("keep + 1")
	if r["status"] != "ok" {
		t.Fatalf("after the probes: %v\n%s", r, c.stderr)
	}
}
