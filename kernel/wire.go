package kernel

import (
	"bytes"
	"crypto/hmac"
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash"
	"time"
)

// ProtocolVersion is the Jupyter messaging protocol version we speak.
const ProtocolVersion = "5.3"

// delimiter separates routing identities from the signed message frames.
var delimiter = []byte("<IDS|MSG>")

// Header is a Jupyter message header.
type Header struct {
	MsgID    string `json:"msg_id"`
	Session  string `json:"session"`
	Username string `json:"username"`
	Date     string `json:"date"`
	MsgType  string `json:"msg_type"`
	Version  string `json:"version"`
}

// Message is one Jupyter message as it travels on a socket. ParentRaw keeps
// the parent header exactly as received, so replies echo it byte for byte.
type Message struct {
	Identities [][]byte
	Header     Header
	HeaderRaw  json.RawMessage // as received; a reply's parent header
	ParentRaw  json.RawMessage
	Metadata   map[string]any
	Content    json.RawMessage
	Buffers    [][]byte
	Received   time.Time // when the kernel read it off its socket
	Signature  []byte    // as received; the kernel refuses one seen before
}

// Signer signs and verifies messages with HMAC-SHA256; a nil key disables
// signing, as the protocol allows for an empty key.
type Signer struct {
	key []byte
}

// NewSigner returns a signer for the connection file's key and scheme.
func NewSigner(scheme, key string) (*Signer, error) {
	if key == "" {
		return &Signer{}, nil
	}
	if scheme != "" && scheme != "hmac-sha256" {
		return nil, fmt.Errorf("signature_scheme %q is not supported; use hmac-sha256", scheme)
	}
	return &Signer{key: []byte(key)}, nil
}

func (s *Signer) mac() hash.Hash { return hmac.New(sha256.New, s.key) }

// Sign returns the hex signature of the four signed frames ("" when unsigned).
func (s *Signer) Sign(frames ...[]byte) string {
	if len(s.key) == 0 {
		return ""
	}
	h := s.mac()
	for _, f := range frames {
		h.Write(f)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// Verify checks a received signature in constant time.
func (s *Signer) Verify(sig []byte, frames ...[]byte) bool {
	if len(s.key) == 0 {
		return true
	}
	want, err := hex.DecodeString(string(sig))
	if err != nil {
		return false
	}
	h := s.mac()
	for _, f := range frames {
		h.Write(f)
	}
	return hmac.Equal(want, h.Sum(nil))
}

// ErrBadSignature marks a message whose signature does not verify.
var ErrBadSignature = errors.New("message signature does not verify")

// MalformedError is a message whose signature verifies but whose header or
// metadata cannot be read. It carries what is needed to answer it.
type MalformedError struct {
	Identities [][]byte
	HeaderRaw  []byte
	MsgType    string // from the header, if it could be found there
	Signature  []byte
	Err        error
}

func (e *MalformedError) Error() string { return e.Err.Error() }
func (e *MalformedError) Unwrap() error { return e.Err }

// Decode parses the frames of a received message and checks its signature.
func Decode(frames [][]byte, s *Signer) (*Message, error) {
	i := 0
	for i < len(frames) && !bytes.Equal(frames[i], delimiter) {
		i++
	}
	if i == len(frames) {
		return nil, errors.New("no <IDS|MSG> delimiter in message")
	}
	if len(frames) < i+6 {
		return nil, fmt.Errorf("message has %d frames after the delimiter; need at least 5", len(frames)-i-1)
	}
	sig, header, parent, meta, content := frames[i+1], frames[i+2], frames[i+3], frames[i+4], frames[i+5]
	if !s.Verify(sig, header, parent, meta, content) {
		return nil, ErrBadSignature
	}
	m := &Message{Identities: frames[:i], HeaderRaw: append(json.RawMessage(nil), header...), ParentRaw: append(json.RawMessage(nil), parent...),
		Content: append(json.RawMessage(nil), content...), Buffers: frames[i+6:], Signature: sig}
	malformed := func(err error) *MalformedError {
		e := &MalformedError{Identities: m.Identities, HeaderRaw: m.HeaderRaw, Signature: sig, Err: err}
		var h struct {
			MsgType any `json:"msg_type"`
		}
		if json.Unmarshal(header, &h) == nil {
			e.MsgType, _ = h.MsgType.(string)
		}
		return e
	}
	if err := json.Unmarshal(header, &m.Header); err != nil {
		return nil, malformed(fmt.Errorf("bad header: %v", err))
	}
	if len(meta) > 0 {
		if err := json.Unmarshal(meta, &m.Metadata); err != nil {
			return nil, malformed(fmt.Errorf("bad metadata: %v", err))
		}
	}
	return m, nil
}

// Encode serialises and signs a message into frames.
func Encode(m *Message, s *Signer) ([][]byte, error) {
	header, err := json.Marshal(m.Header)
	if err != nil {
		return nil, err
	}
	parent := []byte(m.ParentRaw)
	if len(parent) == 0 {
		parent = []byte("{}")
	}
	meta := m.Metadata
	if meta == nil {
		meta = map[string]any{}
	}
	metaB, err := json.Marshal(meta)
	if err != nil {
		return nil, err
	}
	content := []byte(m.Content)
	if len(content) == 0 {
		content = []byte("{}")
	}
	frames := make([][]byte, 0, len(m.Identities)+6+len(m.Buffers))
	frames = append(frames, m.Identities...)
	frames = append(frames, delimiter, []byte(s.Sign(header, parent, metaB, content)), header, parent, metaB, content)
	frames = append(frames, m.Buffers...)
	return frames, nil
}

// newID returns a random message id (hex of 16 random bytes). Message ids
// are protocol plumbing, never part of what a display shows.
func newID() string {
	var b [16]byte
	if _, err := rand.Read(b[:]); err != nil {
		panic(err) // crypto/rand does not fail on supported platforms
	}
	return hex.EncodeToString(b[:])
}

func timestamp() string { return time.Now().UTC().Format("2006-01-02T15:04:05.000000Z") }
