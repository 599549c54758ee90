// vectors_delete_keys: drop vector rows by key before a bulk rewrite.
// writes: deletes Vector nodes. parameters: $keys (list of vector keys). safe to re-run.
MATCH (v:Vector) WHERE v.key IN $keys DELETE v
