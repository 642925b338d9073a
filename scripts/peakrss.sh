#!/usr/bin/env bash
# Runs a command and reports its wall time, CPU time and peak memory, read
# from /proc/PID every 20 ms with no process started while it runs:
# peak VmRSS (resident set), and at their own peaks RssAnon (heap, stacks:
# what the process itself holds) and RssFile (pages of mapped files, e.g.
# the store's bbolt file: clean page cache the kernel can drop at any
# time). VmHWM, the kernel's own high-water mark of the resident set, is
# what /usr/bin/time -v reports as "Maximum resident set size". cpu_s is
# user + system time of all the command's threads (on a shared machine it
# varies less than the wall time).
#   usage: scripts/peakrss.sh LABEL COMMAND [ARG...]
# Prints: LABEL wall_s=… cpu_s=… hwm_mb=… rss_mb=… anon_mb=… file_mb=… status=…
set -u
label=$1; shift
exec 3< <(exec sleep 2147483647) # a pipe nobody writes: read -t on it is a sleep without a process
start=$(date +%s.%N)
"$@" >/dev/null 2>"${PEAKRSS_ERR:-/dev/null}" &
pid=$!
hwm=0 rss=0 anon=0 file=0 ticks=0
while read -r -a st 2>/dev/null <"/proc/$pid/stat"; do
  ticks=$((st[13] + st[14])) # utime + stime, all threads (kept by a zombie until reaped)
  [ "${st[2]}" = Z ] && break
  while read -r k v _; do
    case $k in
      VmRSS:) [ "$v" -gt "$rss" ] && rss=$v ;;
      RssAnon:) [ "$v" -gt "$anon" ] && anon=$v ;;
      RssFile:) [ "$v" -gt "$file" ] && file=$v ;;
      VmHWM:) [ "$v" -gt "$hwm" ] && hwm=$v ;;
    esac
  done 2>/dev/null <"/proc/$pid/status"
  read -r -t 0.02 -u 3 _ || true
done
wait "$pid"; status=$?
end=$(date +%s.%N)
hz=$(getconf CLK_TCK)
awk -v l="$label" -v s="$start" -v e="$end" -v t="$ticks" -v hz="$hz" -v h="$hwm" -v r="$rss" -v a="$anon" -v f="$file" -v st="$status" \
  'BEGIN { printf "%s wall_s=%.2f cpu_s=%.2f hwm_mb=%.1f rss_mb=%.1f anon_mb=%.1f file_mb=%.1f status=%d\n", l, e-s, t/hz, h/1024, r/1024, a/1024, f/1024, st }'
