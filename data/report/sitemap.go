package report

import (
	"fmt"
	"math"
	"strings"

	"baleassay/data/desk"
	"baleassay/data/geo"
)

// projection is an equirectangular projection with its standard parallel
// through the map's centre (J. P. Snyder, Map Projections—A Working
// Manual, USGS Professional Paper 1395, 1987, eqs. 12-1 and 12-2):
//
//	x = R (λ − λ0) cos φ0,  y = R (φ − φ0)
//
// in km, with λ − λ0 taken into [−180°, 180°) so that a map across the
// antimeridian stays in one piece. Distances are true along meridians and
// along the centre's parallel; over a region of tens of kilometres the
// scale error elsewhere is well under one percent.
type projection struct{ lat0, lon0, cos0 float64 }

const kmPerDeg = geo.EarthRadiusKm * math.Pi / 180

func newProjection(lat0, lon0 float64) projection {
	return projection{lat0, lon0, math.Cos(lat0 * math.Pi / 180)}
}

// km projects a point to km east and north of the centre.
func (p projection) km(lat, lon float64) (float64, float64) {
	d := math.Mod(lon-p.lon0+540, 360) - 180
	return d * p.cos0 * kmPerDeg, (lat - p.lat0) * kmPerDeg
}

// centre is the mean direction of the points (as unit vectors), so that
// sites on both sides of the antimeridian centre between them.
func centre(pts [][2]float64) (lat, lon float64) {
	var x, y, z float64
	for _, p := range pts {
		u := geo.UnitVector(p[0], p[1])
		x, y, z = x+u[0], y+u[1], z+u[2]
	}
	return math.Atan2(z, math.Hypot(x, y)) * 180 / math.Pi, math.Atan2(y, x) * 180 / math.Pi
}

// mapChart draws the sites of a report: each site of the report as a
// dot whose area grows with its bale count, labelled with its name, bale
// count, mean target-PET share and latest verdict (shape and word); other
// sites near by as hollow grey rings; the region's circle when there is
// one; a scale bar, north and a graticule. Nothing is fetched: there are
// no tiles, only what is drawn here.
func mapChart(id string, r desk.SiteReport) string {
	var pts [][2]float64
	for _, s := range r.Sites {
		pts = append(pts, [2]float64{s.Site.Lat, s.Site.Lon})
	}
	lat0, lon0 := centre(pts)
	var ring [][2]float64
	if q := r.Scope.Within; q != nil {
		lat0, lon0 = q.Lat, q.Lon
		if q.Lat+q.Km/kmPerDeg < 90 && q.Lat-q.Km/kmPerDeg > -90 {
			ring = desk.CircleRing(q.Lat, q.Lon, q.Km, desk.AreaVertices)
		}
	}
	pr := newProjection(lat0, lon0)
	// Extent in km.
	minX, maxX, minY, maxY := -2.0, 2.0, -2.0, 2.0
	grow := func(x, y float64) {
		minX, maxX, minY, maxY = math.Min(minX, x), math.Max(maxX, x), math.Min(minY, y), math.Max(maxY, y)
	}
	for _, s := range r.Sites {
		grow(pr.km(s.Site.Lat, s.Site.Lon))
	}
	for _, s := range r.Others {
		grow(pr.km(s.Site.Lat, s.Site.Lon))
	}
	for _, p := range ring {
		grow(pr.km(p[1], p[0]))
	}
	padX, padY := (maxX-minX)*0.08+1, (maxY-minY)*0.08+1
	minX, maxX, minY, maxY = minX-padX, maxX+padX, minY-padY, maxY+padY
	const w, left, top = chartW, 10.0, 10.0
	plotW := w - 2*left
	scale := plotW / (maxX - minX)
	plotH := (maxY - minY) * scale
	if plotH > 560 { // tall regions: fit the height, centre the width
		scale = 560 / (maxY - minY)
		plotH = 560
	}
	offX := left + (plotW-(maxX-minX)*scale)/2
	h := top + plotH + 34
	X := func(x float64) float64 { return offX + (x-minX)*scale }
	Y := func(y float64) float64 { return top + (maxY-y)*scale }
	P := func(lat, lon float64) (float64, float64) { x, y := pr.km(lat, lon); return X(x), Y(y) }
	s := newSVG(id, w, h, "Map of the sites", fmt.Sprintf("%s of this report drawn in an equirectangular projection centred at %s, %s.",
		desk.Plural(len(r.Sites), "site", "sites"), num(lat0, 4), num(lon0, 4)))
	s.rect(X(minX), Y(maxY), (maxX-minX)*scale, plotH, "land")
	graticule(s, pr, minX, maxX, minY, maxY, X, Y)
	if len(ring) > 0 {
		var d strings.Builder
		for i, p := range ring {
			x, y := P(p[1], p[0])
			if i == 0 {
				fmt.Fprintf(&d, "M%s %s", n(x), n(y))
			} else {
				fmt.Fprintf(&d, " L%s %s", n(x), n(y))
			}
		}
		s.path(d.String()+" Z", "area")
	}
	var placed []box
	for _, o := range r.Others {
		x, y := P(o.Site.Lat, o.Site.Lon)
		s.circle(x, y, 3.5, "other")
		placed = append(placed, box{x - 4, y - 4, 8, 8})
	}
	for _, st := range r.Sites {
		x, y := P(st.Site.Lat, st.Site.Lon)
		rad := 4 + 2.2*math.Sqrt(float64(st.Bales))
		s.circle(x, y, rad, "site")
		placed = append(placed, box{x - rad, y - rad, 2 * rad, 2 * rad})
	}
	for _, st := range r.Sites {
		x, y := P(st.Site.Lat, st.Site.Lon)
		rad := 4 + 2.2*math.Sqrt(float64(st.Bales))
		line2 := desk.Plural(st.Bales, "bale", "bales")
		if st.TargetPET.N > 0 {
			line2 += " · PET " + pct(st.TargetPET.Mean)
		}
		if v := st.LatestVerdict(); v != "" {
			line2 += " · last " + glyph(v) + " " + v
		}
		label(s, &placed, x, y, rad+2, []string{st.Site.Name, line2}, "small", X(minX), X(maxX))
	}
	for _, o := range r.Others {
		x, y := P(o.Site.Lat, o.Site.Lon)
		label(s, &placed, x, y, 5, []string{o.Site.Name}, "small mute", X(minX), X(maxX))
	}
	scaleBar(s, scale, X(minX)+12, top+plotH-26)
	s.rect(X(maxX)-28, top+4, 24, 36, "legend")
	s.text(X(maxX)-16, top+18, "middle", "bold", "N")
	s.path(fmt.Sprintf("M%s %s l-5 12 l5 -3 l5 3 Z", n(X(maxX)-16), n(top+22)), "bar")
	s.text(left, h-8, "start", "small mute", "Filled dots: sites of this report (area grows with bale count); rings: other sites near by; dashed: the region searched.")
	return s.String()
}

// box is a label's or a marker's bounding box, for placing labels.
type box struct{ x, y, w, h float64 }

func (a box) overlaps(b box) bool {
	return a.x < b.x+b.w && b.x < a.x+a.w && a.y < b.y+b.h && b.y < a.y+a.h
}

// label places lines of text beside a marker: right, left, above or
// below, the first place that overlaps nothing placed yet (else right).
func label(s *svg, placed *[]box, x, y, gap float64, lines []string, class string, minX, maxX float64) {
	wd := 0.0
	for _, l := range lines {
		wd = math.Max(wd, 6.0*float64(len([]rune(l))))
	}
	ht := 13 * float64(len(lines))
	type spot struct {
		b      box
		anchor string
		tx     float64
	}
	spots := []spot{
		{box{x + gap, y - ht/2, wd, ht}, "start", x + gap},
		{box{x - gap - wd, y - ht/2, wd, ht}, "end", x - gap},
		{box{x - wd/2, y - gap - ht, wd, ht}, "middle", x},
		{box{x - wd/2, y + gap, wd, ht}, "middle", x},
	}
	best := spots[0]
	if best.b.x+best.b.w > maxX {
		best = spots[1]
	}
	for _, sp := range spots {
		if sp.b.x < minX || sp.b.x+sp.b.w > maxX {
			continue
		}
		free := true
		for _, p := range *placed {
			if sp.b.overlaps(p) {
				free = false
				break
			}
		}
		if free {
			best = sp
			break
		}
	}
	*placed = append(*placed, best.b)
	for i, l := range lines {
		cls := class + " halo"
		if i == 0 && len(lines) > 1 {
			cls += " bold"
		}
		s.text(best.tx, best.b.y+10+13*float64(i), best.anchor, cls, l)
	}
}

// graticule draws meridians and parallels at a round step in degrees.
func graticule(s *svg, pr projection, minX, maxX, minY, maxY float64, X, Y func(float64) float64) {
	spanDeg := (maxY - minY) / kmPerDeg
	step := 1.0
	for _, c := range []float64{0.01, 0.02, 0.05, 0.1, 0.2, 0.25, 0.5, 1, 2, 5, 10, 15, 30} {
		if spanDeg/c <= 6 {
			step = c
			break
		}
	}
	dig := 0
	for f := step; f < 1 && dig < 3; f *= 10 {
		dig++
	}
	for lat := math.Ceil((pr.lat0+minY/kmPerDeg)/step) * step; lat <= pr.lat0+maxY/kmPerDeg; lat += step {
		y := Y((lat - pr.lat0) * kmPerDeg)
		s.line(X(minX), y, X(maxX), y, "grid")
		s.text(X(minX)+3, y-3, "start", "small mute", latText(lat, dig))
	}
	if pr.cos0 < 1e-9 {
		return
	}
	dlon0, dlon1 := minX/(pr.cos0*kmPerDeg), maxX/(pr.cos0*kmPerDeg)
	for d := math.Ceil((pr.lon0+dlon0)/step)*step - pr.lon0; d <= dlon1; d += step {
		x := X(d * pr.cos0 * kmPerDeg)
		s.line(x, Y(maxY), x, Y(minY), "grid")
		s.text(x+3, Y(minY)-4, "start", "small mute", lonText(pr.lon0+d, dig))
	}
}

func latText(lat float64, dig int) string {
	h := "N"
	if lat < 0 {
		h = "S"
	}
	return fixed(math.Abs(lat), dig) + "°" + h
}

func lonText(lon float64, dig int) string {
	lon = math.Mod(lon+540, 360) - 180
	h := "E"
	if lon < 0 {
		h = "W"
	}
	return fixed(math.Abs(lon), dig) + "°" + h
}

// scaleBar draws a bar of a round number of km about a fifth of the map.
func scaleBar(s *svg, pxPerKm, x, y float64) {
	want := 140 / pxPerKm
	km, _ := niceMax(want)
	if km > want*1.5 {
		km /= 2
	}
	wpx := km * pxPerKm
	s.rect(x-6, y-22, wpx+12, 30, "legend")
	s.rect(x, y-5, wpx/2, 5, "bar")
	s.rect(x+wpx/2, y-5, wpx/2, 5, "outline")
	s.rect(x, y-5, wpx, 5, "outline")
	s.text(x, y-9, "start", "small", "0")
	s.text(x+wpx, y-9, "end", "small", num(km, 2)+nbsp+"km")
}
