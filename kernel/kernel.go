// Package kernel speaks the Jupyter messaging protocol (version 5.3) over
// ZeroMQ for the lsys language. It moves bytes and asks two others: package
// lang evaluates cells and package display renders their values. The
// protocol is served by a small mux of handlers per message type, in the
// manner of net/http.
package kernel

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log"
	"os"
	"strings"
	"sync"
	"time"

	"github.com/go-zeromq/zmq4"

	"lsys/display"
	"lsys/lang"
	"lsys/lang/builtins"
)

// Config configures a kernel.
type Config struct {
	Conn    *Connection
	Version string      // implementation version shown in kernel_info
	HelpURL string      // where the language reference lives, for help_links
	Dir     string      // working folder for load(); "" means the current one
	Log     *log.Logger // nil logs to stderr

	// MaxMessageSize is the largest message, in bytes, a peer may send on
	// shell, control or stdin; 0 means DefaultMaxMessageSize. A peer that
	// sends more is disconnected before the bytes are read.
	MaxMessageSize int64

	// Limits bound each cell (steps, depth, memory); zero values take the
	// language's defaults.
	Limits lang.Limits
}

// Wire limits. Real cells and their replies are far below them; they exist
// so that no peer, with or without the key, can make the kernel hold
// memory or wait for ever.
const (
	DefaultMaxMessageSize = 64 << 20
	// handshakeTimeout bounds a new connection's ZMTP handshake.
	handshakeTimeout = 10 * time.Second
	// writeTimeout drops a peer that has not taken a frame for this long.
	writeTimeout = 30 * time.Second
	// smallMessage bounds what peers send on iopub (subscriptions) and the
	// heartbeat (pings): a few bytes each.
	smallMessage = 64 << 10
	// stdinMaxMessage bounds stdin, where the kernel never asks for input.
	stdinMaxMessage = 1 << 20
	// hbWriteTimeout drops a heartbeat peer that does not read its echoes.
	hbWriteTimeout = 2 * time.Second
)

// Kernel is one running lsys kernel.
type Kernel struct {
	cfg     Config
	signer  *Signer
	session string // this kernel's session id for message headers
	log     *log.Logger

	shell, control, stdin, iopub, hb zmq4.Socket
	iopubMu                          sync.Mutex

	shellMux, controlMux *Mux
	seen                 *replayGuard // signatures already acted on

	lang        *lang.Session
	execCount   int
	abortBefore time.Time // set by a failed cell; shell dispatcher only
	history     []historyEntry

	runMu  sync.Mutex
	cancel context.CancelFunc // cancels the running cell, if any

	stop     context.CancelFunc
	stopOnce sync.Once
	restart  bool
}

// New prepares a kernel; Serve binds its sockets and runs it.
func New(cfg Config) (*Kernel, error) {
	if cfg.Conn == nil {
		return nil, errors.New("kernel: no connection information")
	}
	s, err := NewSigner(cfg.Conn.SignatureScheme, cfg.Conn.Key)
	if err != nil {
		return nil, err
	}
	if cfg.Log == nil {
		cfg.Log = log.New(os.Stderr, "lsys: ", log.LstdFlags)
	}
	if cfg.Dir == "" {
		cfg.Dir, _ = os.Getwd()
	}
	if cfg.MaxMessageSize <= 0 {
		cfg.MaxMessageSize = DefaultMaxMessageSize
	}
	k := &Kernel{cfg: cfg, signer: s, session: newID(), log: cfg.Log,
		lang: lang.NewSession(lang.Options{Dir: cfg.Dir, Text: display.TextOf, Builtins: builtins.Registry(), Limits: cfg.Limits}),
		seen: newReplayGuard(replayMemory)}
	k.shellMux = NewMux()
	k.controlMux = NewMux()
	k.routes()
	return k, nil
}

// Serve binds the five sockets on the connection's address and serves until
// a shutdown request arrives or ctx ends. It reports whether a restart was
// asked for.
func (k *Kernel) Serve(ctx context.Context) (restart bool, err error) {
	ctx, k.stop = context.WithCancel(ctx)
	defer k.stop()
	c := k.cfg.Conn
	max := k.cfg.MaxMessageSize
	// Log lines of the ZMTP layer (refused peers) go to the kernel's log.
	zlog := log.New(k.log.Writer(), k.log.Prefix()+"zmq: ", k.log.Flags())
	opts := func(max int64, write time.Duration) []zmq4.Option {
		return []zmq4.Option{zmq4.WithLogger(zlog), zmq4.WithMaxMessageSize(max), zmq4.WithMaxInflight(2 * max),
			zmq4.WithHandshakeTimeout(handshakeTimeout), zmq4.WithWriteTimeout(write)}
	}
	k.shell = zmq4.NewRouter(ctx, opts(max, writeTimeout)...)
	k.control = zmq4.NewRouter(ctx, opts(max, writeTimeout)...)
	k.stdin = zmq4.NewRouter(ctx, opts(stdinMaxMessage, writeTimeout)...)
	k.iopub = zmq4.NewPub(ctx, opts(smallMessage, writeTimeout)...)
	// The heartbeat is a ROUTER that echoes what it gets (a REQ or DEALER
	// client sees a REP): unlike a REP it can answer each peer on its own,
	// so one that stops reading cannot stall the echoes of the others.
	k.hb = zmq4.NewRouter(ctx, opts(smallMessage, hbWriteTimeout)...)
	socks := []struct {
		s    zmq4.Socket
		port int
		name string
	}{{k.shell, c.ShellPort, "shell"}, {k.control, c.ControlPort, "control"}, {k.stdin, c.StdinPort, "stdin"},
		{k.iopub, c.IOPubPort, "iopub"}, {k.hb, c.HBPort, "heartbeat"}}
	for _, s := range socks {
		if err := s.s.Listen(c.Endpoint(s.port)); err != nil {
			k.closeAll()
			return false, fmt.Errorf("binding %s socket on %s: %w", s.name, c.Endpoint(s.port), err)
		}
	}
	defer k.closeAll()

	var wg sync.WaitGroup
	wg.Add(4)
	go func() { defer wg.Done(); k.heartbeat(ctx) }()
	go func() { defer wg.Done(); k.drainStdin(ctx) }()
	go func() { defer wg.Done(); k.serveChannel(ctx, k.control, "control", k.controlMux, nil) }()
	shellQueue := make(chan *Message, 256)
	go func() { defer wg.Done(); k.serveChannel(ctx, k.shell, "shell", nil, shellQueue) }()
	k.publishStatus(nil, "starting")
	k.dispatchShell(ctx, shellQueue)
	k.closeAll() // unblocks the receivers
	wg.Wait()
	return k.restart, nil
}

func (k *Kernel) closeAll() {
	for _, s := range []zmq4.Socket{k.shell, k.control, k.stdin, k.iopub, k.hb} {
		if s != nil {
			s.Close()
		}
	}
}

// Shutdown ends Serve after the current request.
func (k *Kernel) Shutdown(restart bool) {
	k.stopOnce.Do(func() {
		k.restart = restart
		if k.stop != nil {
			k.stop()
		}
	})
}

// Interrupt cancels the running cell, if any. Safe from any goroutine
// (the SIGINT handler calls it).
func (k *Kernel) Interrupt() {
	k.runMu.Lock()
	defer k.runMu.Unlock()
	if k.cancel != nil {
		k.cancel()
	}
}

// heartbeat echoes every ping to the peer that sent it. Each echo is sent
// on a goroutine of its own, at most one per peer at a time (a ping that
// arrives while its peer's previous echo is still being written is dropped),
// so a peer that does not read holds up only itself, and only until the
// write timeout drops it.
func (k *Kernel) heartbeat(ctx context.Context) {
	var mu sync.Mutex
	busy := map[string]bool{}
	for {
		msg, err := k.hb.Recv()
		if err != nil {
			if ctx.Err() != nil {
				return
			}
			if !errors.Is(err, io.EOF) {
				k.log.Printf("heartbeat: %v", err)
			}
			continue
		}
		peer := string(msg.Frames[0])
		mu.Lock()
		if busy[peer] {
			mu.Unlock()
			continue
		}
		busy[peer] = true
		mu.Unlock()
		go func() {
			defer func() {
				mu.Lock()
				delete(busy, peer)
				mu.Unlock()
			}()
			if err := k.hb.Send(msg); err != nil && ctx.Err() == nil {
				k.log.Printf("heartbeat echo: %v", err)
			}
		}()
	}
}

// drainStdin reads and drops what arrives on stdin. The kernel never asks
// for input (allow_stdin is not used), so nothing there is awaited; unread,
// it would be held in memory for as long as the kernel runs.
func (k *Kernel) drainStdin(ctx context.Context) {
	for {
		if _, err := k.stdin.Recv(); err != nil && ctx.Err() != nil {
			return
		}
	}
}

// serveChannel reads messages from a ROUTER socket. Control messages are
// handled right here (so interrupts reach a busy kernel); shell messages are
// queued for the single shell dispatcher, which runs cells one at a time.
func (k *Kernel) serveChannel(ctx context.Context, sock zmq4.Socket, name string, mux *Mux, queue chan<- *Message) {
	for {
		raw, err := sock.Recv()
		if err != nil {
			if ctx.Err() != nil {
				if queue != nil {
					close(queue)
				}
				return
			}
			k.log.Printf("%s: receive: %v", name, err)
			continue
		}
		msg, err := Decode(raw.Frames, k.signer)
		if err != nil {
			// A message that fails verification is never acted on. One that
			// verifies but is malformed is answered where the reply can be
			// addressed, so its client does not wait for ever.
			k.log.Printf("%s: dropped a message: %v", name, err)
			var bad *MalformedError
			if errors.As(err, &bad) && k.seen.first(bad.Signature) {
				k.replyMalformed(sock, name, bad)
			}
			continue
		}
		if !k.seen.first(msg.Signature) {
			// Jupyter's own clients refuse a message whose signature they
			// have seen before in the session; so do we, so that a captured
			// request cannot be run again.
			k.log.Printf("%s: dropped a replayed %s (its signature was already used)", name, msg.Header.MsgType)
			continue
		}
		msg.Received = time.Now()
		if queue != nil {
			select {
			case queue <- msg:
			case <-ctx.Done():
				close(queue)
				return
			}
			continue
		}
		k.handle(&Request{k: k, Msg: msg, sock: sock, channel: name}, mux)
	}
}

// replyMalformed answers a signed request that could not be read (a header
// field of the wrong JSON type, say) with an error reply of the matching
// type, between busy and idle, so that its client is not left waiting. Only
// a message that names a *_request type and came with a routing identity
// can be answered.
func (k *Kernel) replyMalformed(sock zmq4.Socket, channel string, bad *MalformedError) {
	if len(bad.Identities) == 0 || !strings.HasSuffix(bad.MsgType, "_request") {
		return
	}
	parent := &Message{HeaderRaw: json.RawMessage("{}")}
	var obj map[string]json.RawMessage
	if json.Unmarshal(bad.HeaderRaw, &obj) == nil && obj != nil {
		parent.HeaderRaw = bad.HeaderRaw
	}
	k.publishStatus(parent, "busy")
	defer k.publishStatus(parent, "idle")
	evalue := "the request could not be read: " + bad.Err.Error() +
		"; its header must have string fields msg_id, session, username, date, msg_type and version, and its metadata must be a JSON object"
	m, err := k.newMessage(parent, strings.TrimSuffix(bad.MsgType, "_request")+"_reply",
		map[string]any{"status": "error", "ename": "ProtocolError", "evalue": evalue, "traceback": []string{"ProtocolError: " + evalue}})
	if err != nil {
		k.log.Printf("%s: %v", channel, err)
		return
	}
	m.Identities = bad.Identities
	k.send(sock, nil, m)
}

func (k *Kernel) dispatchShell(ctx context.Context, queue <-chan *Message) {
	for {
		select {
		case <-ctx.Done():
			return
		case msg, ok := <-queue:
			if !ok {
				return
			}
			k.handle(&Request{k: k, Msg: msg, sock: k.shell, channel: "shell"}, k.shellMux)
			// After a failed cell (stop_on_error), abort what was queued
			// behind it; an execute run there may fail and ask again.
			for !k.abortBefore.IsZero() {
				t := k.abortBefore
				k.abortBefore = time.Time{}
				k.abortQueued(queue, t)
			}
		}
	}
}

// handle wraps every request in busy/idle status messages and keeps a
// handler's panic from taking the kernel down.
func (k *Kernel) handle(r *Request, mux *Mux) {
	h := mux.Handler(r.Msg.Header.MsgType)
	if h == nil {
		k.log.Printf("%s: no handler for %q; ignored", r.channel, r.Msg.Header.MsgType)
		return
	}
	k.publishStatus(r.Msg, "busy")
	func() {
		defer func() {
			if p := recover(); p != nil {
				k.log.Printf("%s: %s handler panicked: %v", r.channel, r.Msg.Header.MsgType, p)
			}
		}()
		h.ServeMessage(r)
	}()
	k.publishStatus(r.Msg, "idle")
}

func (k *Kernel) publishStatus(parent *Message, state string) {
	k.publish(parent, "status", map[string]any{"execution_state": state}, "")
}

// publish sends a message on iopub with the given parent.
func (k *Kernel) publish(parent *Message, msgType string, content any, topic string) {
	m, err := k.newMessage(parent, msgType, content)
	if err != nil {
		k.log.Printf("iopub %s: %v", msgType, err)
		return
	}
	if topic == "" {
		topic = "kernel." + k.session + "." + msgType
	}
	m.Identities = [][]byte{[]byte(topic)}
	k.send(k.iopub, &k.iopubMu, m)
}

func (k *Kernel) newMessage(parent *Message, msgType string, content any) (*Message, error) {
	body, err := json.Marshal(content)
	if err != nil {
		return nil, err
	}
	m := &Message{Header: Header{MsgID: newID(), Session: k.session, Username: "lsys", Date: timestamp(),
		MsgType: msgType, Version: ProtocolVersion}, Content: body}
	if parent != nil {
		m.ParentRaw = parent.headerRaw()
	}
	return m, nil
}

func (k *Kernel) send(sock zmq4.Socket, mu *sync.Mutex, m *Message) {
	frames, err := Encode(m, k.signer)
	if err != nil {
		k.log.Printf("encode %s: %v", m.Header.MsgType, err)
		return
	}
	if mu != nil {
		mu.Lock()
		defer mu.Unlock()
	}
	if err := sock.Send(zmq4.NewMsgFrom(frames...)); err != nil {
		k.log.Printf("send %s: %v", m.Header.MsgType, err)
	}
}

// headerRaw returns the message's own header, to be a reply's parent header,
// exactly as it arrived (fields we do not know are kept).
func (m *Message) headerRaw() json.RawMessage {
	if len(m.HeaderRaw) > 0 {
		return m.HeaderRaw
	}
	b, _ := json.Marshal(m.Header)
	return b
}
