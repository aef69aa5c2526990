"""Many vessels in many scenes: one task per vessel on dask.distributed, resumable, results in one table."""
