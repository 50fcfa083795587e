package archive

import "testing"

// Sizes as IEC 80000-13 defines the prefixes: k = 10^3, M = 10^6, G = 10^9,
// T = 10^12 (SI), Ki = 2^10, Mi = 2^20, Gi = 2^30, Ti = 2^40 (binary).
func TestParseSize(t *testing.T) {
	for _, c := range []struct {
		in   string
		want int64
	}{
		{"1048576", 1 << 20},
		{"1", 1},
		{"500MB", 500_000_000},
		{"500 mb", 500_000_000},
		{"2GiB", 2_147_483_648},
		{"1.5GiB", 1_610_612_736},
		{"4 GiB", 4_294_967_296},
		{"3kB", 3000},
		{"1KiB", 1024},
		{"2TB", 2_000_000_000_000},
		{"1TiB", 1_099_511_627_776},
		{"100 bytes", 100},
		{"7B", 7},
		{"1.9", 1}, // fractions of a byte are dropped
	} {
		got, err := ParseSize(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseSize(%q) = %d, %v; want %d", c.in, got, err, c.want)
		}
	}
	for _, bad := range []string{"", "lots", "2GB/s", "0", "0.5", "-5", "1.2.3MB", "5 G", "9999999999TiB", "."} {
		if n, err := ParseSize(bad); err == nil {
			t.Errorf("ParseSize(%q) = %d, want an error", bad, n)
		}
	}
}

// FormatSize names the largest binary unit reached and never rounds up
// (a size shown is never more than the size).
func TestFormatSize(t *testing.T) {
	for _, c := range []struct {
		in   int64
		want string
	}{
		{0, "0 bytes"},
		{1023, "1023 bytes"},
		{1024, "1 KiB"},
		{1_000_000, "976.5 KiB"}, // 976.5625 KiB
		{DefaultMaxBytes, "4 GiB"},
		{5<<20 - 1, "4.9 MiB"},
		{1 << 40, "1 TiB"},
	} {
		if got := FormatSize(c.in); got != c.want {
			t.Errorf("FormatSize(%d) = %q, want %q", c.in, got, c.want)
		}
	}
}

// unsafePath refuses every name that could leave the folder it is
// written under, and only those (and names not in clean form).
func TestUnsafePath(t *testing.T) {
	for _, ok := range []string{"config.toml", "figures/ns-r.svg", "a..b", "..a/b", "a/b..", "x/.hidden"} {
		if msg := unsafePath(ok, false); msg != "" {
			t.Errorf("unsafePath(%q) = %q, want accepted", ok, msg)
		}
	}
	for _, bad := range []string{"", "/etc/passwd", "..", "../x", "a/../../x", "a/..", "./x", "a//b", "a/", `a\b`, `..\x`} {
		if unsafePath(bad, false) == "" {
			t.Errorf("unsafePath(%q) accepted", bad)
		}
	}
	for _, dir := range []string{".", "./", "figures/", "figures"} {
		if msg := unsafePath(dir, true); msg != "" {
			t.Errorf("folder %q refused: %s", dir, msg)
		}
	}
	if unsafePath("../", true) == "" {
		t.Error(`folder "../" accepted`)
	}
}
