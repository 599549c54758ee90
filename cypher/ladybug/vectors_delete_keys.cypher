// vectors_delete_keys: drop vector rows by key before a bulk rewrite.
// writes: deletes Vector nodes. parameters: $keys (list of vector keys). safe to re-run.
// LadybugDB 0.22 evaluates `x IN $list` by scanning the list for every row (measured: a 5,000-uid list over
// 300,000 nodes took 25 s), so this override looks each uid up by primary key instead (benchmarks/README.md).
UNWIND $keys AS key
MATCH (v:Vector {key: key}) DELETE v
