"""oraculum: classical functions as verified reversible oracles.

Every function here is the Rust library itself (the extension module
``oraculum._oraculum``); this file only names what it exports.

>>> import oraculum
>>> vote = oraculum.synthesize({"kind": "function", "inputs": ["a", "b", "c"],
...                             "outputs": ["most"], "table": {"most": "0xe8"}})
>>> vote.verified, vote.cost["toffoli"]
(True, 3)
"""

from ._oraculum import (
    METHODS,
    LimitReached,
    Oracle,
    OraculumError,
    Refuted,
    SpecError,
    compare,
    from_function,
    synthesize,
    verify,
)

__all__ = [
    "METHODS",
    "LimitReached",
    "Oracle",
    "OraculumError",
    "Refuted",
    "SpecError",
    "compare",
    "from_function",
    "synthesize",
    "verify",
]
