#!/bin/bash
# Makes earlier_pools/pools_COMMIT.jsonl: the single Beta the build at
# each COMMIT forms of the same invented pools (earlier_pools/gen.go.txt,
# copied into that build's tree and run there with its own elicit
# package).
#   testdata/records/earlier_pools.sh 821dd3f ff655a7 2464a62
set -eu
repo=$(git rev-parse --show-toplevel)
out="$repo/testdata/records/earlier_pools"
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
for c in "$@"; do
  mkdir -p "$tmp/$c"
  git -C "$repo" archive "$c" | tar -x -C "$tmp/$c"
  mkdir -p "$tmp/$c/cmd/earlierpools"
  cp "$out/gen.go.txt" "$tmp/$c/cmd/earlierpools/main.go"
  (cd "$tmp/$c" && go run ./cmd/earlierpools > "$out/pools_$c.jsonl")
done
