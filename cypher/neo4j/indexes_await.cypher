// indexes_await: wait until every index is online. reads: index states. parameters: $seconds. read-only.
CALL db.awaitIndexes($seconds)
