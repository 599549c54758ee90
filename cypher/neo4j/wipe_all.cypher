// wipe_all: delete every node and relationship of the database, in batches (TESTS ONLY: isolates a test).
// writes: deletes everything. parameters: none. Run outside a transaction (CALL IN TRANSACTIONS; 5.23+ form).
MATCH (n)
CALL (n) { DETACH DELETE n } IN TRANSACTIONS OF 10000 ROWS
