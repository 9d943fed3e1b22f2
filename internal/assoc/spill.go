package assoc

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sync"
)

// mergeFanIn is the most runs merged at once; more spill files are first
// merged in rounds. A variable so tests can force several rounds.
var mergeFanIn = 32

const entryBytes = 20 // key 8, u 4, w 4, d 4

// entry is a merged count record.
type entry struct {
	key     uint64
	u, w, d uint32
}

// spillStore owns the spill folder and the run files written to it; it is
// safe for concurrent writeRun calls.
type spillStore struct {
	parent string
	mu     sync.Mutex
	dir    string
	seq    int
	files  []string
}

func newSpillStore(parent string) *spillStore { return &spillStore{parent: parent} }

func (s *spillStore) create() (*os.File, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.dir == "" {
		d, err := os.MkdirTemp(s.parent, "kwassoc-spill-")
		if err != nil {
			return nil, fmt.Errorf("assoc: spill: %w", err)
		}
		s.dir = d
	}
	s.seq++
	f, err := os.Create(filepath.Join(s.dir, fmt.Sprintf("run-%06d", s.seq)))
	if err != nil {
		return nil, fmt.Errorf("assoc: spill: %w", err)
	}
	return f, nil
}

// writeRun writes sorted slots as a run file.
func (s *spillStore) writeRun(sorted []slot) error {
	return s.writeFile(func(emit func(entry) error) error {
		for _, sl := range sorted {
			if err := emit(entry{sl.key, sl.u, sl.w, sl.d}); err != nil {
				return err
			}
		}
		return nil
	})
}

// writeFile creates a run file from the entries produced by fill and
// records it.
func (s *spillStore) writeFile(fill func(emit func(entry) error) error) error {
	f, err := s.create()
	if err != nil {
		return err
	}
	bw := bufio.NewWriterSize(f, 1<<16)
	var buf [entryBytes]byte
	err = fill(func(e entry) error {
		binary.LittleEndian.PutUint64(buf[0:], e.key)
		binary.LittleEndian.PutUint32(buf[8:], e.u)
		binary.LittleEndian.PutUint32(buf[12:], e.w)
		binary.LittleEndian.PutUint32(buf[16:], e.d)
		_, err := bw.Write(buf[:])
		return err
	})
	if err == nil {
		err = bw.Flush()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		os.Remove(f.Name())
		return fmt.Errorf("assoc: spill: %w", err)
	}
	s.mu.Lock()
	s.files = append(s.files, f.Name())
	s.mu.Unlock()
	return nil
}

// hasFiles reports whether run files are waiting to be merged.
func (s *spillStore) hasFiles() bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	return len(s.files) > 0
}

// takeFiles returns and forgets the run files written so far.
func (s *spillStore) takeFiles() []string {
	s.mu.Lock()
	defer s.mu.Unlock()
	f := s.files
	s.files = nil
	return f
}

// cleanup removes the spill folder and everything in it.
func (s *spillStore) cleanup() {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.dir != "" {
		os.RemoveAll(s.dir)
		s.dir = ""
	}
	s.files = nil
}

// runReader yields entries of one sorted run.
type runReader interface {
	next() (entry, bool, error)
	close()
}

type memRun struct {
	s []slot
	i int
}

func (r *memRun) next() (entry, bool, error) {
	if r.i >= len(r.s) {
		return entry{}, false, nil
	}
	sl := &r.s[r.i]
	r.i++
	return entry{sl.key, sl.u, sl.w, sl.d}, true, nil
}

func (r *memRun) close() { r.s = nil }

type fileRun struct {
	f      *os.File
	br     *bufio.Reader
	buf    [entryBytes]byte
	remove bool // delete the file on close
}

func openFileRun(path string, remove bool) (*fileRun, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("assoc: spill: %w", err)
	}
	return &fileRun{f: f, br: bufio.NewReaderSize(f, 1<<16), remove: remove}, nil
}

func (r *fileRun) next() (entry, bool, error) {
	if _, err := io.ReadFull(r.br, r.buf[:]); err != nil {
		if err == io.EOF {
			return entry{}, false, nil
		}
		return entry{}, false, fmt.Errorf("assoc: spill: read run: %w", err)
	}
	b := r.buf[:]
	return entry{binary.LittleEndian.Uint64(b), binary.LittleEndian.Uint32(b[8:]),
		binary.LittleEndian.Uint32(b[12:]), binary.LittleEndian.Uint32(b[16:])}, true, nil
}

func (r *fileRun) close() {
	r.f.Close()
	if r.remove {
		os.Remove(r.f.Name())
	}
}
