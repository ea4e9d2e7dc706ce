package spool

import (
	"math"
	"math/rand/v2"
	"os"
	"testing"
)

// record writes channels in blocks of blockLen samples.
func record(s *Spool, channels [][]float64, blockLen int) {
	n := len(channels[0])
	block := make([][]float64, len(channels))
	for off := 0; off < n; off += blockLen {
		end := min(n, off+blockLen)
		for c, x := range channels {
			block[c] = x[off:end]
		}
		s.Write(block)
	}
}

// replayed collects what a replay passes on.
func replayed(t *testing.T, s *Spool) [][]float64 {
	t.Helper()
	out := make([][]float64, s.nch)
	if err := s.Replay(func(block [][]float64) {
		for c, x := range block {
			out[c] = append(out[c], x...)
		}
	}); err != nil {
		t.Fatal(err)
	}
	return out
}

// sameBits reports whether a and b hold the same float64 bit patterns.
func sameBits(a, b [][]float64) bool {
	if len(a) != len(b) {
		return false
	}
	for c := range a {
		if len(a[c]) != len(b[c]) {
			return false
		}
		for i := range a[c] {
			if math.Float64bits(a[c][i]) != math.Float64bits(b[c][i]) {
				return false
			}
		}
	}
	return true
}

// Round trip (a physical check: what is played back is what was written,
// bit for bit, NaN payloads and signed zeros included), in memory and past
// MemoryBytes through the temporary file, replayed twice, whatever the
// block lengths; Close removes the file.
func TestRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, tc := range []struct {
		name     string
		samples  int
		blockLen int
		spilled  bool
	}{
		{"in memory", 1000, 37, false},
		{"spilled", 3*MemoryBytes/(8*3) + 5, 4096, true},
		{"spilled, one-sample blocks", MemoryBytes/(8*3) + 2, 1, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ch := make([][]float64, 3)
			for c := range ch {
				ch[c] = make([]float64, tc.samples)
				for i := range ch[c] {
					ch[c][i] = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(40)-20))
				}
			}
			ch[0][0], ch[1][0], ch[2][0] = math.Copysign(0, -1), math.Float64frombits(0x7ff8000000000123), math.SmallestNonzeroFloat64
			s := New(3)
			record(s, ch, tc.blockLen)
			if s.Samples() != tc.samples {
				t.Fatalf("Samples() = %d, want %d", s.Samples(), tc.samples)
			}
			if got := s.fileLen > 0; got != tc.spilled {
				t.Fatalf("spilled %v, want %v", got, tc.spilled)
			}
			for range 2 {
				if !sameBits(replayed(t, s), ch) {
					t.Fatal("replay differs from what was written")
				}
			}
			var name string
			if s.file != nil {
				name = s.file.Name()
			}
			if err := s.Close(); err != nil {
				t.Fatal(err)
			}
			if name != "" {
				if _, err := os.Stat(name); !os.IsNotExist(err) {
					t.Errorf("temporary file %s still there after Close (%v)", name, err)
				}
			}
		})
	}
}

// Without a usable temporary folder the spool keeps everything in memory
// and still plays it back.
func TestNoTemporaryFolder(t *testing.T) {
	t.Setenv("TMPDIR", "/nonexistent/ridemodes-spool-test")
	ch := [][]float64{make([]float64, MemoryBytes/8+100)}
	for i := range ch[0] {
		ch[0][i] = float64(i)
	}
	s := New(1)
	defer s.Close()
	record(s, ch, 1000)
	if s.file != nil || !s.inMem {
		t.Fatalf("file %v, in memory %v: want no file", s.file, s.inMem)
	}
	if !sameBits(replayed(t, s), ch) {
		t.Fatal("replay differs from what was written")
	}
}

// BenchmarkWrite records what the rig route spools for an hour-long 512 Hz
// log of four channels decimated by 25: 73728 samples a channel, in the
// decimator's blocks of 164 (4096-sample input blocks), past MemoryBytes
// through the temporary file; and ten minutes of it (2.4 MB and 0.39 MB).
func BenchmarkWrite(b *testing.B) {
	for _, tc := range []struct {
		name    string
		samples int
	}{{"1h", 3600 * 512 / 25}, {"10min", 600 * 512 / 25}} {
		rng := rand.New(rand.NewPCG(1, 2))
		ch := make([][]float64, 4)
		for c := range ch {
			ch[c] = make([]float64, tc.samples)
			for i := range ch[c] {
				ch[c][i] = rng.NormFloat64()
			}
		}
		b.Run(tc.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				s := New(len(ch))
				record(s, ch, 164)
				if err := s.Close(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
