package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// latexScan is a scan of the demo scenario long enough to run over
// several pages: 60 log-spaced alpha at two N*, each compared with two
// shipped constraint sets and the invented TERN-B forecast.
const latexScan = `title = "Orrery Collaboration: alpha scan for the TERN-B sheet (invented demo)"

[[reheating]]
history = "fixed-efolds"
N_star = [50, 60]

[[constraint]]
use = "cmb-combined-2025"

[[constraint]]
use = "act-dr6-bk18-2025"

[[forecast]]
use = "tern-b"

[[model]]
family = "e-model"
label = "E-model"
alpha = {log = [0.01, 100], points = 60}
`

// latexInference is a study of inferences in the demo scenario: the
// Starobinsky model as reference, the E-model with alpha log-uniform and
// w_reh free, against a shipped set and the invented TERN-B forecast.
const latexInference = `title = "Orrery Collaboration: inferences for the TERN-B sheet (invented demo)"

[[constraint]]
use = "cmb-combined-2025"

[[forecast]]
use = "tern-b"

[[inference]]
label = "Starobinsky"
family = "e-model"
alpha = 1
reference = true

[[inference]]
label = "E-model"
family = "e-model"
alpha = {log_uniform = [0.01, 100]}
w_reh = {uniform = [0, "1/3"]}
`

// TestLaTeXDocument writes every kind of LaTeX table of a run (the
// default wide layout, the long layout, a longtable with caption and
// label, a --where-filtered table, exact numbers) and the run's PDF
// figures, \inputs and \includegraphics them all in one document and
// compiles it with pdflatex, failing on any LaTeX error or siunitx
// warning. It runs only when INFLATRACE_LATEX_E2E=1 (.ci/run installs
// pdflatex with .ci/latex.sh and sets it).
func TestLaTeXDocument(t *testing.T) {
	if os.Getenv("INFLATRACE_LATEX_E2E") != "1" {
		t.Skip("set INFLATRACE_LATEX_E2E=1 with pdflatex, booktabs, siunitx and longtable installed (.ci/latex.sh)")
	}
	if _, err := exec.LookPath("pdflatex"); err != nil {
		t.Fatal("INFLATRACE_LATEX_E2E=1 but pdflatex is not on PATH")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "inflatrace")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	ledger := filepath.Join(dir, "ledger.db")
	run := func(args ...string) []byte {
		t.Helper()
		cmd := exec.Command(bin, append([]string{"--ledger", ledger}, args...)...)
		cmd.Dir = dir
		out, err := cmd.Output()
		if err != nil {
			msg := ""
			if ee, ok := err.(*exec.ExitError); ok {
				msg = string(ee.Stderr)
			}
			t.Fatalf("%v: %v\n%s", args, err, msg)
		}
		return out
	}
	runID := func(out []byte) string {
		t.Helper()
		var r struct{ Run string }
		if err := json.Unmarshal(out, &r); err != nil || r.Run == "" {
			t.Fatalf("run --json: %v\n%s", err, out)
		}
		return r.Run
	}
	demo, _ := filepath.Abs("../../configs/demo.toml")
	demoRun := runID(run("run", demo, "--json"))
	scanFile := filepath.Join(dir, "scan.toml")
	if err := os.WriteFile(scanFile, []byte(latexScan), 0o644); err != nil {
		t.Fatal(err)
	}
	scanRun := runID(run("run", scanFile, "--json"))

	tables := []struct {
		name string
		args []string
	}{
		{"demo-wide", []string{"table", demoRun, "--format", "latex"}},
		{"demo-long", []string{"table", demoRun, "--format", "latex", "--layout", "long", "--columns", "model_label,params,history,n_s,r,alpha_s,constraint,delta_chi2,inside_95"}},
		{"demo-where", []string{"table", demoRun, "--format", "latex", "--where", "model=T-model", "--where", "r<0.01", "--sort", "-r", "--caption", `T-models with $r<0.01$`, "--label", "tab:t-models"}},
		{"scan-wide-long", []string{"table", scanRun, "--format", "latex", "--longtable", "--caption", `Scan over $\alpha$ (Orrery Collaboration, invented)`, "--label", "tab:scan"}},
		{"scan-long", []string{"table", scanRun, "--format", "latex", "--layout", "long", "--longtable", "--digits", "3"}},
		{"scan-exact", []string{"table", scanRun, "--format", "latex", "--exact", "--columns", "param.alpha,N_star,n_s,r,detection_sigma", "--where", "N_star=50", "--longtable"}},
	}
	var body strings.Builder
	for _, tb := range tables {
		out := run(tb.args...)
		if err := os.WriteFile(filepath.Join(dir, tb.name+".tex"), out, 0o644); err != nil {
			t.Fatal(err)
		}
		body.WriteString("\\section*{" + tb.name + "}\n\\input{" + tb.name + "}\n\n")
	}
	// The inference table (inflatrace infer) of a small study.
	inferFile := filepath.Join(dir, "infer.toml")
	if err := os.WriteFile(inferFile, []byte(latexInference), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "infer.tex"), run("infer", inferFile, "--format", "latex"), 0o644); err != nil {
		t.Fatal(err)
	}
	body.WriteString("\\section*{infer}\n\\input{infer}\n\n")
	figs := filepath.Join(dir, "figures")
	run("plot", scanRun, "--out", figs)
	pdfs, _ := filepath.Glob(filepath.Join(figs, "*.pdf"))
	sort.Strings(pdfs)
	if len(pdfs) < 2 { // ns-r.pdf and r-alpha.pdf
		t.Fatalf("plot wrote %v, want ns-r.pdf and r-alpha.pdf", pdfs)
	}
	for _, p := range pdfs {
		body.WriteString("\\begin{figure}\n\\centering\n\\includegraphics[width=0.9\\linewidth]{figures/" + filepath.Base(p) + "}\n\\end{figure}\n\n")
	}
	doc := "\\documentclass{article}\n\\usepackage{booktabs,siunitx,longtable,graphicx}\n\\begin{document}\n\\scriptsize\n" +
		body.String() + "\\end{document}\n"
	if err := os.WriteFile(filepath.Join(dir, "doc.tex"), []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	// Twice: longtable settles its column widths on the second pass.
	var log string
	for pass := 1; pass <= 2; pass++ {
		cmd := exec.Command("pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex")
		cmd.Dir = dir
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("pdflatex pass %d: %v\n%s", pass, err, tail(string(out), 40))
		}
		b, _ := os.ReadFile(filepath.Join(dir, "doc.log"))
		log = string(b)
	}
	for _, bad := range []string{"Package siunitx Warning", "! ", "Undefined control sequence"} {
		if strings.Contains(log, bad) {
			t.Errorf("pdflatex log holds %q:\n%s", bad, context(log, bad))
		}
	}
	m := regexp.MustCompile(`Output written on doc\.pdf \((\d+) pages?`).FindStringSubmatch(log)
	if m == nil {
		t.Fatalf("no PDF written:\n%s", tail(log, 30))
	}
	// 120 scan predictions and 360 scan results run over several pages.
	if pages, _ := strconv.Atoi(m[1]); pages < 8 {
		t.Errorf("doc.pdf has %d pages, want the long tables to run over several", pages)
	}
}

func tail(s string, n int) string {
	lines := strings.Split(s, "\n")
	if len(lines) > n {
		lines = lines[len(lines)-n:]
	}
	return strings.Join(lines, "\n")
}

func context(s, sub string) string {
	i := strings.Index(s, sub)
	return s[max(0, i-400):min(len(s), i+400)]
}
