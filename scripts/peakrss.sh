#!/usr/bin/env bash
# Runs a command and reports its wall time and peak memory, read from
# /proc/PID/status every 20 ms: peak VmRSS (resident set), and at their own
# peaks RssAnon (heap, stacks: what the process itself holds) and RssFile
# (pages of mapped files, e.g. the store's bbolt file: clean page cache the
# kernel can drop at any time). VmHWM, the kernel's own high-water mark
# of the resident set, is read last and is what /usr/bin/time -v reports
# as "Maximum resident set size".
#   usage: scripts/peakrss.sh LABEL COMMAND [ARG...]
# Prints one line: LABEL wall_s=… hwm_mb=… rss_mb=… anon_mb=… file_mb=… status=…
set -u
label=$1; shift
start=$(date +%s.%N)
"$@" >/dev/null 2>"${PEAKRSS_ERR:-/dev/null}" &
pid=$!
hwm=0 rss=0 anon=0 file=0
kb() { awk -v k="$1" '$1==k":" {print $2}' "/proc/$pid/status" 2>/dev/null; }
while kill -0 "$pid" 2>/dev/null; do
  if s=$(cat "/proc/$pid/status" 2>/dev/null); then
    r=$(awk '$1=="VmRSS:"{print $2}' <<<"$s"); a=$(awk '$1=="RssAnon:"{print $2}' <<<"$s")
    f=$(awk '$1=="RssFile:"{print $2}' <<<"$s"); h=$(awk '$1=="VmHWM:"{print $2}' <<<"$s")
    [ -n "$r" ] && [ "$r" -gt "$rss" ] && rss=$r
    [ -n "$a" ] && [ "$a" -gt "$anon" ] && anon=$a
    [ -n "$f" ] && [ "$f" -gt "$file" ] && file=$f
    [ -n "$h" ] && [ "$h" -gt "$hwm" ] && hwm=$h
  fi
  sleep 0.02
done
wait "$pid"; status=$?
end=$(date +%s.%N)
awk -v l="$label" -v s="$start" -v e="$end" -v h="$hwm" -v r="$rss" -v a="$anon" -v f="$file" -v st="$status" \
  'BEGIN { printf "%s wall_s=%.2f hwm_mb=%.1f rss_mb=%.1f anon_mb=%.1f file_mb=%.1f status=%d\n", l, e-s, h/1024, r/1024, a/1024, f/1024, st }'
