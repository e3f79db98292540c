#!/usr/bin/env bash
# make demo: scaffold the invented demo project in a scratch folder, fit it,
# seal the bundle, verify it, and say where everything is.
set -euo pipefail
BIN=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
if ! "$BIN" help 2>/dev/null | grep -q '^  init'; then
  echo "fitseal demo: not yet — the project runner and bundle are still being built;"
  echo "for now, try: $BIN families"
  "$BIN" families
  exit 0
fi
DIR=${DEMO_DIR:-$(mktemp -d -t fitseal-demo.XXXXXX)}
"$BIN" init "$DIR/project"
"$BIN" run -q --key "$DIR/demo-key" -o "$DIR/demo.tar.gz" "$DIR/project/fitseal.toml"
"$BIN" verify "$DIR/demo.tar.gz"
echo "bundle: $DIR/demo.tar.gz"
