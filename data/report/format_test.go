package report

import "testing"

func TestFormats(t *testing.T) {
	// Source: hand-worked roundings (common practice).
	for _, c := range []struct{ got, want string }{
		{pct(0.8843), "88.4\u00a0%"},
		{pct(0.0030), "0.30\u00a0%"},
		{pct(0.00092), "0.092\u00a0%"},
		{pct(0), "0.0\u00a0%"},
		{pctRange(0.00087, 0.00123), "0.087–0.123\u00a0%"},
		{pctUp(0.0008524488), "0.086\u00a0%"},
		{pctUp(0.0123), "1.3\u00a0%"},
		{pctUp(0.5), "50\u00a0%"},
		{kg(645.21), "645.2\u00a0kg"},
		{kg(4.086), "4.09\u00a0kg"},
		{kg(0.677), "0.677\u00a0kg"},
		{tonnes(62659), "62.66\u00a0t"},
		{num(533.0, 1), "533"},
		{fixed(-0.0001, 2), "0.00"},
		{level(0.9), "90\u00a0%"},
		{latText(-33.9, 1), "33.9°S"},
		{lonText(-179.5, 1), "179.5°W"},
		{lonText(181, 0), "179°W"},
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
	for _, c := range []struct{ in, max, step float64 }{{0.87, 1, 0.2}, {3.6, 5, 1}, {1.9, 2, 0.5}, {0.0027, 0.005, 0.001}, {62, 100, 20}} {
		if m, s := niceMax(c.in); m != c.max || s != c.step {
			t.Errorf("niceMax(%v) = %v, %v; want %v, %v", c.in, m, s, c.max, c.step)
		}
	}
}
