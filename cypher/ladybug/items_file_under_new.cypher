// items_file_under_new: bulk-append FILED_UNDER links of items inserted in the same transaction.
// writes: FILED_UNDER edges. parameters: $rows (item uid, category uid), both nodes present.
// NOT safe to re-run by itself (no MERGE): only for items items_insert has just created.
COPY FILED_UNDER FROM $rows
