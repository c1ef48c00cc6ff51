#!/usr/bin/env bash
# Coverage-guided fuzzing of the profile crate's readers (cargo-fuzz, libFuzzer).
#   scripts/fuzz.sh [target] [seconds]
# target: study_ron, waveform_csv, unit_values or all (default); seconds per target
# (default 600). Runs one job at a time, starting from the committed seeds in
# fuzz/seeds/<target>/ (with the tokens of fuzz/dicts/<target>.dict) plus the working corpus in fuzz/corpus/<target>/ (ignored by
# git); findings land in fuzz/artifacts/<target>/. Not part of CI: CI replays the
# seeds through `cargo test` instead.
set -euo pipefail
cd "$(dirname "$0")/../fuzz"

target="${1:-all}"
seconds="${2:-600}"
all=(study_ron waveform_csv unit_values)
case "$target" in
    all) targets=("${all[@]}") ;;
    study_ron | waveform_csv | unit_values) targets=("$target") ;;
    *)
        echo "unknown target '$target'; use one of: ${all[*]} all" >&2
        exit 2
        ;;
esac
if ! [[ "$seconds" =~ ^[1-9][0-9]*$ ]]; then
    echo "seconds must be a whole number > 0, got '$seconds'" >&2
    exit 2
fi

if ! cargo fuzz --version > /dev/null 2>&1; then
    cargo install cargo-fuzz --locked
fi

# cargo-fuzz passes nightly-only flags (sanitizers, coverage instrumentation); the
# stable toolchain accepts them with RUSTC_BOOTSTRAP. FUZZ_SANITIZER=none skips
# AddressSanitizer (faster, and works where ASan does not link).
export RUSTC_BOOTSTRAP=1
sanitizer="${FUZZ_SANITIZER:-address}"

for t in "${targets[@]}"; do
    mkdir -p "corpus/$t"
    echo "== fuzzing $t for $seconds s (sanitizer: $sanitizer)"
    # One process, no -jobs/-fork: the machine's two cores are shared. The dictionary
    # holds the format's tokens (units, headers, field names) the mutator splices in.
    cargo fuzz run --sanitizer "$sanitizer" "$t" "corpus/$t" "seeds/$t" -- \
        -max_total_time="$seconds" -dict="dicts/$t.dict" -print_final_stats=1
done
