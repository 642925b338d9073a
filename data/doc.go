// Package data is baleassay's memory: the event model of the records
// (sites, bales, pulls and the settings that travel), their strict
// deterministic CBOR encoding, the one validation every writer uses, the
// embedded bbolt store and the offline spatial index of pickup sites.
//
// # Events
//
// Every change is an immutable [Event]: entity id (UUIDv7), kind, author
// device, a hybrid logical clock stamp ([HLC], Kulkarni et al., "Logical
// Physical Clocks", OPODIS 2014), the ids of the events it supersedes and a
// typed payload. An event's id is the SHA-256 of its encoding in the core
// deterministic form of RFC 8949 §4.2 ([EncodeEvent]); [DecodeEvent] is
// strict and insists that the bytes re-encode to themselves, so an id
// always names exactly one event. A deletion is a tombstone event and is
// never dropped.
//
// # Fold
//
// The current state of an entity is the set of its events that no other
// event of the same entity supersedes (its heads, [Fold]). One head is a
// settled value; more than one is a conflict that stays visible until a
// new event supersedes them all. Views order events by (clock, device id,
// event id). Because the state depends only on the set of events, stores
// merge by plain set union, in any order, any number of times.
//
// # Store
//
// [Open] opens a bbolt database in a directory. A save returns only after
// its transaction is committed and synced; a failed write stops all later
// writes. A second process gets [ErrStoreInUse] quickly.
//
// # Site index
//
// Sites are indexed as points on the unit sphere with rtreego; the
// Euclidean (chord) order of unit vectors is the great-circle order, so
// no special case is needed at the poles or the antimeridian. Distances
// are reported by the haversine formula (Sinnott, Sky & Telescope 68
// (1984) 159) with the IUGG mean Earth radius 6371.0088 km.
//
// # Region summaries and the demo
//
// [Store.Summarize] gives, for the sites a query found and a date range,
// the number of bales and the mean, sample SD, minimum and maximum of
// their target-PET and contaminant-group shares, each bale estimated from
// its pulls by Cochran's ratio estimator (package assess). [WriteDemo]
// writes an invented scenario into a store of its own.
//
// Units: masses in kg, lengths in m, distances in km, angles in degrees
// (WGS 84 latitude and longitude), times in Unix milliseconds (UTC).
package data
