"""Stage 6, results → files and terminals: the report, the JSON documents,
JUnit, the marked-up copy, the pictures, and the sketches the demos and tests
draw."""
