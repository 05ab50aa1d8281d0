// Copyright 2018 The go-zeromq Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// lsys: tests of the hardening patches (LSYS_CHANGES.md).

package zmq4

import (
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"log"
	"net"
	"testing"
	"time"
)

func TestPropertyParsingIsBounded(t *testing.T) {
	for _, p := range [][]byte{
		{0},                       // READY 00: no value length
		{3, 'a', 'b'},             // name longer than what is left
		{1, 'a', 0, 0},            // short value length
		{1, 'a', 0, 0, 0, 5, 'x'}, // value longer than what is left
		{1, 'a', 0xff, 0xff, 0xff, 0xff},
	} {
		md := Metadata{}
		if err := md.UnmarshalZMTP(p); err == nil {
			t.Errorf("metadata % x parsed without error", p)
		}
	}
}

// pipeConn returns a Conn reading what the returned writer writes.
func pipeConn(lim limits) (*Conn, net.Conn) {
	a, b := net.Pipe()
	return &Conn{rw: a, sec: nullSecurity{}, lim: lim, topics: map[string]struct{}{}}, b
}

func TestReadRefusesOversizedMessages(t *testing.T) {
	long := func(n uint64) []byte {
		h := []byte{isLongBitFlag, 0, 0, 0, 0, 0, 0, 0, 0}
		binary.BigEndian.PutUint64(h[1:], n)
		return h
	}
	manyEmpty := make([]byte, 0, 2*4096)
	for i := 0; i < 4096; i++ {
		manyEmpty = append(manyEmpty, hasMoreBitFlag, 0)
	}
	for name, in := range map[string][]byte{
		"2^62 bytes":                long(1 << 62),
		"2^40 bytes":                long(1 << 40),
		"over the limit":            long(1<<16 + 1),
		"many empty frames":         manyEmpty,
		"two frames over the limit": append(append([]byte{hasMoreBitFlag | isLongBitFlag, 0, 0, 0, 0, 0, 0, 0x80, 0}, make([]byte, 1<<15)...), long(1<<15)...),
	} {
		c, w := pipeConn(limits{maxMsg: 1 << 16})
		go func() { w.Write(in); w.Close() }()
		msg := c.read()
		if !errors.Is(msg.err, ErrMsgTooLarge) {
			t.Errorf("%s: read gave %v; want ErrMsgTooLarge", name, msg.err)
		}
	}
}

func TestInflightBudget(t *testing.T) {
	b := &budget{max: 10}
	c, w := pipeConn(limits{inflight: b})
	go func() { w.Write([]byte{0, 11}); w.Write(make([]byte, 11)); w.Close() }()
	if msg := c.read(); !errors.Is(msg.err, errBudget) {
		t.Fatalf("an 11-byte frame under a 10-byte budget: %v", msg.err)
	}
	if b.used.Load() != 0 {
		t.Fatalf("budget still charged with %d bytes after the failed read", b.used.Load())
	}
}

// handshake completes a ZMTP handshake by hand as sockType.
func rawHandshake(t *testing.T, addr net.Addr, sockType string) net.Conn {
	t.Helper()
	c, err := net.Dial("tcp", addr.String())
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { c.Close() })
	g := greeting{Version: defaultVersion}
	g.Sig.Header, g.Sig.Footer = sigHeader, sigFooter
	copy(g.Mechanism[:], NullSecurity)
	md, _ := Metadata{sysSockType: sockType}.MarshalZMTP()
	cmd, _ := (&Cmd{Name: CmdReady, Body: md}).marshalZMTP()
	c.Write(g.marshal())
	c.Write(append([]byte{isCommandBitFlag, byte(len(cmd))}, cmd...))
	var in [66]byte
	if _, err := io.ReadFull(c, in[:]); err != nil {
		t.Fatal(err)
	}
	io.ReadFull(c, make([]byte, in[65]))
	return c
}

func listen(t *testing.T, s Socket) string {
	t.Helper()
	if err := s.Listen("tcp://127.0.0.1:0"); err != nil {
		t.Fatal(err)
	}
	return "tcp://" + s.Addr().String()
}

func within(t *testing.T, d time.Duration, what string, f func() error) {
	t.Helper()
	done := make(chan error, 1)
	go func() { done <- f() }()
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("%s: %v", what, err)
		}
	case <-time.After(d):
		t.Fatalf("%s: not done within %v", what, d)
	}
}

func TestIdleConnectionDoesNotBlockAccept(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	r := NewRouter(ctx, WithLogger(quietLog(t)))
	defer r.Close()
	ep := listen(t, r)
	idle, _ := net.Dial("tcp", r.Addr().String())
	defer idle.Close()
	time.Sleep(50 * time.Millisecond)
	d := NewDealer(ctx)
	defer d.Close()
	within(t, 2*time.Second, "a dealer behind an idle connection", func() error {
		if err := d.Dial(ep); err != nil {
			return err
		}
		if err := d.Send(NewMsgString("hello")); err != nil {
			return err
		}
		m, err := r.Recv()
		if err == nil && string(m.Frames[1]) != "hello" {
			err = fmt.Errorf("got %q", m.Frames)
		}
		return err
	})
}

func TestFailedHandshakeIsClosed(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	r := NewRouter(ctx, WithLogger(quietLog(t)))
	defer r.Close()
	listen(t, r)
	c, _ := net.Dial("tcp", r.Addr().String())
	defer c.Close()
	c.Write(make([]byte, 64)) // not a greeting
	c.SetReadDeadline(time.Now().Add(2 * time.Second))
	if _, err := io.Copy(io.Discard, c); err != nil {
		t.Fatalf("the connection was not closed after a bad greeting: %v", err)
	}
}

func TestHandshakeDeadline(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	r := NewRouter(ctx, WithLogger(quietLog(t)), WithHandshakeTimeout(100*time.Millisecond))
	defer r.Close()
	listen(t, r)
	c, _ := net.Dial("tcp", r.Addr().String())
	defer c.Close()
	c.SetReadDeadline(time.Now().Add(2 * time.Second))
	if _, err := io.Copy(io.Discard, c); err != nil {
		t.Fatalf("an idle connection outlived the handshake deadline: %v", err)
	}
}

func TestRouterRefusesDuplicateIdentity(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	r := NewRouter(ctx, WithLogger(quietLog(t)))
	defer r.Close()
	ep := listen(t, r)
	first := NewDealer(ctx, WithID(SocketIdentity("same")))
	defer first.Close()
	if err := first.Dial(ep); err != nil {
		t.Fatal(err)
	}
	first.Send(NewMsgString("ping"))
	r.Recv()
	second := NewDealer(ctx, WithID(SocketIdentity("same")))
	defer second.Close()
	second.Dial(ep)
	time.Sleep(100 * time.Millisecond)
	if err := r.Send(NewMsgFrom([]byte("same"), []byte("reply"))); err != nil {
		t.Fatal(err)
	}
	within(t, 2*time.Second, "the first peer's reply", func() error { _, err := first.Recv(); return err })
	got := make(chan error, 1)
	go func() { _, err := second.Recv(); got <- err }()
	select {
	case err := <-got:
		if err == nil {
			t.Fatal("the second peer claiming the identity received the reply")
		}
	case <-time.After(200 * time.Millisecond):
	}
}

func TestPubSlowSubscriberDoesNotBlockOthers(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	pub := NewPub(ctx, WithLogger(quietLog(t)), WithSendQueueBytes(1<<20))
	defer pub.Close()
	ep := listen(t, pub)
	stalled := rawHandshake(t, pub.Addr(), "SUB")
	stalled.Write([]byte{0, 1, 1}) // subscribe to everything, then never read
	sub := NewSub(ctx)
	defer sub.Close()
	if err := sub.Dial(ep); err != nil {
		t.Fatal(err)
	}
	sub.SetOption(OptionSubscribe, "")
	time.Sleep(100 * time.Millisecond)
	// 32 MB in batches the live subscriber reads before the next is sent:
	// far beyond the stalled one's socket buffers and queue.
	const n, batch, size = 2000, 40, 16 << 10
	payload := make([]byte, size)
	within(t, 30*time.Second, "publishing past a stalled subscriber", func() error {
		for i := 0; i < n; i += batch {
			for j := 0; j < batch; j++ {
				if err := pub.Send(NewMsgFrom([]byte("t"), payload)); err != nil {
					return err
				}
			}
			for j := 0; j < batch; j++ {
				if _, err := sub.Recv(); err != nil {
					return fmt.Errorf("the live subscriber, after %d messages: %v", i+j, err)
				}
			}
		}
		return nil
	})
	w := pub.(*pubSocket).sck.w.(*pubMWriter)
	w.mu.Lock()
	defer w.mu.Unlock()
	for _, p := range w.peers {
		if q := p.queued.Load(); q > 1<<20+size {
			t.Errorf("a subscriber has %d bytes queued; bound %d", q, 1<<20)
		}
	}
}

func TestPubDiscardsInbound(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	pub := NewPub(ctx, WithLogger(quietLog(t)))
	defer pub.Close()
	listen(t, pub)
	c := rawHandshake(t, pub.Addr(), "SUB")
	for i := 0; i < 50; i++ { // more than the reader's queue held
		c.Write([]byte{0, 3, 'x', 'y', 'z'})
	}
	c.Write([]byte{0, 2, 1, 'a'}) // subscribe to "a"
	time.Sleep(100 * time.Millisecond)
	pub.Send(NewMsgFrom([]byte("a"), []byte("after")))
	c.SetReadDeadline(time.Now().Add(2 * time.Second))
	want := []byte{1, 1, 'a', 0, 5, 'a', 'f', 't', 'e', 'r'}
	got := make([]byte, len(want))
	if _, err := io.ReadFull(c, got); err != nil || string(got) != string(want) {
		t.Fatalf("after inbound junk the subscription did not take: % x, %v", got, err)
	}
}

func TestPanicInConnectionGoroutineIsContained(t *testing.T) {
	c, w := pipeConn(limits{})
	defer w.Close()
	func() {
		defer c.recoverConn()
		panic("boom")
	}()
	if !c.Closed() {
		t.Fatal("the connection that panicked is still open")
	}
}

func quietLog(t *testing.T) *log.Logger {
	return log.New(testWriter{t}, "", 0)
}

type testWriter struct{ t *testing.T }

func (w testWriter) Write(p []byte) (int, error) { w.t.Log(string(p)); return len(p), nil }

func TestWriteTimeoutDropsPeerThatDoesNotRead(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	r := NewRouter(ctx, WithLogger(quietLog(t)), WithWriteTimeout(200*time.Millisecond))
	defer r.Close()
	listen(t, r)
	c := rawHandshake(t, r.Addr(), "DEALER") // never reads again
	c.Write([]byte{0, 2, 'h', 'i'})
	m, err := r.Recv()
	if err != nil {
		t.Fatal(err)
	}
	id := m.Frames[0]
	big := make([]byte, 1<<20)
	within(t, 10*time.Second, "sending to a peer that does not read", func() error {
		for i := 0; i < 64; i++ {
			if err := r.Send(NewMsgFrom(id, big)); err != nil {
				return nil // dropped: the send failed instead of blocking
			}
		}
		return errors.New("64 MiB went to a peer that reads nothing")
	})
}
