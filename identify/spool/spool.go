package spool

import (
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"slices"
)

// MemoryBytes is how many bytes of samples a Spool keeps in memory (the
// whole frames of one sample a channel that fit) before it moves them to
// its temporary file: about six and a half minutes of a four-channel stream
// at 20 Hz stays in memory. It was 1 MiB: on a 2-core AMD EPYC (Turin) VM,
// where the first write of a fresh page of memory costs about 12 us (a page
// fault) and writing the file's pages less, the rig route's spool of the
// hour-long log took 4.9 ms of a run's CPU with 256 KiB against 10.5 ms
// with 1 MiB (perf, 8 runs each; replaying it cost the same, 2.1 ms of
// reads). BenchmarkWrite there, medians of 10: an hour, 0.94 ms against
// 1.08 ms; ten minutes, 0.30 ms against 0.65 ms.
const MemoryBytes = 256 << 10

// replayBytes is the size of the buffer a replay reads the file through.
const replayBytes = 64 << 10

// Spool records blocks of samples. The zero value is not usable; call New.
type Spool struct {
	nch     int
	samples int
	mem     []byte // encoded samples not in the file
	file    *os.File
	removed bool  // the file's name is gone from its folder
	fileLen int64 // bytes in the file
	inMem   bool  // a temporary file could not be made: keep everything in memory
	err     error // the first write error; Replay returns it
}

// New returns an empty Spool for blocks of nch channels.
func New(nch int) *Spool {
	if nch < 1 {
		panic("spool: need at least one channel")
	}
	return &Spool{nch: nch}
}

// Samples returns the number of samples per channel recorded so far.
func (s *Spool) Samples() int { return s.samples }

// Write records a block: one slice per channel, all of one length. It
// panics if the block does not match the channels. A failure to write the
// temporary file is kept and returned by Replay; what comes after it is
// counted, not kept.
//
// The samples go into a buffer of MemoryBytes (whole frames of one sample a
// channel), made at the first Write and moved to the file each time it is
// full, rather than appended value by value to a slice grown from empty
// to MemoryBytes (reallocated and copied on the way). Measured with
// MemoryBytes at 1 MiB on a 2-core AMD EPYC (Turin) VM shared with other
// work (BenchmarkWrite, medians of 10, runs of the two versions
// interleaved): an hour of four channels at 20.48 Hz, 1.75 ms and 1.0 MiB
// allocated against 8.1 ms and 5.0 MiB; ten minutes (then in memory only),
// 1.18 ms against 2.87 ms.
func (s *Spool) Write(block [][]float64) {
	if len(block) != s.nch {
		panic(fmt.Sprintf("spool: block has %d channels, spool has %d", len(block), s.nch))
	}
	m := len(block[0])
	for ch, x := range block {
		if len(x) != m {
			panic(fmt.Sprintf("spool: channel %d of the block has %d samples, channel 0 has %d", ch, len(x), m))
		}
	}
	s.samples += m
	frame := 8 * s.nch
	if s.mem == nil {
		s.mem = make([]byte, 0, max(MemoryBytes/frame, 1)*frame)
	}
	for i := 0; i < m && s.err == nil; {
		room := (cap(s.mem) - len(s.mem)) / frame
		if room == 0 {
			if s.inMem {
				s.mem = slices.Grow(s.mem, (m-i)*frame)
			} else {
				s.spill()
			}
			continue
		}
		k := min(room, m-i)
		s.put(block, i, i+k)
		i += k
	}
}

// put appends samples from..to-1 of every channel of block to s.mem, frame
// by frame, which has room for them.
func (s *Spool) put(block [][]float64, from, to int) {
	frame := 8 * s.nch
	n := len(s.mem)
	s.mem = s.mem[:n+(to-from)*frame]
	b := s.mem[n:]
	for ch, x := range block {
		o := 8 * ch
		for _, v := range x[from:to] {
			binary.LittleEndian.PutUint64(b[o:], math.Float64bits(v))
			o += frame
		}
	}
}

// spill moves the samples in memory to the end of the temporary file.
func (s *Spool) spill() {
	if s.file == nil {
		f, err := os.CreateTemp("", "ridemodes-spool-*")
		if err != nil {
			s.inMem = true // carry on in memory
			return
		}
		s.file = f
		s.removed = os.Remove(f.Name()) == nil
	}
	if _, err := s.file.WriteAt(s.mem, s.fileLen); err != nil {
		s.err = fmt.Errorf("spool: writing the temporary file %s: %w", s.file.Name(), err)
		return
	}
	s.fileLen += int64(len(s.mem))
	s.mem = s.mem[:0]
}

// Replay passes every recorded sample to write, in order, in blocks of at
// most replayBytes/8/nch samples per channel; write must not keep the block.
// It returns the first error of writing or reading the temporary file.
// Replays may run concurrently with each other, not with Write or Close.
func (s *Spool) Replay(write func(block [][]float64)) error {
	if s.err != nil {
		return s.err
	}
	frame := 8 * s.nch
	step := replayBytes / frame * frame
	block := make([][]float64, s.nch)
	for ch := range block {
		block[ch] = make([]float64, step/frame)
	}
	if s.fileLen > 0 {
		buf := make([]byte, step)
		for off := int64(0); off < s.fileLen; {
			b := buf[:min(int64(step), s.fileLen-off)]
			if n, err := s.file.ReadAt(b, off); n < len(b) {
				return fmt.Errorf("spool: reading the temporary file %s: %w", s.file.Name(), err)
			}
			s.play(b, block, write)
			off += int64(len(b))
		}
	}
	for off := 0; off < len(s.mem); off += step {
		s.play(s.mem[off:min(off+step, len(s.mem))], block, write)
	}
	return nil
}

// play decodes whole frames of b into block and passes it on.
func (s *Spool) play(b []byte, block [][]float64, write func(block [][]float64)) {
	frame := 8 * s.nch
	m := len(b) / frame
	for ch := range block {
		block[ch] = block[ch][:m]
	}
	for i := range m {
		for ch, x := range block {
			x[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[i*frame+8*ch:]))
		}
	}
	write(block)
}

// Close releases the memory and removes the temporary file. The Spool is
// empty afterwards.
func (s *Spool) Close() error {
	s.mem, s.samples = nil, 0
	if s.file == nil {
		return nil
	}
	err := s.file.Close()
	if !s.removed {
		if rerr := os.Remove(s.file.Name()); rerr != nil && err == nil {
			err = rerr
		}
	}
	s.file, s.fileLen = nil, 0
	return err
}
