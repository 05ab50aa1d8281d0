package kernel

import (
	"encoding/json"
	"fmt"
	"os"
)

// Connection is the content of a Jupyter connection file.
type Connection struct {
	Transport       string `json:"transport"`
	IP              string `json:"ip"`
	ShellPort       int    `json:"shell_port"`
	ControlPort     int    `json:"control_port"`
	StdinPort       int    `json:"stdin_port"`
	IOPubPort       int    `json:"iopub_port"`
	HBPort          int    `json:"hb_port"`
	SignatureScheme string `json:"signature_scheme"`
	Key             string `json:"key"`
}

// ReadConnection reads and checks a connection file.
func ReadConnection(path string) (*Connection, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("reading connection file: %w", err)
	}
	var c Connection
	if err := json.Unmarshal(b, &c); err != nil {
		return nil, fmt.Errorf("connection file %s is not valid JSON: %v", path, err)
	}
	if c.Transport == "" {
		c.Transport = "tcp"
	}
	if c.Transport != "tcp" && c.Transport != "ipc" {
		return nil, fmt.Errorf("connection file %s: transport %q is not supported (tcp or ipc)", path, c.Transport)
	}
	if c.IP == "" {
		c.IP = "127.0.0.1"
	}
	ports := []struct {
		name string
		port int
	}{{"shell_port", c.ShellPort}, {"control_port", c.ControlPort}, {"stdin_port", c.StdinPort},
		{"iopub_port", c.IOPubPort}, {"hb_port", c.HBPort}}
	for _, p := range ports {
		if p.port <= 0 || p.port > 65535 {
			return nil, fmt.Errorf("connection file %s: %s %d is not a port", path, p.name, p.port)
		}
	}
	return &c, nil
}

// Endpoint returns the ZeroMQ address for a port on this connection.
func (c *Connection) Endpoint(port int) string {
	if c.Transport == "ipc" {
		return fmt.Sprintf("ipc://%s-%d", c.IP, port)
	}
	return fmt.Sprintf("tcp://%s:%d", c.IP, port)
}
