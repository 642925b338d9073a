// Package data is baleassay's memory, in rooms that each have one job;
// this package itself holds no code, only this map and the test that
// keeps the imports pointing one way (imports_test.go).
//
//	record    the event model: kinds, payloads, ids, the hybrid logical
//	          clock, strict deterministic CBOR, validation, fold, the
//	          batch check every writer uses
//	geo       haversine distances and the unit-sphere R-tree of sites
//	store     the bbolt store: commit, apply, edit, read, drafts, views
//	transfer  signed bundle files: COSE, device keys, trust, export,
//	          import, inspect
//	demo      the invented scenario of the demo store
//	report    self-contained HTML reports (inline SVG charts) of what the
//	          desk gathers: a bale, a site, a region
//
// Imports point one way: record ← geo ← store ← transfer, demo. The
// domain packages never import gioui.org; assess and yield know no
// storage.
//
// Units everywhere: masses in kg, lengths in m, distances in km, angles
// in degrees (WGS 84), times in Unix milliseconds (UTC).
package data
