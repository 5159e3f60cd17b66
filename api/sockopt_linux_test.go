package api

import (
	"net"
	"syscall"
	"testing"
)

// smallReceiveBuffer gives a test client a 4 KiB receive buffer, so that a
// large answer fills the socket buffers at once when the client does not read.
func smallReceiveBuffer(_, _ string, c syscall.RawConn) error {
	var serr error
	err := c.Control(func(fd uintptr) {
		serr = syscall.SetsockoptInt(int(fd), syscall.SOL_SOCKET, syscall.SO_RCVBUF, 4096)
	})
	if err != nil {
		return err
	}
	return serr
}

// The option takes: a socket dialled with smallReceiveBuffer reports a
// receive buffer of at most 8 KiB (Linux doubles the value set for its
// own bookkeeping, socket(7)), far below the default of 128 KiB or more.
func TestSmallReceiveBuffer(t *testing.T) {
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer ln.Close()
	d := net.Dialer{Control: smallReceiveBuffer}
	c, err := d.Dial("tcp", ln.Addr().String())
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	raw, err := c.(*net.TCPConn).SyscallConn()
	if err != nil {
		t.Fatal(err)
	}
	var size int
	var serr error
	if err := raw.Control(func(fd uintptr) {
		size, serr = syscall.GetsockoptInt(int(fd), syscall.SOL_SOCKET, syscall.SO_RCVBUF)
	}); err != nil || serr != nil {
		t.Fatal(err, serr)
	}
	if size > 8192 {
		t.Errorf("SO_RCVBUF %d after asking 4096", size)
	}
}
