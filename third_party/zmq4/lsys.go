// Copyright 2018 The go-zeromq Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// lsys: this file gathers the helpers of the hardening patches carried by
// lsys (see LSYS_CHANGES.md), so that each change in the upstream files
// stays a few lines long.

package zmq4

import (
	"errors"
	"fmt"
	"io"
	"log"
	"sync/atomic"
	"time"
)

const (
	// DefaultMaxMessageSize bounds one received message (all its frames).
	// Peers could announce frames of up to 2^63 bytes, and the reader
	// allocated what they announced.
	DefaultMaxMessageSize = 64 << 20

	// DefaultHandshakeTimeout bounds the ZMTP greeting and handshake of an
	// accepted connection.
	DefaultHandshakeTimeout = 10 * time.Second

	// DefaultHWM is the number of messages a PUB socket queues for one
	// subscriber before it drops messages for that subscriber.
	DefaultHWM = 1000

	// DefaultPubQueueBytes bounds the bytes a PUB socket queues for one
	// subscriber, so that a few large messages cannot pile up either.
	DefaultPubQueueBytes = 32 << 20

	// Bounds on one subscriber's subscriptions, which are kept in memory.
	maxTopics   = 1024
	maxTopicLen = 4096

	// frameOverhead is what one received frame costs besides its body (a
	// slice header and bookkeeping); counting it stops a message of
	// millions of empty frames from slipping under the size limit.
	frameOverhead = 32

	// bodyChunk is how much of a frame body is allocated before its bytes
	// arrive; larger frames grow as data comes in, so a header that
	// announces much and sends little costs little.
	bodyChunk = 1 << 20
)

// ErrMsgTooLarge is returned (and the connection closed) when a peer sends
// a message larger than the socket's limit.
var ErrMsgTooLarge = errors.New("zmq4: message exceeds the size limit")

// errBudget is returned when a socket has too many bytes of partly received
// messages in flight; the connection that asked for more is closed.
var errBudget = errors.New("zmq4: too many bytes in flight on this socket")

// limits are what a socket imposes on each of its connections.
type limits struct {
	maxMsg           int64         // 0: DefaultMaxMessageSize
	handshakeTimeout time.Duration // 0: DefaultHandshakeTimeout
	writeTimeout     time.Duration // 0: none
	sendQueueBytes   int64         // PUB: bytes queued per subscriber; 0: DefaultPubQueueBytes
	inflight         *budget       // nil: no socket-wide bound
	log              *log.Logger   // the socket's logger
}

func (l limits) maxMessage() int64 {
	if l.maxMsg <= 0 {
		return DefaultMaxMessageSize
	}
	return l.maxMsg
}

func (l limits) handshake() time.Duration {
	if l.handshakeTimeout <= 0 {
		return DefaultHandshakeTimeout
	}
	return l.handshakeTimeout
}

// WithMaxMessageSize sets the largest message, in bytes, the socket accepts
// from a peer (all frames together); a peer that sends more is disconnected.
// n <= 0 means DefaultMaxMessageSize.
func WithMaxMessageSize(n int64) Option {
	return func(s *socket) { s.lim.maxMsg = n }
}

// WithMaxInflight bounds the bytes of partly received messages held at once
// across all the socket's connections; a connection whose message would
// exceed it is closed. n <= 0 means no bound beyond the per-message one.
func WithMaxInflight(n int64) Option {
	return func(s *socket) {
		s.lim.inflight = nil
		if n > 0 {
			s.lim.inflight = &budget{max: n}
		}
	}
}

// WithHandshakeTimeout bounds the greeting and handshake of each connection.
func WithHandshakeTimeout(d time.Duration) Option {
	return func(s *socket) { s.lim.handshakeTimeout = d }
}

// WithWriteTimeout closes a connection whose peer does not take a frame
// within d, so a peer that stops reading cannot block senders for ever.
// 0 means no timeout.
func WithWriteTimeout(d time.Duration) Option {
	return func(s *socket) { s.lim.writeTimeout = d }
}

// WithSendQueueBytes bounds the bytes a PUB socket queues for one subscriber
// before it drops messages for that subscriber; n <= 0 means
// DefaultPubQueueBytes.
func WithSendQueueBytes(n int64) Option {
	return func(s *socket) { s.lim.sendQueueBytes = n }
}

// budget counts bytes held by partly received messages on one socket.
type budget struct {
	max  int64
	used atomic.Int64
}

func (b *budget) claim(n int64) bool {
	if b == nil {
		return true
	}
	if b.used.Add(n) > b.max {
		b.used.Add(-n)
		return false
	}
	return true
}

func (b *budget) release(n int64) {
	if b != nil && n != 0 {
		b.used.Add(-n)
	}
}

// drop closes the connection and has its socket forget it. Upstream only
// forgot connections that hit EOF or a network error, so one closed for a
// protocol error stayed in the socket's reader and writer lists.
func (c *Conn) drop() {
	c.rw.Close()
	c.SetClosed()
}

// recoverConn ends a connection goroutine that panicked: the connection is
// closed, and the process and every other connection live on.
func (c *Conn) recoverConn() {
	if p := recover(); p != nil {
		c.drop()
		c.logf("closed a connection after a panic: %v", p)
	}
}

func (c *Conn) logf(format string, v ...any) {
	if c.lim.log != nil {
		c.lim.log.Printf(format, v...)
	} else {
		log.Printf("zmq4: "+format, v...)
	}
}

// readBody reads a frame body of size bytes and charges them to the
// socket's in-flight budget (adding to held). A large body is allocated in
// full only once its first chunk has arrived, so a header that announces
// much and sends nothing costs one chunk.
func (c *Conn) readBody(size int, held *int64) ([]byte, error) {
	first := size
	if first > bodyChunk {
		first = bodyChunk
	}
	if !c.lim.inflight.claim(int64(first)) {
		return nil, errBudget
	}
	*held += int64(first)
	head := make([]byte, first)
	if _, err := io.ReadFull(c.rw, head); err != nil || first == size {
		return head, err
	}
	if !c.lim.inflight.claim(int64(size - first)) {
		return nil, errBudget
	}
	*held += int64(size - first)
	body := make([]byte, size)
	copy(body, head)
	_, err := io.ReadFull(c.rw, body[first:])
	return body, err
}

func tooLarge(size, limit int64) error {
	return fmt.Errorf("%w (%d bytes announced, limit %d)", ErrMsgTooLarge, size, limit)
}

// writing takes the connection's write lock and arms its write timeout; the
// function it returns undoes both. A write that times out drops the
// connection (checkIO): a frame may be half written, and the peer is not
// reading.
func (c *Conn) writing() func() {
	c.wmu.Lock()
	if c.lim.writeTimeout <= 0 {
		return c.wmu.Unlock
	}
	c.rw.SetWriteDeadline(time.Now().Add(c.lim.writeTimeout))
	return func() {
		c.rw.SetWriteDeadline(time.Time{})
		c.wmu.Unlock()
	}
}
