#!/bin/sh
# Storage wear benchmark: byre beside two minimal SQLite writers (commit every 2 s and every 60 s), each on its own
# loop-mounted ext4 file system, at two barn loads; prints device bytes per reading, commits, CPU and memory.
# Needs root (loop devices), mosquitto, mosquitto_sub and python3. About 4 minutes with the defaults.
# Usage, from the repository root: daemon/src/test/bench/wear.sh [--seconds 60] [--seed-rows 1000000]
set -eu
cd "$(dirname "$0")/../../../.."
mvn -q -B -o -pl daemon -am test-compile dependency:build-classpath \
    -Dmdep.outputFile=target/bench.classpath -Dmdep.includeScope=test
CP="daemon/target/test-classes:daemon/target/classes:$(cat daemon/target/bench.classpath)"
exec java -Xmx512m -cp "$CP" byre.bench.WearBench "$@"
