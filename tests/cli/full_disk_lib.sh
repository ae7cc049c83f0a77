# Shared by full_disk_checks.sh and full_disk_commands.sh: sourced after W is set and the
# working folder made; mounts a 256 MiB tmpfs at $W/disk (root), unmounted on exit.
fail() { echo "FAIL: $*" >&2; exit 1; }
debris() { find "$1" \( -name '.*.tmp-*' -o -name '.*.old-*' \) -print; }
used_kib() { df -k --output=used "$W/disk" | tail -n 1 | tr -d ' '; }
mount -t tmpfs -o size=256m tmpfs "$W/disk" || fail "cannot mount a tmpfs to fill"
trap 'umount "$W/disk" 2>/dev/null || true' EXIT
