#!/bin/bash
# Makes the records in this folder: the invented demo workshop as earlier
# builds of Parley seeded it and exported it. For each commit it builds
# that commit's parley, serves a new database for a few seconds (which
# seeds the demo), stops it, and exports workshop 1 as JSON with the same
# build. A commit written COMMIT:tiny also saves, through the first
# expert's private link, an answer of three values a hair above 0 to
# question 1 (which that build took and today's rules refuse), and
# writes demo_COMMIT_tiny.json and the database, demo_COMMIT_tiny.db. A
# commit written COMMIT:pool signs the facilitator in with the one-time
# address the build prints in its log and, through that build's own
# forms, agrees question 1's prior from the pool under equal weights, then
# chooses performance weights (Cooke's classical model, the cut-off
# optimised) and agrees it from the pool again, and writes
# demo_COMMIT_pool.json. Run from anywhere inside the repository; needs
# Go, gcc (cgo) and curl.
#   testdata/records/make_records.sh 2356720 7c8c05c 6f74401 868acb0 3718eac 7c8c05c:tiny \
#     7c8c05c:pool d36935e:pool 821dd3f:pool ff655a7:pool 3718eac:pool
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
  if [ "${arg#*:}" = pool ]; then
    base="http://127.0.0.1:$port"
    secret=$(grep -o "/signin#[^ ]*" "$tmp/$name.log" | head -1)
    secret=${secret#/signin#}
    jar="$tmp/$name.cookies"
    post() { # path, then --data-urlencode arguments; fails unless redirected
      local path=$1; shift
      local code
      code=$(curl -s -o "$tmp/$name.body" -w '%{http_code}' -b "$jar" -c "$jar" -H "Origin: $base" -X POST "$@" "$base$path")
      if [ "$code" != 303 ]; then
        echo "$c: POST $path answered $code" >&2; head -c 3000 "$tmp/$name.body" >&2; kill "$pid"; exit 1
      fi
    }
    post /signin --data-urlencode "secret=$secret"
    # confirm_open: builds that ask for it when the round is open; earlier ones ignore it.
    post /w/1/q/1/agree --data-urlencode source=pool --data-urlencode confirm_open=on \
      --data-urlencode "rationale=The panel takes the equal-weight pool (invented)."
    post /w/1/calibration/weights --data-urlencode scheme=performance --data-urlencode alpha= \
      --data-urlencode "reason=Weights earned on the calibration questions (invented)."
    post /w/1/q/1/agree --data-urlencode source=pool --data-urlencode confirm_open=on \
      --data-urlencode "rationale=The panel takes the performance-weighted pool (invented)."
  elif [ "$name" != "$c" ]; then
    link=$(grep -o "http://127.0.0.1:$port/e/[^ ]*" "$tmp/$name.log" | head -1)
    curl -s -o /dev/null -H "Origin: http://127.0.0.1:$port" -X POST \
      --data-urlencode "values[0]=4.9e-324" --data-urlencode "values[1]=1e-323" \
      --data-urlencode "values[2]=1.5e-323" --data-urlencode "reason=a hair above 0 (invented)" \
      "${link}q/1/save"
  fi
  kill "$pid"; wait "$pid" 2>/dev/null || true
  "$tmp/parley-$c" export --db "$tmp/$name.db" --workshop 1 --format json --out "$out/demo_$name.json"
  if [ "${arg#*:}" = tiny ]; then
    # The database itself, as that build left it, for the upgrade test.
    cp "$tmp/$name.db" "$out/demo_$name.db"
  fi
done
