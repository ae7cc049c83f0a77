# Shared by full_disk_checks.sh and full_disk_commands.sh: sourced after W is set and the
# working folder made; mounts a 256 MiB tmpfs at $W/disk (root), unmounted on exit; and the
# filler and the cuts both scripts use.
fail() { echo "FAIL: $*" >&2; exit 1; }
debris() { find "$1" \( -name '.*.tmp-*' -o -name '.*.old-*' \) -print; }
used_kib() { df -k --output=used "$W/disk" | tail -n 1 | tr -d ' '; }
mount -t tmpfs -o size=256m tmpfs "$W/disk" || fail "cannot mount a tmpfs to fill"
trap 'umount "$W/disk" 2>/dev/null || true' EXIT
# Two pages that stay on the disk: tmpfs takes size=0 as no limit, and a cut may give no room.
filler() { head -c 8192 /dev/zero >"$W/disk/filler"; }

# Sizes (KiB, OFFSET added) at which the writes of an uninterrupted run fail in turn: for each of
# its files (paths on stdin), in the order written, the room the files before it take plus half
# of its own pages, rounded down (a one-page file gets no room at all: tmpfs counts pages); at
# most MAX of them, evenly spread. The order written is the order of the inode numbers, which a
# tmpfs hands out one after the other (file times are too coarse: a dozen small files share one).
# With EVEN, EVEN more sizes spread evenly up to twice the outputs: for the files a command
# writes and removes again (the parts of an integration), which the finished folder does not show.
cut_sizes() { # max, even, offset
  xargs -r -d '\n' stat -c '%i %b %F' | grep ' regular' | sort -n |
    awk -v max="$1" -v even="$2" -v off="$3" '
    { kib = int(($2 * 512 + 4095) / 4096) * 4; half = int(kib / 8) * 4
      c = off + used + half; if (n == 0 || c != last) cut[n++] = c; last = c; used += kib }
    END { m = n < max ? n : max; for (k = 0; k < m; k++) print cut[int(k * (n - 1) / (m > 1 ? m - 1 : 1))]
          for (k = 0; k < even; k++) print off + int(2 * used * k / even / 4) * 4 }' |
    sort -n | uniq
}
