#!/bin/sh
# End-to-end benchmark of byre: builds the test classes, then runs byre.bench.IngestBench, which prints
# one table (byre vs a bare Paho subscriber, start-up, memory, bytes per reading, derivation rate).
# Needs Debian's mosquitto. Usage, from the repository root: daemon/src/test/bench/run.sh [--rounds 3]
set -eu
cd "$(dirname "$0")/../../../.."
mvn -q -B -o -pl daemon -am test-compile dependency:build-classpath \
    -Dmdep.outputFile=target/bench.classpath -Dmdep.includeScope=test
CP="daemon/target/test-classes:daemon/target/classes:$(cat daemon/target/bench.classpath)"
exec java -Xmx512m ${BENCH_JVM:+"-Dbyre.bench.jvm=$BENCH_JVM"} -cp "$CP" byre.bench.IngestBench "$@"
