#!/bin/bash
# Makes the records in this folder: the invented demo workshop as earlier
# builds of Parley seeded it and exported it. For each commit it builds
# that commit's parley, serves a new database for a few seconds (which
# seeds the demo), stops it, and exports workshop 1 as JSON with the same
# build. A commit written COMMIT:tiny also saves, through the first
# expert's private link, an answer of three values a hair above 0 to
# question 1 (which that build took and today's rules refuse), and
# writes demo_COMMIT_tiny.json and the database, demo_COMMIT_tiny.db. Run from anywhere inside the repository;
# needs Go, gcc (cgo) and curl.
#   testdata/records/make_records.sh 2356720 7c8c05c 6f74401 868acb0 3718eac 7c8c05c:tiny
set -eu
repo=$(git rev-parse --show-toplevel)
out="$repo/testdata/records"
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
for arg in "$@"; do
  c=${arg%%:*}
  name=$c
  [ "$arg" != "$c" ] && name="${c}_${arg#*:}"
  git -C "$repo" worktree add -q --detach "$tmp/src-$c" "$c"
  (cd "$tmp/src-$c" && go build -o "$tmp/parley-$c" ./cmd/parley)
  git -C "$repo" worktree remove --force "$tmp/src-$c"
  port=$((18000 + RANDOM % 1000))
  "$tmp/parley-$c" serve --db "$tmp/$name.db" --addr "127.0.0.1:$port" > "$tmp/$name.log" 2>&1 &
  pid=$!
  sleep 6
  if [ "$name" != "$c" ]; then
    link=$(grep -o "http://127.0.0.1:$port/e/[^ ]*" "$tmp/$name.log" | head -1)
    curl -s -o /dev/null -H "Origin: http://127.0.0.1:$port" -X POST \
      --data-urlencode "values[0]=4.9e-324" --data-urlencode "values[1]=1e-323" \
      --data-urlencode "values[2]=1.5e-323" --data-urlencode "reason=a hair above 0 (invented)" \
      "${link}q/1/save"
  fi
  kill "$pid"; wait "$pid" 2>/dev/null || true
  "$tmp/parley-$c" export --db "$tmp/$name.db" --workshop 1 --format json --out "$out/demo_$name.json"
  if [ "$name" != "$c" ]; then
    # The database itself, as that build left it, for the upgrade test.
    cp "$tmp/$name.db" "$out/demo_$name.db"
  fi
done
