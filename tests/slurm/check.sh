#!/bin/bash
# The array-job recipe of docs/array-jobs.md, run on a real single-node
# Slurm (#18). Called by `cargo xtask test` with the burnin binary to use:
#
#   bash tests/slurm/check.sh target/release/burnin
#
# It installs Debian's Slurm and MUNGE when missing, starts munged,
# slurmctld and slurmd with the configuration beside this file (every state,
# spool, log and socket file under target/slurm-check), and:
#
# 1. submits the job script and the merge job exactly as the docs write
#    them (the three ```sh blocks of the Slurm section, read from the page,
#    with only --cpus-per-task lowered to 1), waits for them, and compares
#    results.json with one `burnin run --json` of the same file: the same
#    bytes;
# 2. submits them again with task 7 failing on purpose: the merge job never
#    starts, `burnin merge` refuses naming the missing shard, and a rerun of
#    only that task (the docs' third block) completes a merge equal to the
#    single run.
#
# Every daemon it started is stopped by its process id when it ends, however
# it ends; a failed or stuck job prints its logs.
set -euo pipefail

root=$(cd "$(dirname "$0")/../.." && pwd)
burnin=$(realpath "${1:?usage: check.sh PATH-TO-BURNIN}")
work="$root/target/slurm-check"
wait_secs=${BURNIN_SLURM_WAIT:-300}

say() { printf 'slurm: %s\n' "$*"; }
fail() {
    printf 'slurm: FAILED: %s\n' "$*" >&2
    for f in "$work"/slurmctld.log "$work"/slurmd.log "$work"/munge/munged.log; do
        [ -f "$f" ] && { printf -- '--- %s (last lines)\n' "$f" >&2; tail -n 25 "$f" >&2; }
    done
    for f in "$work"/job*/shards/*.log; do
        [ -s "$f" ] && { printf -- '--- %s\n' "$f" >&2; cat "$f" >&2; }
    done
    exit 1
}

# --- install what is missing ---------------------------------------------
if ! command -v slurmctld > /dev/null || ! command -v slurmd > /dev/null \
    || ! command -v sbatch > /dev/null || ! command -v munged > /dev/null; then
    say "installing Debian's Slurm and MUNGE"
    apt-get update -qq
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends \
        slurmctld slurmd slurm-client munge > /dev/null
fi

# --- start the daemons ---------------------------------------------------
rm -rf "$work"
mkdir -p "$work/munge" "$work/state" "$work/spool"
chmod 700 "$work/munge"
pids=()
stop() {
    local pid
    for pid in "${pids[@]}"; do
        kill "$pid" 2> /dev/null || true
    done
    for pid in "${pids[@]}"; do
        for _ in $(seq 50); do
            kill -0 "$pid" 2> /dev/null || break
            sleep 0.1
        done
        kill -9 "$pid" 2> /dev/null || true
    done
}
trap stop EXIT
# The id of the daemon that wrote pid file $1 (waiting for it to appear).
started() {
    for _ in $(seq 100); do
        if [ -s "$1" ]; then
            pids+=("$(cat "$1")")
            return 0
        fi
        sleep 0.1
    done
    fail "no pid file $1"
}

head -c 1024 /dev/urandom > "$work/munge/munge.key"
chmod 400 "$work/munge/munge.key"
munged --force --socket="$work/munge/munge.socket" --key-file="$work/munge/munge.key" \
    --pid-file="$work/munge/munged.pid" --log-file="$work/munge/munged.log" \
    --seed-file="$work/munge/munged.seed"
started "$work/munge/munged.pid"

host=$(hostname -s)
cpus=$(nproc)
# Free ports on the loopback for the controller and the node daemon.
read -r ctld_port slurmd_port < <(python3 -c '
import socket
s = [socket.socket() for _ in range(2)]
for x in s: x.bind(("127.0.0.1", 0))
print(*[x.getsockname()[1] for x in s])')
sed -e "s|@DIR@|$work|g; s|@HOST@|$host|g; s|@CPUS@|$cpus|g" \
    -e "s|@CTLD_PORT@|$ctld_port|g; s|@SLURMD_PORT@|$slurmd_port|g" \
    "$root/tests/slurm/slurm.conf" > "$work/slurm.conf"
export SLURM_CONF="$work/slurm.conf"
slurmctld -f "$SLURM_CONF"
started "$work/slurmctld.pid"
slurmd -f "$SLURM_CONF"
started "$work/slurmd.pid"
for _ in $(seq 100); do
    sinfo -h -o '%t' 2> /dev/null | grep -q idle && break
    sleep 0.2
done
sinfo -h -o '%t' | grep -q idle || fail "the node did not come up"
say "single-node Slurm up ($cpus CPUs, controller on port $ctld_port)"

# --- the recipe, from the docs -------------------------------------------
# The n-th ```sh block of the Slurm section of docs/array-jobs.md.
block() {
    awk -v want="$1" '
        /^## Slurm/ { in_section = 1; next }
        /^## / { in_section = 0 }
        in_section && /^```sh$/ { n++; if (n == want) { on = 1; next } }
        on && /^```$/ { exit }
        on { print }' "$root/docs/array-jobs.md"
}
script=$(block 1 | sed 's/^#SBATCH --cpus-per-task=.*/#SBATCH --cpus-per-task=1/')
submit=$(block 2)
rerun=$(block 3)
[ -n "$script" ] && [ -n "$submit" ] && [ -n "$rerun" ] || fail "docs/array-jobs.md lost a block"
grep -q -- '--array=1-32' <<< "$script" || fail "the job script is no longer an array of 32"

bin="$work/bin"
mkdir -p "$bin"
ln -s "$burnin" "$bin/burnin"
real_path="$bin:$PATH"

# Waits until none of the jobs $@ is queued or running (a job that can
# never start, its dependency having failed, counts as settled).
wait_jobs() {
    local ids waited=0
    ids=$(IFS=,; echo "$*")
    while squeue -h -j "$ids" -o '%r' 2> /dev/null | grep -qv '^DependencyNeverSatisfied$'; do
        sleep 1
        waited=$((waited + 1))
        [ "$waited" -lt "$wait_secs" ] || fail "jobs $ids still queued after ${wait_secs} s: $(squeue)"
    done
}
# JobState of every task of job $1.
states() {
    scontrol show job "$1" | sed -n 's/.*JobState=\([A-Z_]*\).*/\1/p' | sort | uniq -c \
        | awk '{ printf " %s %s", $1, $2 }'
}

# A job folder with the experiment and the job script.
job_dir() {
    mkdir -p "$work/$1"
    cp "$root/tests/slurm/experiment.json" "$work/$1/experiment.json"
    printf '%s\n' "$script" > "$work/$1/burnin-array.sh"
    printf '%s' "$work/$1"
}

PATH="$real_path" "$burnin" run --json --no-budget "$root/tests/slurm/experiment.json" > "$work/single.json"

# 1. As written.
dir=$(job_dir job1)
cd "$dir"
PATH="$real_path" bash -c "set -euo pipefail; $submit; echo \"array \$array\"" > submit.out
array=$(sed -n 's/^array //p' submit.out)
merge_job=$(sed -n 's/^Submitted batch job //p' submit.out)
[ -n "$array" ] && [ -n "$merge_job" ] || fail "submitting printed: $(cat submit.out)"
say "submitted array job $array and merge job $merge_job"
wait_jobs "$array" "$merge_job"
[ "$(states "$array")" = " 32 COMPLETED" ] || fail "array tasks: $(states "$array")"
[ "$(states "$merge_job")" = " 1 COMPLETED" ] || fail "merge job: $(states "$merge_job")"
cmp -s results.json "$work/single.json" || fail "merged results differ from one burnin run"
[ "$(ls shards/*.json | wc -l)" = 32 ] || fail "expected 32 shard files"
say "32 shards merged by the dependent job: byte for byte one burnin run"

# 2. Task 7 fails on purpose.
dir=$(job_dir job2)
cd "$dir"
fail_bin="$work/failing-bin"
mkdir -p "$fail_bin"
cat > "$fail_bin/burnin" << EOF
#!/bin/sh
if [ "\$SLURM_ARRAY_TASK_ID" = 7 ] && [ "\$1" = run ]; then
    echo "task 7 fails on purpose (tests/slurm/check.sh)" >&2
    exit 1
fi
exec "$burnin" "\$@"
EOF
chmod +x "$fail_bin/burnin"
PATH="$fail_bin:$PATH" bash -c "set -euo pipefail; $submit; echo \"array \$array\"" > submit.out
array=$(sed -n 's/^array //p' submit.out)
merge_job=$(sed -n 's/^Submitted batch job //p' submit.out)
wait_jobs "$array" "$merge_job"
[ "$(states "$array")" = " 31 COMPLETED 1 FAILED" ] || fail "array tasks: $(states "$array")"
[ ! -e shards/7.json ] || fail "the failed task left shards/7.json behind"
reason=$(squeue -h -j "$merge_job" -o '%r' || true)
[ "$reason" = DependencyNeverSatisfied ] || fail "merge job $merge_job: $reason"
scancel "$merge_job"
if out=$(PATH="$real_path" burnin merge shards/*.json 2>&1); then
    fail "burnin merge took 31 shards of 32"
fi
grep -q "missing shard 7 of 32" <<< "$out" || fail "burnin merge said: $out"
say "task 7 failed: the merge job waits, burnin merge says \"$out\""
PATH="$real_path" bash -c "set -euo pipefail; $rerun" > rerun.out
rerun_job=$(sed -n 's/^Submitted batch job //p' rerun.out)
[ -n "$rerun_job" ] || fail "the rerun printed: $(cat rerun.out)"
wait_jobs "$rerun_job"
[ "$(states "$rerun_job")" = " 1 COMPLETED" ] || fail "rerun of task 7: $(states "$rerun_job")"
[ -s shards/7.json ] || fail "the rerun of task 7 wrote no shard"
PATH="$real_path" burnin merge --json shards/*.json > results.json
cmp -s results.json "$work/single.json" || fail "merged results after the rerun differ from one burnin run"
say "task 7 run again: the merge is byte for byte one burnin run"
