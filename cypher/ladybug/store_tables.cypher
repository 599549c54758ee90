// store_tables: the tables in an embedded store (to recognise a graftwork store). read-only. parameters: none.
CALL show_tables() RETURN name
