package study

import (
	"bufio"
	"context"
	"crypto/sha256"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
)

var updateBuildID = flag.Bool("update-build-identity", false, "rewrite testdata/golden/build-identity.txt")

// buildIdentityStudies are checked bit for bit on every build: the demo,
// a reheating study over every history and many families (user-written
// potential and kinetic term included), and an exact-method study.
var buildIdentityStudies = []string{
	"configs/demo.toml",
	"testdata/configs/build-reheating.toml",
	"testdata/configs/build-exact.toml",
}

// outputsDigest evaluates every node of the study's graph in process, in
// order, and returns the SHA-256 of their output hashes (or errors), one
// line per node, with the number of nodes.
func outputsDigest(t *testing.T, file string) (string, int) {
	t.Helper()
	s, err := Load(file)
	if err != nil {
		t.Fatal(err)
	}
	g, err := s.Graph()
	if err != nil {
		t.Fatal(err)
	}
	outs := make([]pipeline.Values, len(g.Nodes))
	failed := make([]bool, len(g.Nodes))
	h := sha256.New()
	for i, n := range g.Nodes {
		in := make([]pipeline.Values, len(n.Inputs))
		skip := false
		for j, k := range n.Inputs {
			in[j], skip = outs[k], skip || failed[k]
		}
		if skip {
			failed[i] = true
			fmt.Fprintf(h, "%d skipped\n", i)
			continue
		}
		out, err := n.Stage.Run(context.Background(), n.Params, in)
		if err != nil {
			failed[i] = true
			fmt.Fprintf(h, "%d error %v\n", i, err)
			continue
		}
		id, _, err := pipeline.OutputHash(out)
		if err != nil {
			t.Fatal(err)
		}
		outs[i] = out
		fmt.Fprintf(h, "%d %s\n", i, id)
	}
	return fmt.Sprintf("sha256:%x", h.Sum(nil)), len(g.Nodes)
}

// The output hashes of every node must not depend on the build: not on
// GOARCH, not on GOAMD64, not on the CPU (a fused multiply-add rounds
// once where separate operations round twice, and the Go specification
// lets a compiler fuse). The digests in testdata/golden/build-identity.txt
// were computed by an amd64 GOAMD64=v1 build; CI runs this test again
// under GOAMD64=v3 and, where qemu-user is present, as an arm64 binary
// (.ci/builds.sh). Regenerate after a deliberate change of the numerics
// with: go test ./stages/study -run OutputsSameOnEveryBuild -args -update-build-identity
func TestOutputsSameOnEveryBuild(t *testing.T) {
	if testing.Short() {
		t.Skip("evaluates three studies")
	}
	root := filepath.Join("..", "..")
	golden := filepath.Join(root, "testdata", "golden", "build-identity.txt")
	want := map[string]string{}
	if f, err := os.Open(golden); err == nil {
		sc := bufio.NewScanner(f)
		for sc.Scan() {
			if line := sc.Text(); line != "" && !strings.HasPrefix(line, "#") {
				name, digest, _ := strings.Cut(line, " ")
				want[name] = digest
			}
		}
		f.Close()
	}
	var b strings.Builder
	b.WriteString("# Output-hash digests of every node of each study (stages/study TestOutputsSameOnEveryBuild),\n# computed by an amd64 GOAMD64=v1 build; every build must reproduce them bit for bit.\n")
	for _, file := range buildIdentityStudies {
		got, n := outputsDigest(t, filepath.Join(root, file))
		fmt.Fprintf(&b, "%s %s %d\n", file, got, n)
		if *updateBuildID {
			continue
		}
		if w := want[file]; w != fmt.Sprintf("%s %d", got, n) {
			t.Errorf("%s on %s/%s: node outputs digest %s over %d nodes, want %s (from an amd64 GOAMD64=v1 build)", file, runtime.GOOS, runtime.GOARCH, got, n, w)
		}
	}
	if *updateBuildID {
		if err := os.WriteFile(golden, []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
