#!/bin/sh
# Entry point of the Runoff container: starts the JVM with memory flags sized from the container's memory
# limit, then runs the given runoff command (default in the image: run --config /etc/runoff/runoff.properties).
#
# Variables (none starts with RUNOFF_ or KAFKA_: those are job settings):
#   JAR_FILE          the application jar (default /opt/runoff/runoff.jar)
#   JAVA_MEMORY_OPTS  heap flags (default: heap at most 50% of the container limit, the rest is left to
#                     RocksDB's bounded cache, thread stacks, metaspace and network buffers; see SIZING.md)
#   JAVA_OPTS         extra JVM flags, appended
set -eu

JAR_FILE="${JAR_FILE:-/opt/runoff/runoff.jar}"
JAVA_MEMORY_OPTS="${JAVA_MEMORY_OPTS:--XX:MaxRAMPercentage=50 -XX:InitialRAMPercentage=25 -XX:MaxMetaspaceSize=128m -Xss512k}"
JAVA_OPTS="${JAVA_OPTS:-}"

if [ "$#" -eq 0 ]; then
    set -- run --config /etc/runoff/runoff.properties
fi

# exec: java becomes PID 1's replacement and receives SIGTERM itself, so the job's shutdown hook runs.
# shellcheck disable=SC2086 # the option variables are word lists on purpose
exec java $JAVA_MEMORY_OPTS -XX:+ExitOnOutOfMemoryError -Dfile.encoding=UTF-8 $JAVA_OPTS -jar "$JAR_FILE" "$@"
