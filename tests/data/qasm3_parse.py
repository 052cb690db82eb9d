"""Parses every OpenQASM 3 file named on the command line with the
standard's reference parser (the `openqasm3` package, `openqasm3[parser]`
from PyPI) and prints one line per file; exits 1 if any file is refused."""

import sys

import openqasm3

failed = 0
for path in sys.argv[1:]:
    with open(path, encoding="utf-8") as f:
        text = f.read()
    try:
        program = openqasm3.parse(text)
    except Exception as e:  # the parser raises its own error types
        failed += 1
        print(f"refused {path}: {e}")
        continue
    print(f"parsed {path}: {len(program.statements)} statements")
sys.exit(1 if failed else 0)
