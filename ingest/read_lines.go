package ingest

import (
	"bytes"
	"errors"
	"hash"
	"io"
)

// headChunkBytes is the size of the reads while Open reads the notes and
// the header.
const headChunkBytes = 16 << 10

// lineSource splits the start of the source into lines for Open: the notes
// and the header. The source is hashed (SHA-256 of the whole file) and
// counted as it goes; Stream's pipeline takes over what is left.
type lineSource struct {
	src      io.Reader
	h        hash.Hash
	nread    int64
	size     int64
	progress func(int64, int64)
	nextProg int64

	buf   []byte // current chunk
	pos   int
	carry []byte // a line that spans chunks
	eof   bool   // no chunk after buf
	err   error  // read error after buf
	cur   []byte // the buffer behind buf
}

func newLineSource(src io.Reader, h hash.Hash, size int64, progress func(int64, int64)) *lineSource {
	return &lineSource{src: src, h: h, size: size, progress: progress}
}

// fill reads one chunk into b (synchronously), hashing it.
func (s *lineSource) fill(b []byte) ([]byte, error) {
	n, err := io.ReadFull(s.src, b[:cap(b)])
	if n == 0 && err == nil {
		err = io.EOF // cap(b) == 0 cannot happen; be safe
	}
	b = b[:n]
	if n > 0 {
		s.h.Write(b)
	}
	if err == io.ErrUnexpectedEOF {
		err = io.EOF
	}
	return b, err
}

// next makes the following chunk current; false at the end (s.err set for
// a read error).
func (s *lineSource) next() bool {
	ok := s.next1()
	s.nread += int64(len(s.buf))
	if s.progress != nil && s.nread >= s.nextProg {
		s.progress(s.nread, s.size)
		s.nextProg = s.nread + 1<<20
	}
	return ok
}

func (s *lineSource) next1() bool {
	if s.eof {
		s.buf, s.pos = nil, 0
		return false
	}
	if s.cur == nil {
		s.cur = make([]byte, headChunkBytes)
	}
	b, err := s.fill(s.cur)
	s.buf, s.pos = b, 0
	s.setErr(err)
	return len(b) > 0 || !s.eof
}

func (s *lineSource) setErr(err error) {
	if err != nil {
		s.eof = true
		if err != io.EOF {
			s.err = err
		}
	}
}

var errLineTooLong = errors.New("line too long")

// readLine returns the next line without its '\n' (a '\r' before it is the
// caller's), valid until the next call; io.EOF at the end, errLineTooLong
// past MaxLineBytes.
func (s *lineSource) readLine() ([]byte, error) {
	if j := bytes.IndexByte(s.buf[s.pos:], '\n'); j >= 0 {
		line := s.buf[s.pos : s.pos+j]
		s.pos += j + 1
		return line, nil
	}
	s.carry = append(s.carry[:0], s.buf[s.pos:]...)
	s.pos = len(s.buf)
	for {
		if len(s.carry) > MaxLineBytes+1 {
			return nil, errLineTooLong
		}
		if !s.next() {
			if s.err != nil {
				return nil, s.err
			}
			if len(s.carry) == 0 {
				return nil, io.EOF
			}
			return s.carry, nil // a last line without '\n'
		}
		j := bytes.IndexByte(s.buf, '\n')
		if j < 0 {
			s.carry = append(s.carry, s.buf...)
			s.pos = len(s.buf)
			continue
		}
		s.carry = append(s.carry, s.buf[:j]...)
		s.pos = j + 1
		if len(s.carry) > MaxLineBytes+1 {
			return nil, errLineTooLong
		}
		return s.carry, nil
	}
}

// peek returns up to n bytes after the current position, reading more
// when fewer are buffered.
func (s *lineSource) peek(n int) []byte {
	if len(s.buf)-s.pos < n && !s.eof {
		nb := make([]byte, 0, n+headChunkBytes)
		nb = append(nb, s.buf[s.pos:]...)
		more, err := s.fill(nb[len(nb):])
		s.nread += int64(len(more))
		s.buf, s.pos, s.cur = nb[:len(nb)+len(more)], 0, nb
		s.setErr(err)
	}
	b := s.buf[s.pos:]
	if len(b) > n {
		b = b[:n]
	}
	return b
}
