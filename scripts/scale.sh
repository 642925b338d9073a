#!/usr/bin/env bash
# The lab's merge at scale: the figures of DEVELOPERS.md ("The lab's merge
# at scale"), each from a separate `bale` process measured by
# scripts/peakrss.sh (wall time, peak resident set, heap and mapped-file
# parts). Heavy: run one step at a time on a quiet machine; never part of
# `make test`.
#
#   scripts/scale.sh [STEP...]        (default: growth lab open export)
#
#   growth   N = 250k, 500k, 1M, 2M events (bundles of --per-bundle events)
#            into an empty store: time, events/s, peak memory
#   lab      1M events (season A) into an empty store; 1M more (season B,
#            the next year) into that store; season A again (all present);
#            1M of the same weeks from other devices (season C)
#   open     open the 2M store to a ready site index and answer a query
#   export   export every event of the 1M store
#   bundle   single bundles of 10k..80k sites, pulls and edits (Go benchmark)
#   cap      single bundles up to the 64 MiB cap, each in its own process
#
# Environment: SCALE_DIR (work folder, default /tmp/baleassay-scale; the
# bundles of 2M events take about 850 MB), SCALE_PER_BUNDLE (default 5500,
# which makes about 200 bundles of 1,000,000 events), SCALE_DEVICES (6).
# SCALE_IMPORTER=PATH imports with another build of bale (e.g. one of an
# older commit, for before-and-after figures; the bundles are still made
# by this one) and SCALE_LABEL prefixes the result lines.
set -euo pipefail
cd "$(dirname "$0")/.."
root=$(pwd)
work=${SCALE_DIR:-/tmp/baleassay-scale}
per=${SCALE_PER_BUNDLE:-5500}
devices=${SCALE_DEVICES:-6}
mkdir -p "$work"
bale="$work/bale"
CGO_ENABLED=0 go build -o "$bale" ./cmd/bale
importer=${SCALE_IMPORTER:-$bale}
yes=--yes # trust add asks on a terminal; older builds know no --yes
"$importer" help trust 2>&1 | grep -q -- --yes || yes=
prefix=${SCALE_LABEL:+$SCALE_LABEL-}
results="$work/results.txt"
rss="$root/scripts/peakrss.sh"

log() { echo "$*" | tee -a "$results"; }

# gen N SEED END: bundles of a generated season, made once.
gen() {
	local n=$1 seed=$2 end=$3 dir="$work/bundles-$1-$2-$3"
	if [ ! -f "$dir/.done" ]; then
		rm -rf "$dir"
		"$bale" demo --events "$n" --seed "$seed" --end "$end" --devices "$devices" --per-bundle "$per" --bundles "$dir" >"$dir.txt"
		touch "$dir/.done"
	fi
	echo "$dir"
}

# trust DIR STORE: trust the devices of a bundle folder in a store
# (those already trusted stay as they are).
trust() {
	local k out
	for k in "$1"/keys/*.pem; do
		if ! out=$("$importer" trust add "$k" --name "$(basename "$(dirname "$(dirname "$k")")")-$(basename "$k" .pem)" $yes --store "$2" 2>&1); then
			grep -q "already trusted" <<<"$out" || { echo "$out" >&2; return 1; }
		fi
	done
}

# import LABEL BUNDLES STORE: one measured import process.
import() {
	local label=$1 dir=$2 store=$3
	local files events
	files=$(ls "$dir"/*.bale | wc -l)
	events=$(awk '/generated season/ {print $5}' "$dir.txt")
	trust "$dir" "$store"
	local line
	line=$(PEAKRSS_ERR=/dev/null "$rss" "$prefix$label" "$importer" import "$dir" --store "$store" --allow-demo)
	local wall
	wall=$(sed 's/.*wall_s=\([0-9.]*\).*/\1/' <<<"$line")
	log "$line events=$events bundles=$files events_per_s=$(awk -v e="$events" -v w="$wall" 'BEGIN{printf "%.0f", e/w}') store_mb=$(du -m "$store/records.db" | cut -f1)"
}

step_growth() {
	log "# growth: $(date -u +%FT%TZ), $(nproc) CPUs, load $(cut -d' ' -f1-3 /proc/loadavg)"
	for n in 250000 500000 1000000 2000000; do
		local dir store="$work/store-$prefix$n"
		dir=$(gen "$n" 1 2025-11-28)
		rm -rf "$store"
		import "growth-$n" "$dir" "$store"
	done
}

step_lab() {
	log "# lab: $(date -u +%FT%TZ), load $(cut -d' ' -f1-3 /proc/loadavg)"
	local a b c store="$work/store-lab"
	a=$(gen 1000000 1 2024-11-29)
	b=$(gen 1000000 2 2025-11-28)
	c=$(gen 1000000 3 2024-11-29)
	rm -rf "$store"
	import "lab-empty-1M" "$a" "$store"
	cp -r "$store" "$store-a"
	import "lab-full-1M-next-season" "$b" "$store"
	import "lab-again-1M-all-present" "$a" "$store"
	import "lab-full-1M-same-weeks" "$c" "$store-a"
	rm -rf "$store-a"
}

step_open() {
	local store="$work/store-2000000"
	[ -f "$store/records.db" ] || { echo "run the growth step first" >&2; return 1; }
	log "# open: $(date -u +%FT%TZ), load $(cut -d' ' -f1-3 /proc/loadavg)"
	for i in 1 2 3; do
		log "$("$rss" "open-2M-sites-near-$i" "$bale" sites near 47 3 -k 5 --store "$store")"
	done
	log "$("$rss" "open-2M-sites-list" "$bale" sites list --store "$store")"
}

step_export() {
	local store="$work/store-1000000" out="$work/export-1M"
	[ -f "$store/records.db" ] || { echo "run the growth step first" >&2; return 1; }
	log "# export: $(date -u +%FT%TZ), load $(cut -d' ' -f1-3 /proc/loadavg)"
	rm -rf "$out" && mkdir -p "$out"
	local line wall
	line=$("$rss" "export-1M" "$bale" export --to "$out/" --all --store "$store")
	wall=$(sed 's/.*wall_s=\([0-9.]*\).*/\1/' <<<"$line")
	log "$line events=1000000 files=$(ls "$out" | wc -l) events_per_s=$(awk -v w="$wall" 'BEGIN{printf "%.0f", 1000000/w}')"
}

step_bundle() {
	log "# bundle: $(date -u +%FT%TZ), load $(cut -d' ' -f1-3 /proc/loadavg)"
	go test ./data/transfer -run '^$' -bench 'ImportOneBundle' -benchtime 1x -count 1 | grep Benchmark | tee -a "$results"
}

# One bundle of each mix up to the 64 MiB cap, each imported into an
# empty store by a process of its own.
step_cap() {
	local dir="$work/one-bundles" sizes=${SCALE_ONE_BUNDLE:-80000,160000,320000,400000}
	log "# cap: $(date -u +%FT%TZ), load $(cut -d' ' -f1-3 /proc/loadavg)"
	rm -rf "$dir"
	BALEASSAY_WRITE_BUNDLES="$dir" BALEASSAY_ONE_BUNDLE="$sizes" go test ./data/transfer -run '^TestWriteOneBundles$' -count 1 >/dev/null
	local f store
	for f in "$dir"/*.bale; do
		store="$work/store-one"
		rm -rf "$store"
		"$importer" trust add "$dir/keys/bench.pem" --name bench $yes --store "$store" >/dev/null
		log "$("$rss" "one-$(basename "$f" .bale)" "$importer" import "$f" --store "$store") bytes=$(stat -c %s "$f")"
	done
}

steps=("$@")
[ ${#steps[@]} -gt 0 ] || steps=(growth lab open export)
for s in "${steps[@]}"; do
	"step_$s"
done
