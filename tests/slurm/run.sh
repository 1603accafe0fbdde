#!/usr/bin/env bash
# Sharded searches under a real Slurm scheduler (issue 19).
#
# Starts a one-node Slurm cluster from Debian's packages (munged, slurmctld, slurmd, with a
# configuration written here into a temporary folder) inside fresh network, mount, UTS and PID
# namespaces, so that its daemons can only listen on loopback and die with this script. Then it
# submits two sharded searches with contrib/slurm/submit.sh, the job scripts users copy:
#
# - TT(12) classes in 4 shards. Shard 1 is cancelled mid-run (scancel): the merge job queued
#   after the array must then be cancelled too, and `hadamard search merge` must refuse the
#   three shards left; shard 1 is resubmitted (ARRAY=1), resumes from its checkpoint, and the
#   new merge must give the 127 classes of the unsharded run. 127 is the published number of
#   TT(12) classes (Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21, 2013)
#   [docs/references.md#r8-ttn-counts-and-existence: recalled, and the project's exhaustive
#   search agrees].
# - Williamson quadruples of order 33 (classes) in 4 shards with checkpoints in the shared run
#   folder. Shard 1 is requeued mid-run (scontrol requeue), and shard 2 gets the USR1 that
#   warns of its time limit (the job script then requeues itself): both must resume from their
#   checkpoints, and the merge job (afterok) must run by itself and give the 5 classes of the
#   unsharded run, the published count for m = 33 (Holzmann, Kharaghani and Tayfeh-Rezaie,
#   Des. Codes Cryptogr. 46, 2008) [docs/references.md#r7-williamson-orders: recalled].
#
# `search merge` must also refuse a duplicated shard. Needs root (namespaces, daemons) and the
# packages tests/setup.sh installs; HADAMARD_BIN names the binary (default target/release).
set -euo pipefail
root=$(cd "$(dirname "$0")/../.." && pwd)
hadamard=${HADAMARD_BIN:-$root/target/release/hadamard}

if [ "${SLURM_TEST_IN_NAMESPACE:-}" != 1 ]; then
  for tool in munged slurmctld slurmd sbatch unshare ip ss; do
    command -v "$tool" >/dev/null || { echo "missing $tool (tests/setup.sh installs it)"; exit 1; }
  done
  [ -x "$hadamard" ] || { echo "missing $hadamard (cargo build --release)"; exit 1; }
  # PID 1 of the new PID namespace is this script: when it ends, the kernel ends everything
  # left in the namespace, whatever happened to the cleanup below.
  exec unshare --net --mount --uts --pid --fork --mount-proc \
    env SLURM_TEST_IN_NAMESPACE=1 HADAMARD_BIN="$hadamard" bash "$0" "$@"
fi

started=$SECONDS
tmp=$(mktemp -d /tmp/hadamard-slurm.XXXXXX)
pids=()
note() { echo "[$((SECONDS - started)) s] $*"; }
fail() {
  echo "FAIL: $*" >&2
  echo "0 passed, 1 failed"
  exit 1
}
cleanup() {
  local status=$?
  set +e
  [ -n "${SLURM_CONF:-}" ] && scancel --quiet --user=root >/dev/null 2>&1
  # Stop the daemons by their PIDs, newest first; SIGKILL whatever is still there after 10 s.
  for ((j = ${#pids[@]} - 1; j >= 0; j--)); do kill -TERM "${pids[j]}" 2>/dev/null; done
  for _ in $(seq 100); do
    alive=0
    for p in "${pids[@]}"; do kill -0 "$p" 2>/dev/null && alive=1; done
    [ "$alive" = 0 ] && break
    sleep 0.1
  done
  for p in "${pids[@]}"; do kill -KILL "$p" 2>/dev/null; done
  if [ "$status" != 0 ]; then
    for log in "$tmp"/*.log "$tmp"/run/*/*.log; do
      [ -f "$log" ] && { echo "--- $log"; tail -n 30 "$log"; }
    done
  fi
  if [ -n "${SLURM_TEST_KEEP:-}" ]; then echo "kept $tmp"; else rm -rf "$tmp"; fi
  exit "$status"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

# The namespace has only a loopback interface; the node's name resolves to 127.0.0.1.
# glibc's getaddrinfo with AI_ADDRCONFIG (as Slurm calls it) finds no IPv4 at all while
# 127.0.0.1 is the only address, so lo gets a second loopback address, 127.0.0.2.
ip link set lo up
ip addr add 127.0.0.2/8 dev lo
hostname slurmnode
printf '127.0.0.1 localhost slurmnode\n::1 localhost\n' > "$tmp/hosts"
mount --bind "$tmp/hosts" /etc/hosts

# munge: a fresh key, its own socket.
head -c 1024 /dev/urandom > "$tmp/munge.key"
chmod 400 "$tmp/munge.key"
mkdir -m 700 "$tmp/munge"
munged --foreground --force --key-file="$tmp/munge.key" --socket="$tmp/munge/socket" \
  --pid-file="$tmp/munge/pid" --log-file="$tmp/munged.log" --seed-file="$tmp/munge/seed" \
  2> /dev/null &
pids+=($!)

mkdir -p "$tmp/state" "$tmp/spool" "$tmp/run"
cat > "$tmp/slurm.conf" <<EOF
ClusterName=hadamardtest
SlurmctldHost=slurmnode(127.0.0.1)
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$tmp/munge/socket
CommunicationParameters=NoInAddrAny,NoCtldInAddrAny
StateSaveLocation=$tmp/state
SlurmdSpoolDir=$tmp/spool
SlurmctldPidFile=$tmp/slurmctld.pid
SlurmdPidFile=$tmp/slurmd.pid
SlurmctldLogFile=$tmp/slurmctld.log
SlurmdLogFile=$tmp/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
MpiDefault=none
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
ReturnToService=2
KillWait=10
MinJobAge=600
NodeName=slurmnode NodeAddr=127.0.0.1 CPUs=2 State=UNKNOWN
PartitionName=test Nodes=slurmnode Default=YES MaxTime=INFINITE State=UP
EOF
export SLURM_CONF=$tmp/slurm.conf
for _ in $(seq 50); do [ -S "$tmp/munge/socket" ] && break; sleep 0.1; done
# -D: in the foreground, so $! is the daemon (the log files get the same lines as stderr).
slurmctld -D -i -f "$SLURM_CONF" 2> /dev/null &
pids+=($!)
slurmd -D -N slurmnode -f "$SLURM_CONF" 2> /dev/null &
pids+=($!)
for _ in $(seq 300); do
  state=$(sinfo -h -n slurmnode -o %T 2>/dev/null || true)
  [ "$state" = idle ] && break
  sleep 0.1
done
[ "$state" = idle ] || fail "the node is not idle after 30 s (state: ${state:-none})"
note "cluster up in $((SECONDS - started)) s"

# Nothing listens outside loopback (the namespace has no other address, and the daemons bind
# to 127.0.0.1 rather than to every address).
listening=$(ss -Hltun | awk '{print $5}')
echo "listening: $(echo "$listening" | tr '\n' ' ')"
[ -n "$listening" ] || fail "ss shows no listening socket"
echo "$listening" | grep -Ev '^(127\.[0-9.]+|\[::1\]|::1):[0-9]+$' &&
  fail "a daemon listens on a non-loopback address"

# --- helpers -----------------------------------------------------------------------------
job_state() { # JOBID -> its state, or nothing once it has left the queue
  squeue -h -j "$1" -o %T 2>/dev/null | head -n 1 || true
}
wait_gone() { # JOBID SECONDS: wait until the job (every array task) has left the queue
  local t=$(($2 * 5))
  while [ -n "$(squeue -h -j "$1" -o %i 2>/dev/null)" ]; do
    t=$((t - 1))
    [ "$t" -gt 0 ] || { squeue; fail "job $1 still queued after $2 s"; }
    sleep 0.2
  done
}
units_done() { # CHECKPOINT -> "next total finished" (the file is pretty-printed JSON)
  [ -f "$1" ] || return 0
  sed -n 's/^  "\(next\|total\|finished\)": \([0-9a-z]*\),\?$/\2/p' "$1" | tr '\n' ' '
}
wait_mid_run() { # CHECKPOINT SECONDS: wait until 0 < next < total
  local t=$(($2 * 50)) next total finished
  while :; do
    read -r total next finished <<< "$(units_done "$1")" || true
    if [ -n "${next:-}" ] && [ "$next" -gt 0 ] && [ "$next" -lt "$total" ]; then
      note "$1: $next/$total units done"
      return
    fi
    [ "${finished:-}" = true ] && fail "$1 finished before it could be interrupted"
    t=$((t - 1))
    [ "$t" -gt 0 ] || fail "$1 shows no progress after $2 s"
    sleep 0.02
  done
}
count() { grep -c . "$1" || true; }
data() { cut -d'|' -f1 "$1" | sed 's/ *$//' | sort; }

export HADAMARD=$hadamard
submit=$root/contrib/slurm/submit.sh
tt=$tmp/run/tt12
wi=$tmp/run/w33

# The unsharded runs, for comparison (outside Slurm).
"$hadamard" search turyn --n 12 --classes --quiet > "$tmp/tt12-whole.txt" 2> "$tmp/tt12-whole.log"
"$hadamard" search williamson --order 33 --classes --quiet > "$tmp/w33-whole.txt" 2> "$tmp/w33-whole.log"
[ "$(count "$tmp/tt12-whole.txt")" = 127 ] || fail "the unsharded TT(12) run has $(count "$tmp/tt12-whole.txt") classes, not 127"
[ "$(count "$tmp/w33-whole.txt")" = 5 ] || fail "the unsharded Williamson m = 33 run has $(count "$tmp/w33-whole.txt") classes, not 5"
note "unsharded runs done at $((SECONDS - started)) s"

# --- TT(12): a shard is cancelled and resubmitted ------------------------------------------
read -r tt_array tt_merge <<< "$("$submit" "$tt" 4 turyn --n 12 --classes --batch 128)"
[ -n "$tt_merge" ] || fail "contrib/slurm/submit.sh did not queue the jobs"
note "TT(12): array job $tt_array, merge job $tt_merge"
wait_mid_run "$tt/checkpoint-1.json" 60
scancel "${tt_array}_1"
# --- Williamson m = 33: a shard is requeued, the merge follows by itself --------------------
read -r w_array w_merge <<< "$("$submit" "$wi" 4 williamson --order 33 --classes --batch 2)"
[ -n "$w_merge" ] || fail "contrib/slurm/submit.sh did not queue the jobs"
note "Williamson m=33: array job $w_array, merge job $w_merge"
wait_mid_run "$wi/checkpoint-1.json" 60
scontrol requeue "${w_array}_1"
# Slurm gives a requeued job a begin time two minutes ahead; on a real cluster that is noise,
# here it would be most of the test's time, so the begin time is brought forward once the task
# is pending again.
for _ in $(seq 150); do
  [ "$(job_state "${w_array}_1")" = PENDING ] && break
  sleep 0.2
done
note "Williamson m=33: shard 1 requeued: $(squeue -h -j "${w_array}_1" -o '%T, begins %S')"
# Shard 2 is told its time is running out, as --signal=B:USR1@300 does: USR1 to the batch
# shell only. The job script must stop the search at the end of its batch and requeue itself.
wait_mid_run "$wi/checkpoint-2.json" 60
scancel --batch --signal=USR1 "${w_array}_2"
for _ in $(seq 150); do
  [ "$(job_state "${w_array}_2")" = PENDING ] && break
  sleep 0.2
done
[ "$(job_state "${w_array}_2")" = PENDING ] || fail "Williamson shard 2 did not requeue itself after USR1"
note "Williamson m=33: shard 2 requeued itself"
# slurmd refuses a launch credential issued in the same second as the old instance's
# revocation ("Job credential revoked"), so both restarts are at least two seconds later.
sleep 2
scontrol update JobId="${w_array}_1" StartTime=now
scontrol update JobId="${w_array}_2" StartTime=now

wait_gone "$tt_array" 120
note "TT(12): the array job is done"
# The merge after a cancelled shard can never run: Slurm cancels it (--kill-on-invalid-dep).
wait_gone "$tt_merge" 30
[ ! -e "$tt/merged.txt" ] || fail "the TT(12) merge ran although shard 1 was cancelled"
[ ! -e "$tt/shard-1.json" ] || fail "the cancelled shard 1 left a result"
# A lost shard: merge refuses the three that are left, naming the missing one.
if "$hadamard" search merge "$tt"/shard-*.json > /dev/null 2> "$tmp/refused.txt"; then
  fail "search merge accepted TT(12) shards 0, 2, 3 without shard 1"
fi
grep -q 'shard(s) 1/4 missing' "$tmp/refused.txt" || fail "merge did not name the missing shard: $(cat "$tmp/refused.txt")"
# A duplicated shard: refused too.
cp "$tt/shard-0.json" "$tmp/shard-0-again.json"
if "$hadamard" search merge "$tt"/shard-*.json "$tmp/shard-0-again.json" > /dev/null 2> "$tmp/refused.txt"; then
  fail "search merge accepted TT(12) shard 0 twice"
fi
grep -q 'shard 0/4 is given twice' "$tmp/refused.txt" || fail "merge did not name the duplicated shard: $(cat "$tmp/refused.txt")"

read -r tt_array2 tt_merge2 <<< "$(ARRAY=1 "$submit" "$tt" 4 turyn --n 12 --classes --batch 128)"
[ -n "$tt_merge2" ] || fail "contrib/slurm/submit.sh did not queue the jobs"
note "TT(12): shard 1 resubmitted as job $tt_array2, merge job $tt_merge2"
wait_gone "$tt_merge2" 120
grep -q 'resuming from .*checkpoint-1.json' "$tt/shard-1.log" || fail "the resubmitted TT(12) shard 1 did not resume from its checkpoint"
[ -s "$tt/merged.txt" ] || fail "the TT(12) merge job wrote nothing"
[ "$(count "$tt/merged.txt")" = 127 ] || fail "merged TT(12): $(count "$tt/merged.txt") classes, not 127"
diff <(data "$tt/merged.txt") <(data "$tmp/tt12-whole.txt") > /dev/null ||
  fail "the merged TT(12) classes differ from the unsharded run's"
note "TT(12): 127 classes merged from 4 shards, as the unsharded run"

wait_gone "$w_array" 120
wait_gone "$w_merge" 60
note "Williamson m=33: the array and merge jobs are done"
grep -q 'restart 1' "$wi/shard-1.log" || fail "Williamson shard 1 was not requeued"
grep -q 'resuming from .*checkpoint-1.json' "$wi/shard-1.log" || fail "the requeued Williamson shard 1 did not resume from its checkpoint"
grep -q 'restart 1' "$wi/shard-2.log" || fail "Williamson shard 2 was not requeued"
grep -q 'resuming from .*checkpoint-2.json' "$wi/shard-2.log" || fail "Williamson shard 2 did not resume from its checkpoint after USR1"
[ -s "$wi/merged.txt" ] || fail "the Williamson merge job did not run after the requeued shard"
[ "$(count "$wi/merged.txt")" = 5 ] || fail "merged Williamson m = 33: $(count "$wi/merged.txt") classes, not 5"
diff <(data "$wi/merged.txt") <(data "$tmp/w33-whole.txt") > /dev/null ||
  fail "the merged Williamson classes differ from the unsharded run's"
note "Williamson m=33: 5 classes merged from 4 shards, as the unsharded run"
echo "slurm test passed in $((SECONDS - started)) s"
echo "1 passed, 0 failed"
