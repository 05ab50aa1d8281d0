module github.com/go-zeromq/zmq4

go 1.23.0

require (
	golang.org/x/sync v0.16.0
	golang.org/x/text v0.28.0
)
