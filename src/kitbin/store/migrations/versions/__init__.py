"""Schema revisions, oldest first: 0001 inventory, 0002 plans and pick lists."""
