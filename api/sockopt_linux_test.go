package api

import "syscall"

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
