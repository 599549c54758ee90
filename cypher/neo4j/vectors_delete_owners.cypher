// vectors_delete_owners: drop all signals' vectors of some owners (retired or removed nodes).
// writes: deletes Vector nodes. parameters: $kind, $owners. safe to re-run.
MATCH (v:Vector) WHERE v.owner IN $owners AND v.kind = $kind DELETE v
