#!/bin/bash
# slurm-check.sh: runs falloff's batch path through a real SLURM scheduler
# on this machine and checks it against a plain local batch run.
#
#   scripts/slurm-check.sh [MANIFEST] [SLICES]
#
# MANIFEST defaults to testdata/batch/mechanism-8.yaml (8 invented
# reactions), SLICES (the job array's size) to 4. The script
#   1. installs slurm-wlm and munge from Debian with apt-get if they are
#      missing (needs root),
#   2. starts a single-node cluster in a temporary folder: munged on its own
#      socket, slurmctld and slurmd with a minimal slurm.conf naming this
#      host and its cores,
#   3. submits docs/slurm-array.sh as a job array of SLICES tasks over the
#      manifest, waits for it, merges (falloff batch --merge),
#   4. runs the same manifest as a plain local batch and checks that the
#      merged mechanisms are byte-for-byte the same,
#   5. prints reactions per minute on both paths, and
#   6. stops the daemons it started (also on failure or Ctrl-C).
# It exits 0 only when every step passed. It takes well under a minute once
# SLURM is installed (about 10 s for the 8-reaction manifest on 2 cores).
set -euo pipefail

repo=$(cd "$(dirname "$0")/.." && pwd)
cd "$repo"
manifest=${1:-testdata/batch/mechanism-8.yaml}
slices=${2:-4}
say() { echo "slurm-check: $*"; }
fail() {
	echo "slurm-check: FAILED: $*" >&2
	exit 1
}

# 1. SLURM and munge from Debian.
if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null || ! command -v munged >/dev/null || ! command -v sbatch >/dev/null; then
	say "installing slurm-wlm and munge with apt-get"
	sudo=""
	[ "$(id -u)" = 0 ] || sudo=sudo
	$sudo env DEBIAN_FRONTEND=noninteractive apt-get update -q
	$sudo env DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends slurm-wlm munge
fi
[ "$(id -u)" = 0 ] || fail "run as root: the single-node cluster runs its daemons as root"

work=$(mktemp -d /tmp/falloff-slurm.XXXXXX)
pids=()
cleanup() {
	local code=$?
	# Stop only what this script started, by process id.
	for ((i = ${#pids[@]} - 1; i >= 0; i--)); do
		kill "${pids[i]}" 2>/dev/null || true
	done
	for p in "${pids[@]}"; do
		for _ in $(seq 50); do
			kill -0 "$p" 2>/dev/null || break
			sleep 0.1
		done
		kill -9 "$p" 2>/dev/null || true
	done
	if [ $code != 0 ]; then
		say "logs kept in $work"
	else
		rm -rf "$work"
	fi
	exit $code
}
trap cleanup EXIT
trap 'exit 130' INT TERM

say "building falloff"
mkdir -p "$work/bin"
go build -o "$work/bin/falloff" ./cmd/falloff
export FALLOFF=$work/bin/falloff

# 2. A single-node cluster: munged on its own socket and key, so that a
# munged the system may run is left alone.
mkdir -p "$work/munge" "$work/state" "$work/spool"
chmod 700 "$work/munge"
dd if=/dev/urandom of="$work/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$work/munge/munge.key"
munged --foreground --force --key-file="$work/munge/munge.key" --socket="$work/munge/munge.socket" \
	--pid-file="$work/munge/munged.pid" --log-file="$work/munge/munged.log" --seed-file="$work/munge/munged.seed" \
	>"$work/munge/munged.out" 2>&1 &
pids+=($!)

host=$(hostname)
cores=$(nproc)
port=$((20000 + RANDOM % 20000))
conf=$work/slurm.conf
cat >"$conf" <<EOF
ClusterName=falloffcheck
SlurmctldHost=$host
SlurmUser=root
SlurmdUser=root
SlurmctldPort=$port
SlurmdPort=$((port + 1))
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$work/munge/munge.socket
StateSaveLocation=$work/state
SlurmdSpoolDir=$work/spool
SlurmctldPidFile=$work/slurmctld.pid
SlurmdPidFile=$work/slurmd.pid
SlurmctldLogFile=$work/slurmctld.log
SlurmdLogFile=$work/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SwitchType=switch/none
MpiDefault=none
SchedulerType=sched/builtin
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
JobCompType=jobcomp/none
SlurmctldTimeout=30
SlurmdTimeout=30
NodeName=$host CPUs=$cores State=UNKNOWN
PartitionName=check Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
export SLURM_CONF=$conf

for _ in $(seq 50); do
	[ -S "$work/munge/munge.socket" ] && break
	sleep 0.1
done
[ -S "$work/munge/munge.socket" ] || fail "munged did not start (see $work/munge/munged.log)"

slurmctld -D -c -f "$conf" >"$work/slurmctld.out" 2>&1 &
pids+=($!)
slurmd -D -f "$conf" -N "$host" >"$work/slurmd.out" 2>&1 &
pids+=($!)

say "waiting for node $host ($cores cores) to be idle"
for _ in $(seq 150); do
	state=$(sinfo -h -n "$host" -o %T 2>/dev/null || true)
	[ "$state" = idle ] && break
	sleep 0.2
done
[ "$state" = idle ] || fail "node state '$state' after 30 s (see $work/slurmctld.log, $work/slurmd.log)"

# 3. The example job array, then the merge.
out=$work/scheduler
start=$(date +%s.%N)
say "submitting docs/slurm-array.sh as --array=1-$slices over $manifest"
sbatch --wait --array=1-"$slices" --chdir="$work" --output="$work/array-%A_%a.log" \
	"$repo/docs/slurm-array.sh" "$repo/$manifest" "$out" >"$work/sbatch.out" ||
	fail "the job array failed (logs: $work/array-*.log)"
"$FALLOFF" batch "$repo/$manifest" --out "$out" --merge --quiet >/dev/null ||
	fail "merge failed"
end=$(date +%s.%N)
n=$(ls "$out/records" | wc -l)
# When the array's last record was written: the work, without the time
# sbatch --wait takes to notice the end (it polls).
last=$(for f in "$out"/records/*.json; do date -r "$f" +%s.%N; done | sort -n | tail -1)

# 4. A plain local run of the same manifest.
lstart=$(date +%s.%N)
"$FALLOFF" batch "$repo/$manifest" --out "$work/local" --quiet >/dev/null || fail "local batch failed"
lend=$(date +%s.%N)
for f in reactions.yaml reactions.txt; do
	cmp "$out/mechanism/$f" "$work/local/mechanism/$f" ||
		fail "merged $f differs between the scheduler and the local run"
done
say "merged mechanism of $n reactions: scheduler path (array of $slices + merge) = local batch, byte for byte"

# 5. Throughput on both paths.
awk -v n="$n" -v s="$start" -v e="$end" -v l="$last" -v ls="$lstart" -v le="$lend" -v c="$cores" -v k="$slices" 'BEGIN {
	printf "slurm-check: %d reactions on %d cores: local batch %.1f s (%.0f reactions/min)\n", n, c, le - ls, 60 * n / (le - ls)
	printf "slurm-check: scheduler, array of %d: last reaction recorded %.1f s after submission (%.0f reactions/min); with sbatch --wait and the merge %.1f s (%.0f reactions/min)\n",
		k, l - s, 60 * n / (l - s), e - s, 60 * n / (e - s) }'
say "ok"
