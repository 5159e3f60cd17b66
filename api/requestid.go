package api

import (
	"context"
	"crypto/rand"
	"encoding/hex"

	"github.com/labstack/echo/v4"
)

// HeaderRequestID is the request and response header carrying the request ID.
const HeaderRequestID = "X-Request-ID"

// maxRequestIDLen is the longest incoming request ID accepted as given.
const maxRequestIDLen = 64

type requestIDKey struct{}

// RequestID returns the request ID stored in ctx by the request-ID
// middleware, or "" when there is none.
func RequestID(ctx context.Context) string {
	id, _ := ctx.Value(requestIDKey{}).(string)
	return id
}

// saneRequestID reports an incoming ID worth keeping: 1 to 64 characters of
// letters, digits and - _ . : (what UUIDs, ULIDs and trace IDs use), so that
// it cannot inject anything into a log line or a header.
func saneRequestID(id string) bool {
	if id == "" || len(id) > maxRequestIDLen {
		return false
	}
	for i := 0; i < len(id); i++ {
		c := id[i]
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9':
		case c == '-' || c == '_' || c == '.' || c == ':':
		default:
			return false
		}
	}
	return true
}

// newRequestID is 16 random bytes in hex (32 characters).
func newRequestID() string {
	var b [16]byte
	_, _ = rand.Read(b[:]) // crypto/rand.Read never fails (Go 1.24+)
	return hex.EncodeToString(b[:])
}

// requestIDMiddleware keeps a sane incoming X-Request-ID or makes a new one,
// stores it in the request context (for the logs) and echoes it in the
// response header.
func requestIDMiddleware(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		req := c.Request()
		id := req.Header.Get(HeaderRequestID)
		if !saneRequestID(id) {
			id = newRequestID()
		}
		req.Header.Set(HeaderRequestID, id)
		c.SetRequest(req.WithContext(context.WithValue(req.Context(), requestIDKey{}, id)))
		c.Response().Header().Set(HeaderRequestID, id)
		return next(c)
	}
}
