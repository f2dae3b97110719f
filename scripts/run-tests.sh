#!/bin/sh
# The whole test suite (called by `make test`): cmocka unit tests, the model golden
# files (bad models: exact messages and exit status 2; good models: exit 0), and the
# Python reference checks (pytest). Ends with one line "N passed, N failed".
# Usage: EF_BIN=bin/eigenframe PYTHON=/usr/bin/python3 sh scripts/run-tests.sh UNIT_BINARIES...
set -u
EF_BIN=${EF_BIN:-bin/eigenframe}
PYTHON=${PYTHON:-/usr/bin/python3}
passed=0
failed=0
failures=""
log=$(mktemp)
trap 'rm -f "$log"' EXIT

# 1. cmocka unit tests: each binary prints "[  PASSED  ] N test(s)." and "[  FAILED  ] ..."
for t in "$@"; do
    "$t" >"$log" 2>&1
    rc=$?
    p=$(sed -n 's/^\[  PASSED  \] \([0-9]*\) test.*/\1/p' "$log" | tail -n 1)
    f=$(sed -n 's/^\[  FAILED  \] \([0-9]*\) test.*/\1/p' "$log" | tail -n 1)
    passed=$((passed + ${p:-0}))
    failed=$((failed + ${f:-0}))
    if [ "$rc" -ne 0 ]; then
        [ -z "$f" ] && failed=$((failed + 1))
        failures="$failures $(basename "$t")"
        cat "$log"
    else
        echo "unit $(basename "$t"): ${p:-0} passed"
    fi
done

# 2. bad models: `eigenframe check` must exit 2 and print exactly expected.err
for d in tests/models/bad/*/; do
    [ -f "$d/model.yaml" ] || continue
    "$EF_BIN" check "${d}model.yaml" >/dev/null 2>"$log"
    rc=$?
    if [ "$rc" -eq 2 ] && diff -u "${d}expected.err" "$log" >/dev/null 2>&1; then
        passed=$((passed + 1))
    else
        failed=$((failed + 1))
        failures="$failures $d"
        echo "FAIL bad model $d (exit $rc); expected vs got:"
        diff -u "${d}expected.err" "$log"
    fi
done
echo "bad models: checked"

# 3. good models: `eigenframe check` must accept them
for f in tests/models/good/*.yaml examples/*.yaml; do
    [ -f "$f" ] || continue
    if "$EF_BIN" check "$f" >/dev/null 2>"$log"; then
        passed=$((passed + 1))
    else
        failed=$((failed + 1))
        failures="$failures $f"
        echo "FAIL good model $f:"; cat "$log"
    fi
done
echo "good models: checked"

# 4. Python reference checks (NumPy/SciPy/h5py as independent references)
if ls tests/py/test_*.py >/dev/null 2>&1; then
    EF_BIN="$EF_BIN" "$PYTHON" -m pytest -q -p no:cacheprovider tests/py >"$log" 2>&1
    cat "$log" | tail -n 30
    p=$(grep -Eo '[0-9]+ passed' "$log" | tail -n 1 | grep -Eo '[0-9]+')
    f=$(grep -Eo '[0-9]+ (failed|error)' "$log" | awk '{s+=$1} END {print s+0}')
    passed=$((passed + ${p:-0}))
    failed=$((failed + ${f:-0}))
    if ! grep -Eq '[0-9]+ passed' "$log"; then failed=$((failed + 1)); fi
    [ "${f:-0}" -gt 0 ] && failures="$failures tests/py"
fi

[ -n "$failures" ] && echo "failing:$failures"
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ] && [ "$passed" -gt 0 ]
