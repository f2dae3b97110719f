#!/bin/sh
# make demo: run eigenframe on the shipped equipment-platform example and say where
# everything went.
set -eu
BIN=${EF_BIN:-bin/eigenframe}
mkdir -p out
cp examples/platform.yaml out/platform.yaml
echo "== eigenframe check examples/platform.yaml"
"$BIN" check out/platform.yaml
echo
echo "== eigenframe run examples/platform.yaml   (static, modal, buckling, P-delta)"
"$BIN" run out/platform.yaml --quiet --timings
echo
echo "== pictures"
"$BIN" plot out/platform.h5 --mode 1 -o out/platform-mode1.svg
"$BIN" plot out/platform.h5 --mode 2 --view plan -o out/platform-mode2-plan.svg
"$BIN" plot out/platform.h5 --buckling ULS-1 1 -o out/platform-buckling1.svg
"$BIN" plot out/platform.h5 --static dead -o out/platform-dead.svg
"$BIN" plot out/platform.h5 --second-order ULS-1 --diagram My -o out/platform-ULS-1-My.svg
"$BIN" plot out/platform.h5 --walking -o out/platform-walking-R.svg
echo
echo "== the lowest natural frequencies, read back from the results file"
"$BIN" show out/platform.h5 modal | grep -A 12 "== natural frequencies"
echo
echo "Outputs:"
for f in out/platform.txt out/platform.h5 out/*.svg; do
    [ -f "$f" ] && echo "  $f"
done
echo "Read the report:   less out/platform.txt"
echo "Show it again:     $BIN show out/platform.h5"
echo "Open a picture:    out/platform-mode1.svg (any web browser)"
