package kernel

import (
	"encoding/json"

	"github.com/go-zeromq/zmq4"
)

// Handler serves one kind of request message, like http.Handler.
type Handler interface {
	ServeMessage(r *Request)
}

// HandlerFunc adapts a function to Handler.
type HandlerFunc func(r *Request)

// ServeMessage calls f(r).
func (f HandlerFunc) ServeMessage(r *Request) { f(r) }

// Mux routes requests by msg_type.
type Mux struct {
	m map[string]Handler
}

// NewMux returns an empty mux.
func NewMux() *Mux { return &Mux{m: map[string]Handler{}} }

// Handle registers h for msgType.
func (mux *Mux) Handle(msgType string, h Handler) { mux.m[msgType] = h }

// HandleFunc registers f for msgType.
func (mux *Mux) HandleFunc(msgType string, f func(r *Request)) { mux.Handle(msgType, HandlerFunc(f)) }

// Handler returns the handler for msgType, or nil.
func (mux *Mux) Handler(msgType string) Handler { return mux.m[msgType] }

// Request is one received message with what a handler needs to answer it.
type Request struct {
	k       *Kernel
	Msg     *Message
	sock    zmq4.Socket
	channel string
}

// Decode unmarshals the request content into v.
func (r *Request) Decode(v any) error {
	if len(r.Msg.Content) == 0 {
		return nil
	}
	return json.Unmarshal(r.Msg.Content, v)
}

// Reply sends msgType with content back to the requester on the same socket.
func (r *Request) Reply(msgType string, content any) {
	m, err := r.k.newMessage(r.Msg, msgType, content)
	if err != nil {
		r.k.log.Printf("reply %s: %v", msgType, err)
		return
	}
	m.Identities = r.Msg.Identities
	r.k.send(r.sock, nil, m)
}

// Publish sends msgType on iopub with this request as parent.
func (r *Request) Publish(msgType string, content any) {
	r.k.publish(r.Msg, msgType, content, "")
}
