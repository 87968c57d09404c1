package seismic

import (
	"strings"
	"testing"
)

func TestParsePhase(t *testing.T) {
	for _, name := range []string{"P", "S", "PP", "SS", "PcP", "ScS", "ScP", "PcS", "SKS", "SKKS", "PKP", "PKIKP", "pP", "sS", "p", "s"} {
		ph, err := ParsePhase(name)
		if err != nil {
			t.Errorf("ParsePhase(%q): %v", name, err)
			continue
		}
		if ph.String() != name {
			t.Errorf("ParsePhase(%q).String() = %q", name, ph.String())
		}
	}
	for _, name := range []string{"", "X", "pp", "P ", " P", "Pdiff", "PKiKP", "PKIKP2", "pS", "SKP", "p\x00", "ＰcP"} {
		_, err := ParsePhase(name)
		if err == nil {
			t.Errorf("ParsePhase(%q): no error", name)
			continue
		}
		if !strings.Contains(err.Error(), "unknown phase") {
			t.Errorf("ParsePhase(%q): error %q does not say what is wrong", name, err)
		}
	}
	if (Phase{}).String() != "" {
		t.Errorf("zero Phase String() = %q", Phase{}.String())
	}
}
