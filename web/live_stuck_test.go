package web

import (
	"fmt"
	"net"
	"net/http/httptest"
	"net/url"
	"strings"
	"testing"
	"time"
)

// A stream whose client reads nothing (a tab frozen by the browser, a
// laptop asleep behind a connection that stays up) held its goroutine,
// its connection and one of the server's maxStreams places for as long as
// the connection lived: its write waited for ever. A write that waits
// longer than streamWriteLimit ends the stream.
func TestStuckStreamIsEnded(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	// The server's side of each connection with a small send buffer, so
	// that a client reading nothing soon leaves a write waiting.
	ts := httptest.NewUnstartedServer(h.srv.Handler())
	ts.Listener = smallSendBuffers{ts.Listener}
	ts.Start()
	t.Cleanup(ts.Close)
	h.ts = ts // the harness's cookies are the host's, whatever its port
	old := streamWriteLimit
	streamWriteLimit = 300 * time.Millisecond
	t.Cleanup(func() { streamWriteLimit = old })

	u, _ := url.Parse(h.ts.URL)
	var cookies []string
	for _, c := range h.client.Jar.Cookies(u) {
		cookies = append(cookies, c.Name+"="+c.Value)
	}
	conn, err := net.Dial("tcp", u.Host)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	_ = conn.(*net.TCPConn).SetReadBuffer(512)
	fmt.Fprintf(conn, "GET %s/events HTTP/1.1\r\nHost: %s\r\nCookie: %s\r\n\r\n", workshopPath(ws.ID), u.Host, strings.Join(cookies, "; "))
	for deadline := time.Now().Add(5 * time.Second); h.srv.live.streams() != 1; {
		if time.Now().After(deadline) {
			t.Fatal("the stream did not open")
		}
		time.Sleep(10 * time.Millisecond)
	}
	// Changes until the connection's buffers are full and a write waits,
	// then long enough for the limit to pass.
	for deadline := time.Now().Add(10 * time.Second); h.srv.live.streams() != 0 && time.Now().Before(deadline); {
		for i := 0; i < 50; i++ {
			h.srv.live.publish(ws.ID, "save")
		}
		time.Sleep(time.Millisecond)
	}
	if n := h.srv.live.streams(); n != 0 {
		t.Errorf("%d streams still open after 10 s of a client reading nothing", n)
	}
}

// smallSendBuffers gives each accepted connection a small send buffer.
type smallSendBuffers struct{ net.Listener }

func (l smallSendBuffers) Accept() (net.Conn, error) {
	c, err := l.Listener.Accept()
	if tc, ok := c.(*net.TCPConn); ok {
		_ = tc.SetWriteBuffer(4096)
	}
	return c, err
}
