// Package report renders what the use-case layer (package desk) gathers
// into one self-contained HTML page per report: a bale (composition with
// intervals, verdict and limiting items, the mass flow bale → flake →
// glycolysate with the P10–P90 of the draws, glycolysis figures) or a site
// or region (trends of target PET and of each contaminant group, verdict
// counts, flake and polyol per tonne, a map of the sites).
//
// A page fetches nothing: charts are inline SVG drawn here, the map is an
// equirectangular projection of the sites with no tiles, the style is in
// the page, there is no script, and a Content-Security-Policy of
// default-src 'none' makes a browser refuse anything else. Every chart
// writes its values and units beside the marks, and verdicts carry a word
// and a shape besides their colour (WCAG 2.2, 1.4.1). The print style
// keeps each chart on one page. Footnotes name each method and its source;
// the cautions that apply close the page.
//
// The package computes nothing of its own: every figure comes from the
// desk's typed results (desk.BaleReport, desk.SiteReport). Front ends call
// the desk, then WriteBale or WriteSites, and write the file with
// desk.WriteFile (never over an existing file unless forced).
package report
