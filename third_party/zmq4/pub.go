// Copyright 2018 The go-zeromq Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package zmq4

import (
	"context"
	"fmt"
	"net"
	"sync"
	"sync/atomic"
)

// Topics is an interface that wraps the basic Topics method.
type Topics interface {
	// Topics returns the sorted list of topics a socket is subscribed to.
	Topics() []string
}

// NewPub returns a new PUB ZeroMQ socket.
// The returned socket value is initially unbound.
func NewPub(ctx context.Context, opts ...Option) Socket {
	pub := &pubSocket{sck: newSocket(ctx, Pub, opts...)}
	pub.sck.w = newPubMWriter(pub.sck.ctx, pub.sck.lim)
	pub.sck.r = newPubQReader(pub.sck.ctx)
	return pub
}

// pubSocket is a PUB ZeroMQ socket.
type pubSocket struct {
	sck *socket
}

// Close closes the open Socket
func (pub *pubSocket) Close() error {
	return pub.sck.Close()
}

// Send puts the message on the outbound send queue.
// Send blocks until the message can be queued or the send deadline expires.
func (pub *pubSocket) Send(msg Msg) error {
	ctx, cancel := context.WithTimeout(pub.sck.ctx, pub.sck.Timeout())
	defer cancel()
	return pub.sck.w.write(ctx, msg)
}

// SendMulti puts the message on the outbound send queue.
// SendMulti blocks until the message can be queued or the send deadline expires.
// The message will be sent as a multipart message.
func (pub *pubSocket) SendMulti(msg Msg) error {
	msg.multipart = true
	ctx, cancel := context.WithTimeout(pub.sck.ctx, pub.sck.Timeout())
	defer cancel()
	return pub.sck.w.write(ctx, msg)
}

// Recv receives a complete message.
func (*pubSocket) Recv() (Msg, error) {
	msg := Msg{err: fmt.Errorf("zmq4: PUB sockets can't recv messages")}
	return msg, msg.err
}

// Listen connects a local endpoint to the Socket.
func (pub *pubSocket) Listen(ep string) error {
	return pub.sck.Listen(ep)
}

// Dial connects a remote endpoint to the Socket.
func (pub *pubSocket) Dial(ep string) error {
	return pub.sck.Dial(ep)
}

// Type returns the type of this Socket (PUB, SUB, ...)
func (pub *pubSocket) Type() SocketType {
	return pub.sck.Type()
}

// Addr returns the listener's address.
// Addr returns nil if the socket isn't a listener.
func (pub *pubSocket) Addr() net.Addr {
	return pub.sck.Addr()
}

// GetOption is used to retrieve an option for a socket.
func (pub *pubSocket) GetOption(name string) (interface{}, error) {
	return pub.sck.GetOption(name)
}

// SetOption is used to set an option for a socket.
func (pub *pubSocket) SetOption(name string, value interface{}) error {
	err := pub.sck.SetOption(name, value)
	if err != nil {
		return err
	}

	if name != OptionHWM {
		return ErrBadProperty
	}

	hwm, ok := value.(int)
	if !ok {
		return ErrBadProperty
	}

	// lsys: applies to subscribers that connect from now on.
	w := pub.sck.w.(*pubMWriter)
	w.mu.Lock()
	w.hwm = hwm
	w.mu.Unlock()
	return nil
}

// Topics returns the sorted list of topics a socket is subscribed to.
func (pub *pubSocket) Topics() []string {
	return pub.sck.topics()
}

// pubQReader is a queued-message reader.
type pubQReader struct {
	ctx context.Context

	mu sync.RWMutex
	rs []*Conn
	c  chan Msg

	sem *semaphore // ready when a connection is live.
}

func newPubQReader(ctx context.Context) *pubQReader {
	const qrsize = 10
	return &pubQReader{
		ctx: ctx,
		c:   make(chan Msg, qrsize),
		sem: newSemaphore(),
	}
}

func (q *pubQReader) Close() error {
	q.mu.RLock()
	var err error
	for _, r := range q.rs {
		e := r.Close()
		if e != nil && err == nil {
			err = e
		}
	}
	q.rs = nil
	q.mu.RUnlock()
	return err
}

func (q *pubQReader) addConn(r *Conn) {
	q.mu.Lock()
	q.sem.enable()
	q.rs = append(q.rs, r)
	q.mu.Unlock()
	go q.listen(q.ctx, r)
}

func (q *pubQReader) rmConn(r *Conn) {
	q.mu.Lock()
	defer q.mu.Unlock()

	cur := -1
	for i := range q.rs {
		if q.rs[i] == r {
			cur = i
			break
		}
	}
	if cur >= 0 {
		q.rs = append(q.rs[:cur], q.rs[cur+1:]...)
	}
}

func (q *pubQReader) read(ctx context.Context, msg *Msg) error {
	q.sem.lock(ctx)
	select {
	case <-ctx.Done():
	case *msg = <-q.c:
	}
	return msg.err
}

func (q *pubQReader) listen(ctx context.Context, r *Conn) {
	defer q.rmConn(r)
	defer r.drop()        // lsys: forget it too, not just close it
	defer r.recoverConn() // lsys: one bad peer loses only its connection

	for {
		msg := r.read()
		r.lim.inflight.release(msg.held) // lsys: nothing read here is kept
		select {
		case <-ctx.Done():
			return
		default:
			if msg.err != nil {
				return
			}
			// lsys: anything but a subscription is dropped. Recv on a PUB
			// always fails, so messages queued here were held for ever, and
			// once the queue was full this reader blocked, and with it the
			// peer's later subscriptions. An XPUB still gets them while its
			// owner keeps up.
			switch {
			case q.topic(msg):
				r.subscribe(msg)
			case r.typ == XPub:
				select {
				case q.c <- msg:
				default:
				}
			}
		}
	}
}

func (q *pubQReader) topic(msg Msg) bool {
	if len(msg.Frames) != 1 {
		return false
	}
	frame := msg.Frames[0]
	if len(frame) == 0 {
		return false
	}
	topic := frame[0]
	return topic == 0 || topic == 1
}

// lsys: pubMWriter gives each subscriber its own bounded queue and writer
// goroutine. Upstream had one queue, unbounded unless a HWM was set, drained
// by one goroutine writing to each subscriber in turn: a subscriber that
// stopped reading blocked output for all, and the queue grew without bound.
// Now a full queue drops messages for its subscriber alone, as a high-water
// mark does in libzmq.
type pubMWriter struct {
	ctx   context.Context
	mu    sync.Mutex
	ws    []*Conn
	peers map[*Conn]*pubPeer

	hwm      int   // messages queued per subscriber; <= 0: DefaultHWM
	maxBytes int64 // bytes queued per subscriber; <= 0: DefaultPubQueueBytes
	closed   bool
}

type pubPeer struct {
	q       chan Msg
	stop    chan struct{}
	queued  atomic.Int64 // bytes waiting in q
	dropped atomic.Int64 // messages dropped for this subscriber
}

func newPubMWriter(ctx context.Context, lim limits) *pubMWriter {
	return &pubMWriter{ctx: ctx, peers: make(map[*Conn]*pubPeer), maxBytes: lim.sendQueueBytes}
}

// run writes one subscriber's queue to it.
func (w *pubMWriter) run(c *Conn, p *pubPeer) {
	defer c.recoverConn()
	for {
		select {
		case <-p.stop:
			return
		case <-w.ctx.Done():
			return
		case msg := <-p.q:
			p.queued.Add(-int64(msg.size()))
			if err := c.SendMsg(msg); err != nil {
				c.drop()
				return
			}
		}
	}
}

func (w *pubMWriter) Close() error {
	w.mu.Lock()
	defer w.mu.Unlock()
	w.closed = true
	var err error
	for _, ww := range w.ws {
		e := ww.Close()
		if e != nil && err == nil {
			err = e
		}
		close(w.peers[ww].stop)
	}
	w.ws = nil
	w.peers = make(map[*Conn]*pubPeer)
	return err
}

func (mw *pubMWriter) addConn(w *Conn) {
	mw.mu.Lock()
	defer mw.mu.Unlock()
	if mw.closed {
		w.Close()
		return
	}
	hwm := mw.hwm
	if hwm <= 0 {
		hwm = DefaultHWM
	}
	p := &pubPeer{q: make(chan Msg, hwm), stop: make(chan struct{})}
	mw.ws = append(mw.ws, w)
	mw.peers[w] = p
	go mw.run(w, p)
}

func (mw *pubMWriter) rmConn(w *Conn) {
	mw.mu.Lock()
	defer mw.mu.Unlock()

	cur := -1
	for i := range mw.ws {
		if mw.ws[i] == w {
			cur = i
			mw.ws[i].Close()
			break
		}
	}
	if cur >= 0 {
		mw.ws = append(mw.ws[:cur], mw.ws[cur+1:]...)
		close(mw.peers[w].stop)
		delete(mw.peers, w)
	}
}

// write queues msg for every subscriber of its topic and never blocks.
func (w *pubMWriter) write(ctx context.Context, msg Msg) error {
	topic := string(msg.Frames[0])
	size := int64(msg.size())
	maxBytes := w.maxBytes
	if maxBytes <= 0 {
		maxBytes = DefaultPubQueueBytes
	}
	w.mu.Lock()
	defer w.mu.Unlock()
	for _, ww := range w.ws {
		if !ww.subscribed(topic) {
			continue
		}
		p := w.peers[ww]
		// One message larger than the byte bound still goes to a
		// subscriber that has caught up.
		if q := p.queued.Load(); q > 0 && q+size > maxBytes {
			p.drop(ww)
			continue
		}
		p.queued.Add(size)
		select {
		case p.q <- msg:
		default:
			p.queued.Add(-size)
			p.drop(ww)
		}
	}
	return nil
}

// drop counts a message dropped for a subscriber that is not keeping up,
// and says so once per subscriber.
func (p *pubPeer) drop(c *Conn) {
	if p.dropped.Add(1) == 1 {
		c.logf("a subscriber on %v is not reading; dropping messages for it", c.rw.RemoteAddr())
	}
}

var (
	_ rpool  = (*pubQReader)(nil)
	_ wpool  = (*pubMWriter)(nil)
	_ Socket = (*pubSocket)(nil)
	_ Topics = (*pubSocket)(nil)
)
