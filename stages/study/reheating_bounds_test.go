package study

import (
	"errors"
	"strings"
	"testing"
)

// reheatingStudy is a study whose one [[reheating]] table starts on line 1
// and holds the given lines.
func reheatingStudy(lines string) string {
	return "[[reheating]]\n" + lines + "\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\nfamily = \"starobinsky\"\n"
}

// TestReheatingBoundsRefused: every non-finite or physically meaningless
// reheating input is a ConfigError at the line and column of its key,
// naming the key (bounds documented beside MinNStar in config.go). TOML
// spells not-a-number and infinity nan and inf; the decoder accepts them,
// so the checks must refuse them.
func TestReheatingBoundsRefused(t *testing.T) {
	cases := []struct {
		name, lines string
		line, col   int
		path, msg   string
	}{
		{"N* nan", "history = \"fixed-efolds\"\nN_star = nan", 3, 1, "reheating[0].N_star", "not finite"},
		{"N* inf", "history = \"fixed-efolds\"\nN_star = inf", 3, 1, "reheating[0].N_star", "not finite"},
		{"N* in a list", "history = \"fixed-efolds\"\nN_star = [55, -inf]", 3, 1, "reheating[0].N_star", "not finite"},
		{"N* denormal", "history = \"fixed-efolds\"\nN_star = 1e-320", 3, 1, "reheating[0].N_star", "5 <= N* <= 200"},
		{"N* 4.99", "history = \"fixed-efolds\"\nN_star = 4.99", 3, 1, "reheating[0].N_star", "5 <= N* <= 200"},
		{"N* 200.5", "history = \"fixed-efolds\"\nN_star = 200.5", 3, 1, "reheating[0].N_star", "5 <= N* <= 200"},
		{"T_reh negative", "history = \"temperature\"\nw_reh = 0\nT_reh_GeV = -1", 4, 1, "reheating[0].T_reh_GeV", "T_reh = -1 GeV"},
		{"T_reh zero", "history = \"kination\"\nT_reh_GeV = 0", 3, 1, "reheating[0].T_reh_GeV", "above today's photon temperature"},
		{"T_reh nan", "history = \"kination\"\nT_reh_GeV = nan", 3, 1, "reheating[0].T_reh_GeV", "not finite"},
		{"T_reh below T0", "history = \"kination\"\nT_reh_GeV = 1e-14", 3, 1, "reheating[0].T_reh_GeV", "above today's photon temperature"},
		{"T_reh inf", "history = \"temperature\"\nw_reh = 0\nT_reh_GeV = inf", 4, 1, "reheating[0].T_reh_GeV", "not finite"},
		{"w_reh nan", "history = \"temperature\"\nw_reh = nan\nT_reh_GeV = 1e9", 3, 1, "reheating[0].w_reh", "not finite"},
		{"w_reh -1/3", "history = \"duration\"\nw_reh = \"-1/3\"\nN_reh = 5", 3, 1, "reheating[0].w_reh", "-1/3 < w_reh <= 1"},
		{"N_reh nan", "history = \"duration\"\nw_reh = 0\nN_reh = nan", 4, 1, "reheating[0].N_reh", "not finite"},
		{"N_reh negative", "history = \"duration\"\nw_reh = 0\nN_reh = -1", 4, 1, "reheating[0].N_reh", "0 <= N_reh <= 150"},
		{"N_reh 151", "history = \"duration\"\nw_reh = 0\nN_reh = 151", 4, 1, "reheating[0].N_reh", "0 <= N_reh <= 150"},
		{"g_reh nan", "history = \"instantaneous\"\ng_reh = nan", 3, 1, "reheating[0].g_reh", "positive finite"},
		{"g_reh below 1", "history = \"instantaneous\"\ng_reh = 0.5", 3, 1, "reheating[0].g_reh", "at least 1"},
		{"g_s_reh zero", "history = \"instantaneous\"\ng_s_reh = 0", 3, 1, "reheating[0].g_s_reh", "positive finite"},
		{"g_s0 inf", "history = \"instantaneous\"\ng_s0 = inf", 3, 1, "reheating[0].g_s0", "positive finite"},
		{"T_0 negative", "history = \"instantaneous\"\nT_0_K = -2.7", 3, 1, "reheating[0].T_0_K", "positive finite"},
		{"k pivot nan", "history = \"instantaneous\"\nk_pivot_per_Mpc = nan", 3, 1, "reheating[0].k_pivot_per_Mpc", "positive finite"},
		{"T_bbn inf", "history = \"instantaneous\"\nT_bbn_GeV = inf", 3, 1, "reheating[0].T_bbn_GeV", "positive finite"},
		{"band w max nan", "history = \"band\"\nw_reh_max = nan", 3, 1, "reheating[0].w_reh_max", "finite"},
		{"band w min -inf", "history = \"band\"\nw_reh_min = -inf", 3, 1, "reheating[0].w_reh_min", "finite"},
		{"band T_min inf", "history = \"band\"\nT_min_GeV = inf", 3, 1, "reheating[0].T_min_GeV", "finite"},
		{"band T_min 0", "history = \"band\"\nT_min_GeV = 0", 3, 1, "reheating[0].T_min_GeV", "above today's photon temperature"},
		{"indented key", "history = \"kination\"\n  T_reh_GeV = -5", 3, 3, "reheating[0].T_reh_GeV", "T_reh = -5 GeV"},
	}
	for _, c := range cases {
		_, err := Parse("h.toml", []byte(reheatingStudy(c.lines)), ".")
		var ce *ConfigError
		if !errors.As(err, &ce) {
			t.Errorf("%s: error %v is not a ConfigError", c.name, err)
			continue
		}
		if ce.Line != c.line || ce.Column != c.col || ce.Path != c.path || !strings.Contains(ce.Msg, c.msg) {
			t.Errorf("%s: got %q (line %d col %d path %q), want line %d col %d path %q and %q",
				c.name, err, ce.Line, ce.Column, ce.Path, c.line, c.col, c.path, c.msg)
		}
		if want := "h.toml:"; !strings.HasPrefix(err.Error(), want) || !strings.Contains(err.Error(), c.path) {
			t.Errorf("%s: %q does not start with the file and name the key", c.name, err)
		}
	}
}

// TestReheatingBoundsInclusive: the bounds themselves are accepted (the
// checks are not off by one) and reach the history unchanged.
func TestReheatingBoundsInclusive(t *testing.T) {
	cases := []struct {
		name, lines string
		check       func(HistorySpec) bool
	}{
		{"N* = 5", "history = \"fixed-efolds\"\nN_star = 5", func(h HistorySpec) bool { return h.N == MinNStar }},
		{"N* = 200", "history = \"fixed-efolds\"\nN_star = 200", func(h HistorySpec) bool { return h.N == MaxNStar }},
		{"N_reh = 0", "history = \"duration\"\nw_reh = 1\nN_reh = 0", func(h HistorySpec) bool { return h.NReh == 0 && h.W == 1 }},
		{"N_reh = 150", "history = \"duration\"\nw_reh = 0\nN_reh = 150", func(h HistorySpec) bool { return h.NReh == MaxNReh }},
		{"g = 1", "history = \"instantaneous\"\ng_reh = 1\ng_s0 = 1", func(h HistorySpec) bool { return h.Thermal.GReh == 1 && h.Thermal.GSReh == 1 && h.Thermal.GS0 == 1 }},
		// Today's photon temperature is 2.35e-13 GeV for T_0 = 2.7255 K.
		{"T_reh just above T_0", "history = \"kination\"\nT_reh_GeV = 2.4e-13", func(h HistorySpec) bool { return h.TRehGeV == 2.4e-13 }},
		{"T_reh above a colder T_0", "history = \"kination\"\nT_0_K = 1\nT_reh_GeV = 1e-13", func(h HistorySpec) bool { return h.TRehGeV == 1e-13 }},
	}
	for _, c := range cases {
		s, err := Parse("h.toml", []byte(reheatingStudy(c.lines)), ".")
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if len(s.Histories) != 1 || !c.check(s.Histories[0]) {
			t.Errorf("%s: histories %+v", c.name, s.Histories)
		}
	}
	// A T_reh below today's photon temperature at the default T_0 but above
	// it at T_0 = 1 K is refused at the default: the bound follows T_0_K.
	if _, err := Parse("h.toml", []byte(reheatingStudy("history = \"kination\"\nT_reh_GeV = 1e-13")), "."); err == nil {
		t.Error("T_reh = 1e-13 GeV below T_0 = 2.7255 K was accepted")
	}
}

// TestSlowRollValuesRefused: non-finite slow-roll settings are refused at
// their key, and first order ending at epsilon_H = 1 takes the exact
// background's settings (it integrates that background to find the end).
func TestSlowRollValuesRefused(t *testing.T) {
	tail := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\nfamily = \"starobinsky\"\n"
	for _, c := range []struct{ name, slowRoll, path string }{
		{"end_phi nan", "method = \"first\"\nend = \"field\"\nend_phi = nan", "slow_roll.end_phi"},
		{"end_phi inf", "method = \"exact\"\nend = \"field\"\nend_phi = inf", "slow_roll.end_phi"},
		{"rtol inf", "method = \"exact\"\nrtol = inf", "slow_roll.rtol"},
		{"rtol of first order at epsilon_H", "method = \"first\"\nend = \"epsilon_H=1\"\nrtol = -1", "slow_roll.rtol"},
	} {
		_, err := Parse("s.toml", []byte("[slow_roll]\n"+c.slowRoll+"\n"+tail), ".")
		var ce *ConfigError
		if !errors.As(err, &ce) || !strings.Contains(err.Error(), c.path) {
			t.Errorf("%s: %v", c.name, err)
		}
	}
	if _, err := Parse("s.toml", []byte("[slow_roll]\nmethod = \"first\"\nend = \"epsilon_H=1\"\nrtol = 1e-9\n"+tail), "."); err != nil {
		t.Errorf("first order at epsilon_H = 1 with rtol: %v", err)
	}
}
