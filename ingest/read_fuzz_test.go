package ingest

import (
	"bytes"
	"errors"
	"math"
	"testing"
)

// FuzzRead feeds arbitrary bytes to the reader under a few option sets. It
// must never panic, every error must be a *ParseError wrapping a sentinel,
// and every success must hold finite samples, as many as the summary says.
func FuzzRead(f *testing.F) {
	seeds := []string{
		"time [s],a [g],b [m/s^2]\n0,1,2\n0.01,2,3\n0.02,1,2\n",
		"t;a [g]\n0;1,5\n0,5;2,5\n1;3\n",
		"a\tb\n1\t2\n3\t4\n5\t6\n",
		"# n\n\"time [s]\",\"x [mm/s^2]\"\n0,\"1\"\n1,\"2\"\n2,3\n",
		"t [ms],a\n0,1\n1,2\n2,3\n\n",
		"t,a\n0,1\n0.001,1e400\n",
		"t,a,\n0,1,\n1,2,\n2,1,\n",
		"\xef\xbb\xbft,a\r\n0,1\r\n1,2\r\n",
		"",
	}
	for _, s := range seeds {
		f.Add([]byte(s))
	}
	opts := []Options{
		{},
		{SampleRateHz: 100, BlockSamples: 3},
		{Channels: []string{"a"}, Resample: true, StartS: 0.005, EndS: 1},
		{SampleRateHz: 10, MinDurationS: 0.1, BandHighHz: 4},
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, opt := range opts {
			l, err := readAllFrom(bytes.NewReader(data), "fuzz.csv", opt)
			if err != nil {
				var pe *ParseError
				if !errors.As(err, &pe) || pe.Kind == nil || !errors.Is(err, pe.Kind) || pe.Path != "fuzz.csv" || pe.Line < 0 {
					t.Fatalf("error %q (%T) is not a located ParseError", err, err)
				}
				continue
			}
			s := l.Summary
			if s.Samples < 2 || !(s.SampleRateHz > 0) || math.IsInf(s.SampleRateHz, 0) || len(l.Data) != len(l.Info.Channels) {
				t.Fatalf("summary %+v for %d channels", s, len(l.Data))
			}
			for k, d := range l.Data {
				if len(d) != s.Samples {
					t.Fatalf("channel %d: %d samples, summary %d", k, len(d), s.Samples)
				}
				for _, v := range d {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						t.Fatalf("channel %d: sample %v", k, v)
					}
				}
			}
		}
	})
}
