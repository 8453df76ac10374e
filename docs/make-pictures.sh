#!/usr/bin/env bash
# Regenerates every picture in docs/images from the example cases:
#   bash docs/make-pictures.sh
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release -q
out=$(mktemp -d)
mkdir -p docs/images
for case in cases/*.toml; do
  name=$(basename "$case" .toml)
  ./target/release/lodestone solve "$case" -o "$out/$name" --quiet > /dev/null
  # A sweep writes one folder per variant: take the first.
  dir="$out/$name"
  [ -f "$dir/field-map.svg" ] || dir="$out/$name/variant-0000"
  cp "$dir/field-map.svg" "docs/images/$name-field-map.svg"
done
rm -rf "$out"
echo "pictures written to docs/images"
