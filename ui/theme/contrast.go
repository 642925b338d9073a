package theme

import (
	"image/color"
	"math"
)

// RelativeLuminance is the relative luminance of an opaque sRGB colour,
// as WCAG 2.2 defines it (Understanding SC 1.4.3, "relative luminance"):
//
//	c  = channel / 255
//	c' = c / 12.92                     if c ≤ 0.04045
//	c' = ((c + 0.055) / 1.055) ^ 2.4   otherwise
//	L  = 0.2126 R' + 0.7152 G' + 0.0722 B'
//
// (WCAG quotes 0.03928 for the threshold; the sRGB standard IEC 61966-2-1
// says 0.04045. No 8-bit channel lies between the two, so both give the
// same L.) Alpha is ignored: callers pass the colour as seen.
func RelativeLuminance(c color.NRGBA) float64 {
	lin := func(v uint8) float64 {
		s := float64(v) / 255
		if s <= 0.04045 {
			return s / 12.92
		}
		return math.Pow((s+0.055)/1.055, 2.4)
	}
	return 0.2126*lin(c.R) + 0.7152*lin(c.G) + 0.0722*lin(c.B)
}

// ContrastRatio is the WCAG 2.2 contrast ratio of two colours,
//
//	(L1 + 0.05) / (L2 + 0.05)
//
// with L1 the lighter one's relative luminance; it runs from 1 to 21.
func ContrastRatio(a, b color.NRGBA) float64 {
	la, lb := RelativeLuminance(a), RelativeLuminance(b)
	if la < lb {
		la, lb = lb, la
	}
	return (la + 0.05) / (lb + 0.05)
}
