package compare

import (
	"bytes"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// FuzzParseSamples checks ParseSamples on arbitrary bytes. It never
// panics; an error is a *SampleError naming the file given, with a line
// inside the text (0 only for a complaint about the whole file) and a
// message; what parses is at least MinSamples finite points with r >= 0,
// no more points than lines, and the points written back one a line (in
// shortest round-trip form) parse to the same points to the bit. A small
// enough set goes on to NewKDE, which returns an estimate or an error,
// never a panic, and an estimate's density and Delta chi^2 at its own
// samples are finite.
func FuzzParseSamples(f *testing.F) {
	var good strings.Builder
	for i := 0; i < MinSamples; i++ {
		good.WriteString(strconv.FormatFloat(0.96+0.0001*float64(i), 'g', -1, 64))
		good.WriteString("\t")
		good.WriteString(strconv.FormatFloat(0.001*float64(i%17), 'g', -1, 64))
		good.WriteString("\n")
	}
	for _, s := range []string{
		good.String(),
		"# n_s r\n\n  0.9649   3.5e-3  # a comment\n0.97\t0\n" + good.String() + "\n# end\n",
		strings.ReplaceAll(good.String(), "\n", "\r\n"),
		good.String() + "0.96 -0.002\n",
		good.String() + "NaN 0.01\n",
		good.String() + "0.96 +Inf\n",
		good.String() + "1e400 0\n",
		good.String() + "0.96,0.01\n",
		good.String() + "0.965 0.01 7\n",
		strings.Repeat("0.965 0.01\n", MinSamples), // identical points: a singular covariance
		"0x1p-1 0\n",
		"0.96 0.01 # ünïcödé\n\u00a00.96\u20030.01\n",
		"1/0 0\n",
		"0.96 " + strings.Repeat("1", 5000) + "\n",
		"",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		const file = "fuzz/samples.txt"
		pts, err := ParseSamples(file, data)
		lines := bytes.Count(data, []byte("\n")) + 1
		if err != nil {
			var se *SampleError
			if !errors.As(err, &se) {
				t.Fatalf("error %T %v, want a *SampleError", err, err)
			}
			if se.File != file || se.Msg == "" || se.Line < 0 || se.Line > lines {
				t.Fatalf("error %+v: want file %q, a message and a line in [0, %d]", se, file, lines)
			}
			if !strings.HasPrefix(se.Error(), file+":") {
				t.Fatalf("error %q does not start with the file name", se.Error())
			}
			return
		}
		if len(pts) < MinSamples || len(pts) > lines {
			t.Fatalf("%d points from %d lines, want %d to %d", len(pts), lines, MinSamples, lines)
		}
		var b strings.Builder
		for i, p := range pts {
			if math.IsNaN(p.Ns) || math.IsInf(p.Ns, 0) || math.IsNaN(p.R) || math.IsInf(p.R, 0) || p.R < 0 {
				t.Fatalf("point %d = %+v: want finite values and r >= 0", i, p)
			}
			b.WriteString(strconv.FormatFloat(p.Ns, 'g', -1, 64) + " " + strconv.FormatFloat(p.R, 'g', -1, 64) + "\n")
		}
		again, err := ParseSamples(file, []byte(b.String()))
		if err != nil {
			t.Fatalf("the points written back do not parse: %v", err)
		}
		if len(again) != len(pts) {
			t.Fatalf("%d points written back parse to %d", len(pts), len(again))
		}
		for i := range pts {
			if math.Float64bits(again[i].Ns) != math.Float64bits(pts[i].Ns) || math.Float64bits(again[i].R) != math.Float64bits(pts[i].R) {
				t.Fatalf("point %d: %+v written back parses to %+v", i, pts[i], again[i])
			}
		}
		if len(pts) > 200 {
			return // NewKDE costs n^2: the fuzzer's time is better spent elsewhere
		}
		k, err := NewKDE("fuzz", "none", pts)
		if err != nil {
			return
		}
		for _, p := range pts[:3] {
			if d := k.Density(p.Ns, p.R); math.IsNaN(d) || math.IsInf(d, 0) || d < 0 {
				t.Fatalf("density at sample %+v = %v", p, d)
			}
			if c := k.DeltaChi2(p.Ns, p.R); math.IsNaN(c) || math.IsInf(c, 0) || c < 0 {
				t.Fatalf("Delta chi^2 at sample %+v = %v", p, c)
			}
		}
	})
}
