#!/usr/bin/env bash
# Regenerates example-values.json from the current code: the `values` map of
# every example case's results.json (each sweep variant by its folder).
# Run it only for a change that is meant to move results, and say why in the commit.
set -euo pipefail
cd "$(dirname "$0")/../.."
cargo build --release --bin lodestone
work=$(mktemp -d)
for c in cases/*.toml; do
  ./target/release/lodestone solve "$c" -o "$work/$(basename "$c" .toml)" --quiet --force || [ $? -le 1 ]
done
python3 - "$work" <<'PY'
import glob, json, os, sys
work = sys.argv[1]
out = {}
for f in sorted(glob.glob(work + '/**/results.json', recursive=True)):
    out[os.path.relpath(os.path.dirname(f), work)] = json.load(open(f))['values']
json.dump(out, open('tests/baseline/example-values.json', 'w'), indent=1, sort_keys=True)
print(len(out), 'variants')
PY
rm -rf "$work"
