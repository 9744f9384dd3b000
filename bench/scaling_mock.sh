# Sourced by bench/stage_scaling and bench/hundred_pc: scalingMock STARCENSUS COUNT prints the path of the
# ~COUNT-star mock within 100 pc (our simulator at a space density scaled to the count; seed 1), and
# simulates it under bench/data/scaling/ (git-ignored) the first time.
scalingMock() {
    local starcensus="$1" count="$2"
    local data
    data="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)/data/scaling"
    # The simulator's default 0.1 systems per pc^3 gives 268,009 rows within 100 pc (seed 1).
    local rows_at_default_density=268009
    local mock="$data/mock_$count.fits"
    if [[ ! -f "$mock" ]]; then
        mkdir -p "$data"
        local density
        density=$(awk "BEGIN { printf \"%.6g\", 0.1 * $count / $rows_at_default_density }")
        "$starcensus" simulate --radius-max 100 --density "$density" --out "$mock" \
            --truth "$data/truth_$count.json" > /dev/null
    fi
    echo "$mock"
}
