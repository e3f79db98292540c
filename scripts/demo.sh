#!/usr/bin/env bash
# make demo: scaffold the invented demo project in a scratch folder, fit it,
# seal the bundle, verify it, and say where everything is.
set -euo pipefail
BIN=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
DIR=${DEMO_DIR:-$(mktemp -d -t fitseal-demo.XXXXXX)}
"$BIN" init "$DIR/project"
echo
# A key for the demo only, so that the demo leaves your default key alone.
"$BIN" keygen -o "$DIR/demo-key" >/dev/null
"$BIN" run -q --key "$DIR/demo-key" -o "$DIR/demo.tar.gz" "$DIR/project/fitseal.toml"
echo
"$BIN" verify --key "$DIR/demo-key.pub" "$DIR/demo.tar.gz"
"$BIN" extract "$DIR/demo.tar.gz" "$DIR/unpacked" >/dev/null
NAME=$(sed -n 's/^name = "\(.*\)".*/\1/p' "$DIR/project/fitseal.toml" | head -1)
echo
echo "bundle:  $DIR/demo.tar.gz"
echo "report:  $DIR/unpacked/$NAME/data/report.pdf"
echo "tables:  $DIR/unpacked/$NAME/data/tables/"
echo "figures: $DIR/unpacked/$NAME/data/figures/"
echo "next:    $BIN show $DIR/demo.tar.gz"
