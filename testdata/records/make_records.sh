#!/bin/bash
# Makes the records in this folder: the invented demo workshop as earlier
# builds of Parley seeded it and exported it. For each commit it builds
# that commit's parley, serves a new database for a few seconds (which
# seeds the demo), stops it, and exports workshop 1 as JSON with the same
# build. Run from anywhere inside the repository; needs Go and gcc (cgo).
#   testdata/records/make_records.sh 2356720 7c8c05c 6f74401 868acb0 3718eac
set -eu
repo=$(git rev-parse --show-toplevel)
out="$repo/testdata/records"
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
for c in "$@"; do
  git -C "$repo" worktree add -q --detach "$tmp/src-$c" "$c"
  (cd "$tmp/src-$c" && go build -o "$tmp/parley-$c" ./cmd/parley)
  git -C "$repo" worktree remove --force "$tmp/src-$c"
  port=$((18000 + RANDOM % 1000))
  "$tmp/parley-$c" serve --db "$tmp/$c.db" --addr "127.0.0.1:$port" > "$tmp/$c.log" 2>&1 &
  pid=$!
  sleep 6
  kill "$pid"; wait "$pid" 2>/dev/null || true
  "$tmp/parley-$c" export --db "$tmp/$c.db" --workshop 1 --format json --out "$out/demo_$c.json"
done
