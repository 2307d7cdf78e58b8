"""Reading and writing the files users bring and get: polars, turnpoints, tasks,
GPX and briefings. Readers validate and report every problem with file and place."""
