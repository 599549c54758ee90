"""The local review page (`graftwork serve`)."""
