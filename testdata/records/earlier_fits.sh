#!/bin/bash
# Makes earlier_fits/fits_COMMIT.jsonl: the fits the build at each COMMIT
# makes of the same invented judgements (earlier_fits/gen.go.txt, copied
# into that build's tree and run there with its own elicit package).
#   testdata/records/earlier_fits.sh 2356720 7c8c05c
set -eu
repo=$(git rev-parse --show-toplevel)
out="$repo/testdata/records/earlier_fits"
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
for c in "$@"; do
  mkdir -p "$tmp/$c"
  git -C "$repo" archive "$c" | tar -x -C "$tmp/$c"
  mkdir -p "$tmp/$c/cmd/earlierfits"
  cp "$out/gen.go.txt" "$tmp/$c/cmd/earlierfits/main.go"
  (cd "$tmp/$c" && go run ./cmd/earlierfits > "$out/fits_$c.jsonl")
done
