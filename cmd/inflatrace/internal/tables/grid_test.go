package tables

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"strings"
	"testing"
)

func gridFixture() Grid {
	q := Text("n_s")
	q.LaTeX = `$n_s$`
	return Grid{
		Columns: []GridColumn{
			{Name: "row", Plain: "#", LaTeX: `\#`, Numeric: true, Exact: true},
			{Name: "quantity", Plain: "quantity", LaTeX: "quantity"},
			{Name: "change", Plain: "change", LaTeX: "change", Numeric: true},
			{Name: "cause", Plain: "cause", LaTeX: "cause"},
		},
		Rows: [][]Cell{
			{Number(12), q, Number(-6.2561e-4), Text("a | b & 50%")},
			{Number(3), Text("r"), {Missing: true}, Text("x,y")},
		},
	}
}

// Each format reads back to the same cells (CSV and JSON through their
// standard decoders) and escapes what its syntax needs.
func TestWriteGrid(t *testing.T) {
	g := gridFixture()
	var b bytes.Buffer
	if err := WriteGrid(&b, g, CSV, 4); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&b).ReadAll()
	if err != nil || len(recs) != 3 || recs[1][2] != "-0.0006256" || recs[2][3] != "x,y" || recs[2][2] != "" || recs[1][0] != "12" {
		t.Errorf("CSV %q (%v)", recs, err)
	}
	b.Reset()
	WriteGrid(&b, g, JSON, 4)
	var rows []map[string]any
	if err := json.Unmarshal(b.Bytes(), &rows); err != nil || len(rows) != 2 || rows[1]["change"] != nil || rows[0]["change"] != -0.0006256 {
		t.Errorf("JSON %s (%v)", b.String(), err)
	}
	b.Reset()
	WriteGrid(&b, g, Markdown, 4)
	if md := b.String(); !strings.Contains(md, `a \| b & 50%`) || !strings.Contains(md, "| 3 | r | — | x,y |") || !strings.Contains(md, "| ---: | :--- | ---: | :--- |") {
		t.Errorf("Markdown:\n%s", md)
	}
	b.Reset()
	WriteGrid(&b, g, LaTeX, 4)
	tex := b.String()
	for _, want := range []string{`\begin{tabular}{rlrl}`, `12 & $n_s$ & $-6.256\times10^{-4}$ & a \textbar{} b \& 50\% \\`, `3 & r & --- & x,y \\`, `\end{tabular}`} {
		if !strings.Contains(tex, want) {
			t.Errorf("LaTeX lacks %q:\n%s", want, tex)
		}
	}
	if err := WriteGrid(&b, Grid{Columns: g.Columns, Rows: [][]Cell{{Number(1)}}}, CSV, 4); err == nil {
		t.Error("a short row was accepted")
	}
}
