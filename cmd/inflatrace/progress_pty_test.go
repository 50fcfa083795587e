package main

import (
	"bytes"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"

	"github.com/creack/pty"
)

// ptyScan is a first-order scan of 6000 points (30000 nodes): a second or
// more on two cores, longer than the bar waits before it is drawn.
const ptyScan = `[[reheating]]
history = "instantaneous"

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = {log = [0.01, 100], points = 6000}
`

// ptyBand is one model with a band of 500 x 500 reheating histories: five
// nodes, one of which runs for a second or more.
// ptyBand is a band of ptyBandHistories histories: long enough (about
// a second since the stages got faster) that its bar must show, past
// ProgressDelay, and advance.
const ptyBand = `[[reheating]]
history = "band"
n_w = 1500
n_T = 1500

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "starobinsky"
`

// ptyBandHistories is n_w * n_T of ptyBand.
const ptyBandHistories = 1500 * 1500

// barFrame is a frame of the run's progress bar: "nodes 1234 / 30000 [".
var barFrame = regexp.MustCompile(`nodes (\d+) / (\d+) \[`)

// insideFrame is a frame of the line of progress inside a running node.
var insideFrame = regexp.MustCompile(`inside 1 running node: \[[=>-]+\] +\d+%  (\d+) / 2250000`)

// ptyRun runs the binary with args; each of stdout and stderr goes to a
// new pseudo-terminal when its flag says so (sized 80 x 24 when sized,
// else left as opened: 0 x 0, as a pseudo-terminal nobody sized
// reports), else to a pipe. It returns what each received.
func ptyRun(t *testing.T, bin string, outTTY, errTTY, sized bool, args ...string) (stdout, stderr string) {
	t.Helper()
	cmd := exec.Command(bin, args...)
	var bufs [2]bytes.Buffer
	var done []chan struct{}
	var ttys []*os.File
	for k, onTTY := range []bool{outTTY, errTTY} {
		var w io.Writer = &bufs[k]
		if onTTY {
			ptmx, tty, err := pty.Open()
			if err != nil {
				t.Skipf("no pseudo-terminal: %v", err)
			}
			defer ptmx.Close()
			if sized {
				if err := pty.Setsize(tty, &pty.Winsize{Rows: 24, Cols: 80}); err != nil {
					t.Fatal(err)
				}
			}
			ttys = append(ttys, tty)
			w = tty
			ch := make(chan struct{})
			done = append(done, ch)
			go func(b *bytes.Buffer) {
				defer close(ch)
				io.Copy(b, ptmx) // ends with EIO once the last holder of tty closes it
			}(&bufs[k])
		}
		if k == 0 {
			cmd.Stdout = w
		} else {
			cmd.Stderr = w
		}
	}
	err := cmd.Run()
	for _, tty := range ttys {
		tty.Close()
	}
	for _, ch := range done {
		<-ch
	}
	if err != nil {
		t.Fatalf("%v: %v\nstdout:\n%s\nstderr:\n%s", args, err, bufs[0].String(), bufs[1].String())
	}
	return bufs[0].String(), bufs[1].String()
}

// On a terminal, run draws a progress bar on stderr that advances through
// the run, whether the terminal reports a size or none (the bar was not
// drawn at all on an unsized pseudo-terminal, nor for a run of fewer than
// 200 nodes), and a band's progress from inside its node; with stderr a
// pipe, nothing of the bar is written, even with stdout a terminal.
// (A real child process on real pseudo-terminals.)
func TestProgressBarOnTerminal(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command and runs scans")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "inflatrace")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	scan := filepath.Join(dir, "scan.toml")
	band := filepath.Join(dir, "band.toml")
	for p, text := range map[string]string{scan: ptyScan, band: ptyBand} {
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	// frames returns the counts of the bar's frames, checking they never
	// go down and never pass the total.
	frames := func(what, stderr string) []int {
		t.Helper()
		var counts []int
		for _, m := range barFrame.FindAllStringSubmatch(stderr, -1) {
			n, _ := strconv.Atoi(m[1])
			total, _ := strconv.Atoi(m[2])
			if n > total || (len(counts) > 0 && n < counts[len(counts)-1]) {
				t.Errorf("%s: frame %q after %v", what, m[0], counts)
			}
			counts = append(counts, n)
		}
		return counts
	}

	t.Run("scan, both streams on one unsized terminal", func(t *testing.T) {
		led := filepath.Join(dir, "a.db")
		_, stderr := ptyRun(t, bin, true, true, false, "--ledger", led, "run", scan)
		counts := frames("scan", stderr)
		// The bar advances: a frame part-way and the last at the end.
		if len(counts) < 2 || counts[0] >= 30000 || counts[len(counts)-1] != 30000 {
			t.Errorf("bar frames with counts %v, want some part-way and the last at 30000; stderr:\n%q", counts, ptyTail(stderr))
		}
		if !bytes.Contains([]byte(stderr), []byte("\x1b[1A\x1b[J")) {
			t.Errorf("frames are not drawn over each other: %q", ptyTail(stderr))
		}
	})
	t.Run("band, stderr on a sized terminal", func(t *testing.T) {
		led := filepath.Join(dir, "b.db")
		stdout, stderr := ptyRun(t, bin, false, true, true, "--ledger", led, "run", band)
		inside := insideFrame.FindAllStringSubmatch(stderr, -1)
		if len(inside) == 0 {
			t.Fatalf("no frame of the band's progress; stderr:\n%q", ptyTail(stderr))
		}
		if n, _ := strconv.Atoi(inside[0][1]); n >= ptyBandHistories {
			t.Errorf("the band's first frame is at its end (%s): it did not advance on screen", inside[0][0])
		}
		if len(frames("band", stderr)) == 0 {
			t.Errorf("no bar for a run of five nodes; stderr:\n%q", ptyTail(stderr))
		}
		if bytes.Contains([]byte(stdout), []byte("nodes ")) || bytes.Contains([]byte(stdout), []byte("\x1b[")) {
			t.Errorf("the bar went to stdout: %q", stdout)
		}
	})
	t.Run("stderr piped, stdout a terminal", func(t *testing.T) {
		led := filepath.Join(dir, "c.db")
		_, stderr := ptyRun(t, bin, true, false, true, "--ledger", led, "run", band)
		if barFrame.MatchString(stderr) || bytes.Contains([]byte(stderr), []byte("inside")) || bytes.Contains([]byte(stderr), []byte("\x1b[")) {
			t.Errorf("a bar was written to a pipe: %q", stderr)
		}
		if !bytes.Contains([]byte(stderr), []byte("4 nodes: 4 computed")) {
			t.Errorf("stderr lacks the run's summary: %q", stderr)
		}
	})
}

// ptyTail is the end of s, for messages.
func ptyTail(s string) string {
	if len(s) > 2000 {
		return "..." + s[len(s)-2000:]
	}
	return s
}
