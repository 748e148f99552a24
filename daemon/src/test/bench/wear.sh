#!/bin/sh
# Storage wear benchmark: byre beside two minimal SQLite writers (commit every 2 s and every 60 s), each on its own
# loop-mounted ext4 file system, at two barn loads; prints device bytes per reading, commits, CPU and memory.
# Needs root (loop devices), mosquitto, mosquitto_sub and python3. About 4 minutes with the defaults.
# Usage, from the repository root: daemon/src/test/bench/wear.sh [--seconds 60] [--seed-rows 1000000]
set -eu
cd "$(dirname "$0")/../../../.."
mvn -q -B -o -pl daemon -am test-compile
if mvn -q -B -o -pl daemon -am dependency:build-classpath -Dmdep.outputFile=target/bench.classpath -Dmdep.includeScope=test >/dev/null 2>&1; then
    CP="daemon/target/test-classes:daemon/target/classes:$(cat daemon/target/bench.classpath)"
else
    # Without the dependency plugin (offline): the class path surefire used for the last test run of the module.
    mvn -q -B -o -pl daemon -am test -Dtest=CadenceTest -Dsurefire.failIfNoSpecifiedTests=false >/dev/null
    CP=$(sed -n 's/.*name="surefire.test.class.path" value="\([^"]*\)".*/\1/p' daemon/target/surefire-reports/TEST-byre.daemon.CadenceTest.xml)
fi
exec java -Xmx512m -cp "$CP" byre.bench.WearBench "$@"
