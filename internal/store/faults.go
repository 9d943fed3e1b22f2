package store

// What callers see when the database goes away: every failure of the
// database itself (not a rejection of one batch) wraps ErrUnavailable, and
// FailureKind names its cause for metrics and logs without exposing driver
// types. QueueDepth shows how many batches wait for the writer, the first
// thing to grow while commits are slow or failing.

import (
	"context"
	"database/sql/driver"
	"errors"
	"io"
	"net"
	"strings"
	"syscall"
	"time"

	"github.com/jackc/pgx/v5/pgconn"
	"modernc.org/sqlite"
	sqlite3 "modernc.org/sqlite/lib"
)

// Failure kinds returned by FailureKind.
const (
	FailConnection = "connection" // the database server cannot be reached or dropped the connection
	FailDiskFull   = "disk_full"  // no room to write (SQLITE_FULL, PostgreSQL 53100 disk_full)
	FailReadOnly   = "read_only"  // the database refuses writes (SQLITE_READONLY, PostgreSQL 25006)
	FailBusy       = "busy"       // another writer holds the lock past busy_timeout
	FailTimeout    = "timeout"    // Options.WriteTimeout or the caller's deadline passed
	FailClosed     = "closed"     // the Store was closed
	FailIO         = "io"         // the file system reported an I/O error (SQLITE_IOERR, SQLITE_CANTOPEN)
	FailOther      = "other"      // any other failure
)

// FailureKinds lists every kind FailureKind may return, sorted.
var FailureKinds = []string{FailBusy, FailClosed, FailConnection, FailDiskFull, FailIO, FailOther, FailReadOnly, FailTimeout}

// errClosed marks an Append after Close.
var errClosed = errors.New("store closed")

// FailureKind names the cause of a store error (one of the Fail
// constants), "" for nil. SQLite result codes are from the SQLite
// documentation, "Result and Error Codes" (SQLITE_FULL 13, SQLITE_READONLY
// 8, SQLITE_BUSY 5, SQLITE_IOERR 10, SQLITE_CANTOPEN 14; the low byte of an
// extended code is its primary code); PostgreSQL SQLSTATE values are from
// the PostgreSQL documentation, Appendix A "PostgreSQL Error Codes" (class
// 08 connection exception, 53100 disk_full, 25006
// read_only_sql_transaction, 57P01..57P03 server shutting down).
func FailureKind(err error) string {
	if err == nil {
		return ""
	}
	if errors.Is(err, errClosed) {
		return FailClosed
	}
	var se *sqlite.Error
	if errors.As(err, &se) {
		switch se.Code() & 0xff {
		case sqlite3.SQLITE_FULL:
			return FailDiskFull
		case sqlite3.SQLITE_READONLY:
			return FailReadOnly
		case sqlite3.SQLITE_BUSY, sqlite3.SQLITE_LOCKED:
			return FailBusy
		case sqlite3.SQLITE_IOERR, sqlite3.SQLITE_CANTOPEN:
			return FailIO
		}
		return FailOther
	}
	var pe *pgconn.PgError
	if errors.As(err, &pe) {
		switch {
		case pe.Code == "53100":
			return FailDiskFull
		case pe.Code == "25006":
			return FailReadOnly
		case strings.HasPrefix(pe.Code, "08"), pe.Code == "57P01", pe.Code == "57P02", pe.Code == "57P03":
			return FailConnection
		}
		return FailOther
	}
	if errors.Is(err, context.DeadlineExceeded) || pgconn.Timeout(err) {
		return FailTimeout
	}
	// Errnos first: syscall.Errno satisfies net.Error too.
	switch {
	case errors.Is(err, syscall.ENOSPC):
		return FailDiskFull
	case errors.Is(err, syscall.EROFS):
		return FailReadOnly
	}
	var ce *pgconn.ConnectError
	var oe *net.OpError
	if errors.As(err, &ce) || errors.As(err, &oe) || errors.Is(err, driver.ErrBadConn) ||
		errors.Is(err, syscall.ECONNREFUSED) || errors.Is(err, syscall.ECONNRESET) || errors.Is(err, syscall.EPIPE) ||
		errors.Is(err, net.ErrClosed) || isEOF(err) {
		return FailConnection
	}
	return FailOther
}

// isEOF reports a connection closed under the driver: pgx wraps io.EOF or
// io.ErrUnexpectedEOF in its read errors, and says "conn closed" for a
// connection it already knows is dead.
func isEOF(err error) bool {
	return errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) || strings.Contains(err.Error(), "conn closed")
}

// QueueDepth returns how many Append batches are waiting for the writer
// goroutine: queued, or blocked because the queue is full. The batches of
// the group being committed are not counted.
func (s *Store) QueueDepth() int { return int(s.queued.Load()) }

// RetryAfter is how long clients should wait before retrying after
// ErrUnavailable (Options.RetryAfter).
func (s *Store) RetryAfter() time.Duration { return s.opts.RetryAfter }
