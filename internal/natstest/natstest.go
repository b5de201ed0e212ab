// Package natstest runs a real NATS server with JetStream inside a test
// process, bound to 127.0.0.1 on a free port with file storage in a
// folder of the test's, so queue tests need no server installed and
// nothing is mocked. Only _test.go files import it; the kweigh binary does
// not link the server.
package natstest

import (
	"fmt"
	"net"
	"testing"
	"time"

	"github.com/nats-io/nats-server/v2/server"
)

// Server is an embedded NATS server that can be stopped and started again
// on the same port and store (to test riding out a restart).
type Server struct {
	tb   testing.TB
	dir  string
	port int
	srv  *server.Server
	URL  string
}

// Start starts a server storing JetStream data under dir.
func Start(tb testing.TB, dir string) *Server {
	tb.Helper()
	s := &Server{tb: tb, dir: dir, port: -1}
	s.start()
	tb.Cleanup(s.Stop)
	return s
}

func (s *Server) start() {
	s.tb.Helper()
	opts := &server.Options{
		Host:      "127.0.0.1",
		Port:      s.port,
		JetStream: true,
		StoreDir:  s.dir,
		NoLog:     true,
		NoSigs:    true,
	}
	srv, err := server.NewServer(opts)
	if err != nil {
		s.tb.Fatal(err)
	}
	go srv.Start()
	if !srv.ReadyForConnections(10 * time.Second) {
		s.tb.Fatal("embedded NATS server did not start")
	}
	s.srv = srv
	if s.port == -1 {
		s.port = srv.Addr().(*net.TCPAddr).Port
	}
	s.URL = fmt.Sprintf("nats://127.0.0.1:%d", s.port)
}

// Stop shuts the server down (its stored data stays).
func (s *Server) Stop() {
	if s.srv != nil {
		s.srv.Shutdown()
		s.srv.WaitForShutdown()
		s.srv = nil
	}
}

// Restart stops the server and starts it again on the same port and
// store, after pause.
func (s *Server) Restart(pause time.Duration) {
	s.Stop()
	time.Sleep(pause)
	s.start()
}
