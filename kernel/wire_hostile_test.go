package kernel_test

import (
	"bufio"
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"net"
	"os"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/go-zeromq/zmq4"

	"lsys/kernel"
)

// Regression tests for issue 10: nothing a peer sends, with or without the
// key, may crash, stall or bloat the kernel. Each test names the numbered
// case of the issue it covers. The memory probes and the 5,000 greetings
// are long; they run with -long.

var long = flag.Bool("long", false, "run the long wire probes (memory under large unsigned messages, 5,000 bad greetings)")

// ports of a wire client's kernel, in the order shell, control, stdin,
// iopub, heartbeat.
func (c *wireClient) ports() []int {
	var conn kernel.Connection
	b, _ := os.ReadFile(c.cmd.Args[2])
	json.Unmarshal(b, &conn)
	return []int{conn.ShellPort, conn.ControlPort, conn.StdinPort, conn.IOPubPort, conn.HBPort}
}

func (c *wireClient) alive() {
	c.t.Helper()
	select {
	case err := <-c.exited:
		c.t.Fatalf("the kernel exited (%v)\nstderr:\n%s", err, c.stderr)
	default:
	}
}

// status reads a field (VmRSS, VmHWM) of the kernel's /proc status, in MB.
func (c *wireClient) memMB(field string) float64 {
	b, err := os.ReadFile(fmt.Sprintf("/proc/%d/status", c.cmd.Process.Pid))
	if err != nil {
		c.t.Fatal(err)
	}
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		if f := strings.Fields(sc.Text()); len(f) >= 2 && f[0] == field+":" {
			kb, _ := strconv.ParseFloat(f[1], 64)
			return kb / 1024
		}
	}
	c.t.Fatalf("no %s in /proc status", field)
	return 0
}

func (c *wireClient) fds() int {
	es, err := os.ReadDir(fmt.Sprintf("/proc/%d/fd", c.cmd.Process.Pid))
	if err != nil {
		c.t.Fatal(err)
	}
	return len(es)
}

// rawPeer completes a ZMTP handshake by hand as sockType (with an identity
// if id is not empty) and returns the connection for raw frames.
func rawPeer(t *testing.T, port int, sockType, id string) net.Conn {
	t.Helper()
	c, err := net.DialTimeout("tcp", fmt.Sprintf("127.0.0.1:%d", port), 5*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { c.Close() })
	if _, err := c.Write(cat(greeting(), ready(sockType, id))); err != nil {
		t.Fatal(err)
	}
	// The kernel's greeting (64 bytes) and READY (a short command frame).
	c.SetReadDeadline(time.Now().Add(5 * time.Second))
	hdr := make([]byte, 66)
	if _, err := io.ReadFull(c, hdr); err != nil {
		t.Fatalf("handshake with port %d: %v", port, err)
	}
	if _, err := io.ReadFull(c, make([]byte, hdr[65])); err != nil {
		t.Fatalf("handshake with port %d: %v", port, err)
	}
	c.SetReadDeadline(time.Time{})
	return c
}

// TestZMTPCrashCases (case 1): the inputs that killed the kernel on any
// port, before any signature check, now lose only their own connection.
func TestZMTPCrashCases(t *testing.T) {
	c := startWire(t)
	if r := c.execute("kept = 41"); r["status"] != "ok" {
		t.Fatalf("binding failed: %v", r)
	}
	cases := map[string][]byte{
		"READY with metadata 00":     command("READY", []byte{0}),
		"READY with metadata 03 a b": command("READY", []byte{3, 'a', 'b'}),
	}
	tries := 0
	for i, port := range c.ports() {
		rdy := ready(peerTypes[i], "")
		all := map[string][]byte{
			"frame header claiming 2^62 bytes": cat(rdy, hugeHeader(1<<62)),
			"frame header claiming 2^40 bytes": cat(rdy, hugeHeader(1<<40)),
			"handshake claiming 2^62 bytes":    hugeHeader(1 << 62),
		}
		for k, v := range cases {
			all[k] = v
		}
		for name, stream := range all {
			tries++
			live := &liveKernel{ports: c.ports(), conn: kernel.Connection{Transport: "tcp", IP: "127.0.0.1"}}
			if err := sendRaw(live, port, nil, false, stream); err != nil {
				t.Errorf("port %d, %s: %v", port, name, err)
			}
			c.alive()
		}
	}
	if r := c.execute("kept + 1"); r["status"] != "ok" {
		t.Fatalf("after %d hostile connections the binding is gone: %v", tries, r)
	}
	t.Logf("%d hostile handshakes and frames over the five ports; kernel and bindings intact", tries)
}

// TestIdleConnectionDoesNotBlock (case 4): connections that send nothing,
// one on each port, do not keep a new client from kernel_info for long.
func TestIdleConnectionDoesNotBlock(t *testing.T) {
	c := startWire(t)
	for _, port := range c.ports() {
		idle, err := net.Dial("tcp", fmt.Sprintf("127.0.0.1:%d", port))
		if err != nil {
			t.Fatal(err)
		}
		defer idle.Close()
	}
	time.Sleep(100 * time.Millisecond) // let the kernel accept them
	d := zmq4.NewDealer(c.ctx)
	defer d.Close()
	live := &liveKernel{ports: c.ports(), conn: kernel.Connection{Transport: "tcp", IP: "127.0.0.1"}}
	if err := askKernelInfoKey(d, live.conn.Endpoint(live.ports[0]), c.signer, liveWithin); err != nil {
		t.Fatalf("a new client behind idle connections: %v", err)
	}
	// The heartbeat answers too.
	hb := zmq4.NewReq(c.ctx)
	defer hb.Close()
	if err := hb.Dial(live.conn.Endpoint(live.ports[4])); err != nil {
		t.Fatal(err)
	}
	echo := make(chan error, 1)
	go func() {
		hb.Send(zmq4.NewMsgString("ping"))
		m, err := hb.Recv()
		if err == nil && string(m.Bytes()) != "ping" {
			err = fmt.Errorf("echo %q", m.Bytes())
		}
		echo <- err
	}()
	select {
	case err := <-echo:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(liveWithin):
		t.Fatalf("no heartbeat echo within %v behind idle connections", liveWithin)
	}
}

// askKernelInfoKey is askKernelInfo with the wire client's key.
func askKernelInfoKey(d zmq4.Socket, endpoint string, signer *kernel.Signer, timeout time.Duration) error {
	done := make(chan error, 1)
	go func() {
		if err := d.Dial(endpoint); err != nil {
			done <- err
			return
		}
		m := &kernel.Message{Header: kernel.Header{MsgID: fmt.Sprint(time.Now().UnixNano()), Session: "idle-test", Username: "test",
			Date: time.Now().UTC().Format(time.RFC3339Nano), MsgType: "kernel_info_request", Version: kernel.ProtocolVersion}}
		frames, _ := kernel.Encode(m, signer)
		if err := d.Send(zmq4.NewMsgFrom(frames...)); err != nil {
			done <- err
			return
		}
		for {
			r, err := d.Recv()
			if err != nil {
				done <- err
				return
			}
			if got, err := kernel.Decode(r.Frames, signer); err == nil && got.Header.MsgType == "kernel_info_reply" {
				done <- nil
				return
			}
		}
	}()
	select {
	case err := <-done:
		return err
	case <-time.After(timeout):
		return fmt.Errorf("no kernel_info_reply within %v", timeout)
	}
}

// TestBadGreetingsDoNotLeak (case 5): connections whose greeting fails are
// closed at once; the kernel's descriptors come back to where they were.
func TestBadGreetingsDoNotLeak(t *testing.T) {
	c := startWire(t)
	n := 1000
	if *long {
		n = 5000
	}
	before := c.fds()
	port := c.ports()[0]
	var wg sync.WaitGroup
	sem := make(chan struct{}, 16)
	for i := 0; i < n; i++ {
		wg.Add(1)
		sem <- struct{}{}
		go func() {
			defer wg.Done()
			defer func() { <-sem }()
			conn, err := net.Dial("tcp", fmt.Sprintf("127.0.0.1:%d", port))
			if err != nil {
				return
			}
			defer conn.Close()
			conn.Write(bytes.Repeat([]byte{0x42}, 64))
			conn.SetReadDeadline(time.Now().Add(5 * time.Second))
			io.Copy(io.Discard, conn) // until the kernel closes it
		}()
	}
	wg.Wait()
	c.alive()
	after := 0
	for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline); time.Sleep(50 * time.Millisecond) {
		if after = c.fds(); after <= before+5 {
			break
		}
	}
	if after > before+5 {
		t.Fatalf("after %d bad greetings the kernel holds %d descriptors; %d before", n, after, before)
	}
	if r := c.execute("1 + 1"); r["status"] != "ok" {
		t.Fatalf("kernel after %d bad greetings: %v", n, r)
	}
	t.Logf("%d bad greetings: descriptors %d before, %d after", n, before, after)
}

// TestDuplicateIdentityGetsNoReplies (case 6): a second connection that
// claims a client's identity on shell receives none of its replies.
func TestDuplicateIdentityGetsNoReplies(t *testing.T) {
	c := startWire(t) // its shell dealer's identity is "wire-shell"
	thief := zmq4.NewDealer(c.ctx, zmq4.WithID(zmq4.SocketIdentity("wire-shell")))
	defer thief.Close()
	thief.Dial(fmt.Sprintf("tcp://127.0.0.1:%d", c.ports()[0])) // refused by the kernel after the handshake
	got := make(chan zmq4.Msg, 8)
	go func() {
		for {
			m, err := thief.Recv()
			if err != nil {
				return
			}
			got <- m
		}
	}()
	if r := c.execute("secret = 7"); r["status"] != "ok" {
		t.Fatalf("the client lost its replies: %v", r)
	}
	c.request(c.shell, "history_request", map[string]any{"hist_access_type": "tail", "n": 10, "output": false, "raw": true}, "")
	c.recvReply(c.shell, "history_reply", 5*time.Second)
	select {
	case m := <-got:
		t.Fatalf("a peer claiming the client's identity received %d frames: %q", len(m.Frames), m.Frames)
	case <-time.After(500 * time.Millisecond):
	}
}

// TestReplayedRequestRunsOnce (case 7): the same signed execute_request
// sent again is refused.
func TestReplayedRequestRunsOnce(t *testing.T) {
	c := startWire(t)
	if r := c.execute("count = 0"); r["status"] != "ok" {
		t.Fatal(r)
	}
	body, _ := json.Marshal(map[string]any{"code": "count = count + 1", "silent": false})
	m := &kernel.Message{Header: kernel.Header{MsgID: "replay-1", Session: c.session, Username: "test",
		Date: time.Now().UTC().Format(time.RFC3339), MsgType: "execute_request", Version: kernel.ProtocolVersion}, Content: body}
	frames, _ := kernel.Encode(m, c.signer)
	const sends = 20
	for i := 0; i < sends; i++ {
		if err := c.shell.Send(zmq4.NewMsgFrom(frames...)); err != nil {
			t.Fatal(err)
		}
	}
	// The same request with its signature in upper case is the same MAC.
	upper := append([][]byte{}, frames...)
	upper[1] = bytes.ToUpper(frames[1])
	c.shell.Send(zmq4.NewMsgFrom(upper...))
	c.recvReply(c.shell, "execute_reply", 10*time.Second)
	if v := c.resultOf(t, "count"); v != "1" {
		t.Fatalf("after %d copies of one request, count is %s; replays ran", sends+1, v)
	}
}

// resultOf runs code and returns the text/plain of its execute_result.
func (c *wireClient) resultOf(t *testing.T, code string) string {
	t.Helper()
	id := c.request(c.shell, "execute_request", map[string]any{"code": code, "silent": false}, "")
	deadline := time.Now().Add(10 * time.Second)
	for {
		m, err := c.recv(c.iopub, time.Until(deadline))
		if err != nil {
			t.Fatalf("waiting for the result of %q: %v", code, err)
		}
		var parent kernel.Header
		json.Unmarshal(m.ParentRaw, &parent)
		if m.Header.MsgType != "execute_result" || parent.MsgID != id {
			continue
		}
		var content struct {
			Data map[string]any `json:"data"`
		}
		json.Unmarshal(m.Content, &content)
		s, _ := content.Data["text/plain"].(string)
		return s
	}
}

// TestMalformedHeaderGetsErrorReply (case 8): a signed request whose header
// has a field of the wrong JSON type is answered with an error reply.
func TestMalformedHeaderGetsErrorReply(t *testing.T) {
	c := startWire(t)
	header := []byte(`{"msg_id": 12, "session": "wire-test", "username": "test", "date": "", "msg_type": "kernel_info_request", "version": "5.3"}`)
	parent, meta, content := []byte("{}"), []byte("{}"), []byte("{}")
	sig := c.signer.Sign(header, parent, meta, content)
	if err := c.shell.Send(zmq4.NewMsgFrom([]byte("<IDS|MSG>"), []byte(sig), header, parent, meta, content)); err != nil {
		t.Fatal(err)
	}
	m := c.recvReply(c.shell, "kernel_info_reply", 5*time.Second)
	var reply struct {
		Status string `json:"status"`
		Ename  string `json:"ename"`
		Evalue string `json:"evalue"`
	}
	json.Unmarshal(m.Content, &reply)
	if reply.Status != "error" || reply.Ename != "ProtocolError" || !strings.Contains(reply.Evalue, "msg_id") {
		t.Fatalf("reply to a malformed header: %s", m.Content)
	}
	if !bytes.Equal(m.ParentRaw, header) {
		t.Errorf("parent header %s; want the request's header as sent", m.ParentRaw)
	}
}

// TestHistorySearchSlash (case 8): history search matches like Jupyter's,
// where "/" is an ordinary character.
func TestHistorySearchSlash(t *testing.T) {
	c := startWire(t)
	c.execute("half = 1 / 2")
	c.execute("other = 3")
	c.request(c.shell, "history_request", map[string]any{"hist_access_type": "search", "pattern": "*/*", "output": false, "raw": true}, "")
	m := c.recvReply(c.shell, "history_reply", 5*time.Second)
	var reply struct {
		History [][]any `json:"history"`
	}
	json.Unmarshal(m.Content, &reply)
	if len(reply.History) != 1 || reply.History[0][2] != "half = 1 / 2" {
		t.Fatalf("search */* found %v; want the cell with a slash", reply.History)
	}
}

// drainIOPub drops what iopub has delivered so far.
func (c *wireClient) drainIOPub() {
	for {
		if _, err := c.recv(c.iopub, 200*time.Millisecond); err != nil {
			return
		}
	}
}

// outputOf runs code and returns the bytes of stream output its request
// got on iopub (between busy and idle).
func (c *wireClient) outputOf(t *testing.T, code string) int {
	t.Helper()
	id := c.request(c.shell, "execute_request", map[string]any{"code": code, "silent": false}, "")
	n := 0
	deadline := time.Now().Add(30 * time.Second)
	for {
		m, err := c.recv(c.iopub, time.Until(deadline))
		if err != nil {
			t.Fatalf("iopub output of %q: %v\nkernel stderr:\n%s", code, err, c.stderr)
		}
		var parent kernel.Header
		json.Unmarshal(m.ParentRaw, &parent)
		if parent.MsgID != id {
			continue
		}
		switch m.Header.MsgType {
		case "stream":
			var s struct {
				Text string `json:"text"`
			}
			json.Unmarshal(m.Content, &s)
			n += len(s.Text)
		case "status":
			if strings.Contains(string(m.Content), `"idle"`) {
				c.recvReply(c.shell, "execute_reply", 10*time.Second)
				return n
			}
		}
	}
}

// TestSlowSubscriberDoesNotStallOutput (case 2): an iopub subscriber that
// stops reading does not stop output for the others, and what the kernel
// keeps for it is bounded.
func TestSlowSubscriberDoesNotStallOutput(t *testing.T) {
	c := startWire(t)
	stalled := rawPeer(t, c.ports()[3], "SUB", "")
	if _, err := stalled.Write(frame(0, []byte{1})); err != nil { // everything, never read
		t.Fatal(err)
	}
	time.Sleep(200 * time.Millisecond)
	c.drainIOPub()
	base := c.memMB("VmRSS")
	cells := 40
	if *long {
		cells = 400
	}
	total := 0
	for i := 0; i < cells; i++ {
		n := c.outputOf(t, "print(identity(300))")
		if n == 0 {
			t.Fatalf("cell %d of %d: its output never reached the reading subscriber", i+1, cells)
		}
		total += n
	}
	rss, peak := c.memMB("VmRSS"), c.memMB("VmHWM")
	t.Logf("%d cells, %.1f MB of output, all received past a stalled subscriber; kernel RSS %.0f MB before, %.0f MB after, peak %.0f MB",
		cells, float64(total)/1e6, base, rss, peak)
	// The stalled subscriber's queue is bounded (32 MiB); upstream grew by
	// about 1.1 MB per MB of output.
	if float64(total)/1e6 > 100 && rss-base > 100 {
		t.Errorf("RSS grew by %.0f MB over %.0f MB of output", rss-base, float64(total)/1e6)
	}
}

// TestMemoryUnderLargeUnsignedMessages (case 3): large unsigned messages on
// stdin and iopub (which the kernel does not serve) and on shell are not
// held; memory stays bounded. Without -long, one batch, and no messages
// that shell takes whole.
func TestMemoryUnderLargeUnsignedMessages(t *testing.T) {
	c := startWire(t)
	if r := c.execute("kept = 1"); r["status"] != "ok" {
		t.Fatal(r)
	}
	ports := c.ports()
	blast := func(port int, sockType string, n, size int) (sent int) {
		payload := make([]byte, size)
		var wg sync.WaitGroup
		var mu sync.Mutex
		for i := 0; i < n; i++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				conn := rawPeer(t, port, sockType, "")
				defer conn.Close()
				// A long frame header, then the payload (not copied).
				_, err := conn.Write(hugeHeader(uint64(len(payload))))
				if err == nil {
					_, err = conn.Write(payload)
				}
				if err == nil {
					mu.Lock()
					sent++
					mu.Unlock()
				}
				conn.(*net.TCPConn).CloseWrite()
				conn.SetReadDeadline(time.Now().Add(30 * time.Second))
				io.Copy(io.Discard, conn)
			}()
		}
		wg.Wait()
		return sent
	}
	base := c.memMB("VmRSS")
	batches := 1
	if *long {
		batches = 4
	}
	for batch := 1; batch <= batches; batch++ {
		s1 := blast(ports[2], "DEALER", 10, 50e6)
		s2 := blast(ports[3], "SUB", 10, 50e6)
		c.alive()
		t.Logf("batch %d: 10 x 50 MB to stdin (%d written whole), 10 x 50 MB to iopub (%d); RSS %.0f MB, peak %.0f MB",
			batch, s1, s2, c.memMB("VmRSS"), c.memMB("VmHWM"))
	}
	s := blast(ports[0], "DEALER", 30, 100e6)
	t.Logf("30 x 100 MB at once to shell (%d written whole); RSS %.0f MB, peak %.0f MB", s, c.memMB("VmRSS"), c.memMB("VmHWM"))
	if *long {
		s = blast(ports[0], "DEALER", 30, 60e6)
		t.Logf("30 x 60 MB at once to shell (%d written whole); RSS %.0f MB, peak %.0f MB", s, c.memMB("VmRSS"), c.memMB("VmHWM"))
	} else if peak := c.memMB("VmHWM"); peak > base+64 {
		// Everything so far is refused at its frame header.
		t.Errorf("peak RSS %.0f MB from %.0f MB at start; refused messages were read", peak, base)
	}
	if r := c.execute("kept + 1"); r["status"] != "ok" {
		t.Fatalf("after the probes: %v", r)
	}
	peak := c.memMB("VmHWM")
	t.Logf("RSS %.0f MB at start; peak %.0f MB", base, peak)
	if peak > 1024 {
		t.Errorf("peak RSS %.0f MB; the in-flight bounds should keep it well under 1 GB", peak)
	}
}

// TestHeartbeatPastPeerThatDoesNotRead: a heartbeat peer that sends pings
// and never reads the echoes does not delay the echoes of another.
func TestHeartbeatPastPeerThatDoesNotRead(t *testing.T) {
	c := startWire(t)
	hog := rawPeer(t, c.ports()[4], "DEALER", "")
	ping := cat(frame(1, nil), frame(0, make([]byte, 60<<10)))
	go func() {
		for i := 0; i < 2000; i++ { // 120 MB of pings, none of the echoes read
			if _, err := hog.Write(ping); err != nil {
				return
			}
		}
	}()
	time.Sleep(300 * time.Millisecond)
	for i := 0; i < 5; i++ {
		msg := []byte(fmt.Sprintf("beat %d", i))
		if err := c.hb.Send(zmq4.NewMsg(msg)); err != nil {
			t.Fatal(err)
		}
		echo := make(chan error, 1)
		go func() {
			m, err := c.hb.Recv()
			if err == nil && !bytes.Equal(m.Bytes(), msg) {
				err = fmt.Errorf("echo %q; want %q", m.Bytes(), msg)
			}
			echo <- err
		}()
		select {
		case err := <-echo:
			if err != nil {
				t.Fatal(err)
			}
		case <-time.After(liveWithin):
			t.Fatalf("heartbeat %d not echoed within %v while another peer does not read its echoes", i, liveWithin)
		}
	}
	c.alive()
}

// liveWithin bounds the liveness checks: a kernel blocked by a bad peer
// stalls for the 30 s write timeout or for ever, so 3 s tells the two apart
// while leaving room for a loaded machine (the reply itself takes
// milliseconds; 1 s failed once in ten runs on a machine shared by six
// builds).
const liveWithin = 3 * time.Second
