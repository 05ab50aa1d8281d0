package kernel_test

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log"
	"net"
	"os"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/go-zeromq/zmq4"

	"lsys/kernel"
)

// The ZMTP fuzzer talks raw bytes to a live kernel served in the test
// process, so a panic in any of its goroutines fails the run with the input
// that caused it, and a stall shows as a connection the kernel does not
// close or a kernel_info that gets no reply.

const fuzzKey = "fuzz-key-not-secret"

type liveKernel struct {
	conn  kernel.Connection
	ports []int // shell, control, stdin, iopub, heartbeat
}

var (
	liveOnce sync.Once
	live     *liveKernel
	liveErr  error
	execs    atomic.Int64
)

// startLive serves one kernel for the whole test process.
func startLive(t testing.TB) *liveKernel {
	liveOnce.Do(func() {
		var ports []int
		var ls []net.Listener
		for i := 0; i < 5; i++ {
			l, err := net.Listen("tcp", "127.0.0.1:0")
			if err != nil {
				liveErr = err
				return
			}
			ls = append(ls, l)
			ports = append(ports, l.Addr().(*net.TCPAddr).Port)
		}
		for _, l := range ls {
			l.Close()
		}
		c := kernel.Connection{Transport: "tcp", IP: "127.0.0.1", ShellPort: ports[0], ControlPort: ports[1],
			StdinPort: ports[2], IOPubPort: ports[3], HBPort: ports[4], SignatureScheme: "hmac-sha256", Key: fuzzKey}
		quiet := log.New(io.Discard, "", 0)
		if testing.Verbose() {
			quiet = log.New(os.Stderr, "live kernel: ", 0)
		}
		k, err := kernel.New(kernel.Config{Conn: &c, Version: "fuzz", Dir: os.TempDir(), Log: quiet})
		if err != nil {
			liveErr = err
			return
		}
		go k.Serve(context.Background())
		live = &liveKernel{conn: c, ports: ports}
		// Wait until it answers.
		deadline := time.Now().Add(10 * time.Second)
		for {
			if liveErr = live.kernelInfo(2 * time.Second); liveErr == nil || time.Now().After(deadline) {
				return
			}
		}
	})
	if liveErr != nil {
		t.Fatalf("starting a kernel in the test process: %v", liveErr)
	}
	return live
}

// kernelInfo asks for kernel_info on shell from a new client.
func (lk *liveKernel) kernelInfo(timeout time.Duration) error {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	d := zmq4.NewDealer(ctx, zmq4.WithDialerMaxRetries(0), zmq4.WithDialerTimeout(timeout))
	defer d.Close()
	return askKernelInfo(d, lk.conn.Endpoint(lk.ports[0]), timeout)
}

func askKernelInfo(d zmq4.Socket, endpoint string, timeout time.Duration) error {
	done := make(chan error, 1)
	go func() {
		if err := d.Dial(endpoint); err != nil {
			done <- err
			return
		}
		signer, _ := kernel.NewSigner("hmac-sha256", fuzzKey)
		m := &kernel.Message{Header: kernel.Header{MsgID: fmt.Sprint(time.Now().UnixNano()), Session: "fuzz", Username: "fuzz",
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
			got, err := kernel.Decode(r.Frames, signer)
			if err == nil && got.Header.MsgType == "kernel_info_reply" {
				done <- nil
				return
			}
		}
	}()
	select {
	case err := <-done:
		return err
	case <-time.After(timeout):
		return errors.New("no kernel_info_reply within " + timeout.String())
	}
}

// greeting is a valid ZMTP 3.0 greeting with the NULL mechanism.
func greeting() []byte {
	g := make([]byte, 64)
	g[0], g[9], g[10], g[11] = 0xff, 0x7f, 3, 0
	copy(g[12:], "NULL")
	return g
}

// command encodes a ZMTP command frame.
func command(name string, body []byte) []byte {
	b := append([]byte{byte(len(name))}, name...)
	b = append(b, body...)
	return frame(0x04, b)
}

// frame encodes one frame with the given flags (long form when needed).
func frame(flags byte, body []byte) []byte {
	if len(body) > 255 {
		h := make([]byte, 9)
		h[0] = flags | 0x02
		binary.BigEndian.PutUint64(h[1:], uint64(len(body)))
		return append(h, body...)
	}
	return append([]byte{flags, byte(len(body))}, body...)
}

// ready is a READY command announcing a socket type (and an identity).
func ready(sockType, id string) []byte {
	prop := func(k, v string) []byte {
		b := append([]byte{byte(len(k))}, k...)
		b = binary.BigEndian.AppendUint32(b, uint32(len(v)))
		return append(b, v...)
	}
	body := prop("Socket-Type", sockType)
	if id != "" {
		body = append(body, prop("Identity", id)...)
	}
	return command("READY", body)
}

func cat(parts ...[]byte) []byte {
	var b []byte
	for _, p := range parts {
		b = append(b, p...)
	}
	return b
}

// A compatible peer type for each of the kernel's five ports.
var peerTypes = []string{"DEALER", "DEALER", "DEALER", "SUB", "REQ"}

// hugeHeader is a long frame header announcing n bytes.
func hugeHeader(n uint64) []byte {
	h := []byte{0x02, 0, 0, 0, 0, 0, 0, 0, 0}
	binary.BigEndian.PutUint64(h[1:], n)
	return h
}

// sendRaw writes greeting (a mask over a valid one, or a prefix of it when
// cut is set) and stream to a port, half-closes, and waits for the kernel
// to close its side.
func sendRaw(lk *liveKernel, port int, mask []byte, cut bool, stream []byte) error {
	g := greeting()
	for i := 0; i < len(mask) && i < len(g); i++ {
		g[i] ^= mask[i]
	}
	if cut {
		g = g[:len(mask)%(len(g)+1)]
	}
	c, err := net.DialTimeout("tcp", lk.conn.Endpoint(port)[len("tcp://"):], 5*time.Second)
	if err != nil {
		return fmt.Errorf("dial: %v", err)
	}
	defer c.Close()
	// Writes may fail once the kernel has refused the peer; that is fine.
	go func() {
		c.Write(append(g, stream...))
		c.(*net.TCPConn).CloseWrite()
	}()
	c.SetReadDeadline(time.Now().Add(10 * time.Second))
	if _, err := io.Copy(io.Discard, c); err != nil {
		var ne net.Error
		if errors.As(err, &ne) && ne.Timeout() {
			return errors.New("the kernel kept the connection open 10 s after the peer's end of stream")
		}
	}
	return nil
}

func FuzzZMTP(f *testing.F) {
	jmsg := func(frames ...string) []byte {
		var b []byte
		for i, s := range frames {
			fl := byte(0)
			if i < len(frames)-1 {
				fl = 1
			}
			b = append(b, frame(fl, []byte(s))...)
		}
		return b
	}
	for p := 0; p < 5; p++ {
		rdy := ready(peerTypes[p], "")
		f.Add(uint8(p), []byte{}, cat(rdy))
		f.Add(uint8(p), []byte{}, cat(rdy, jmsg("<IDS|MSG>", "00", "{}", "{}", "{}", "{}")))
		f.Add(uint8(p), []byte{}, cat(rdy, jmsg("\x01kernel.")))
		f.Add(uint8(p), []byte{}, cat(rdy, jmsg("ping")))
		f.Add(uint8(p), []byte{}, command("READY", []byte{0}))                 // issue 10, case 1
		f.Add(uint8(p), []byte{}, command("READY", []byte{3, 'a', 'b'}))       // issue 10, case 1
		f.Add(uint8(p), []byte{}, cat(rdy, hugeHeader(1<<62)))                 // issue 10, case 1
		f.Add(uint8(p), []byte{}, cat(rdy, hugeHeader(1<<40)))                 // issue 10, case 1
		f.Add(uint8(p), []byte{}, hugeHeader(1<<62))                           // in the handshake
		f.Add(uint8(p), []byte{}, cat(rdy, command("PING", []byte{0, 10})))    // a command after READY
		f.Add(uint8(p), []byte{}, cat(rdy, []byte{0x01, 0, 0x01, 0, 0x00, 0})) // empty frames
		f.Add(uint8(p), []byte{0xff}, []byte{})                                // bad signature byte
		f.Add(uint8(p)|0x80, make([]byte, 11), []byte{})                       // a cut greeting
		f.Add(uint8(p), []byte{10: 2}, cat(rdy))                               // ZMTP 1.x version
		f.Add(uint8(p), []byte{12: 'P', 13: 'L', 14: 'A', 15: 'I'}, cat(rdy))  // another mechanism
	}
	f.Add(uint8(0), []byte{}, cat(ready("DEALER", "same-id"), ready("DEALER", "same-id")))
	f.Add(uint8(0), []byte{}, cat(ready("PUB", "")))
	lk := startLive(f)
	f.Fuzz(func(t *testing.T, port uint8, mask []byte, stream []byte) {
		if err := sendRaw(lk, lk.ports[int(port&0x7f)%5], mask, port&0x80 != 0, stream); err != nil {
			t.Fatal(err)
		}
		// Now and then, check that a new client is still served.
		if execs.Add(1)%500 == 0 {
			if err := lk.kernelInfo(5 * time.Second); err != nil {
				t.Fatalf("the kernel stopped answering: %v", err)
			}
		}
	})
}

// TestLiveKernelAnswersAfterSeeds: the seeds above ran against the live
// kernel (go test runs them as tests); it still serves a new client.
func TestLiveKernelAnswersAfterSeeds(t *testing.T) {
	lk := startLive(t)
	if err := lk.kernelInfo(5 * time.Second); err != nil {
		t.Fatal(err)
	}
	_ = json.Valid
}
