#!/usr/bin/env python3
"""Independent recomputation of a calred uncertainty budget.

Reads a model description (JSON, see testdata/budget/*.json): the inputs with
their estimates and standard uncertainties, optional correlations between
pairs of inputs, and the measurement model as a Python expression in the
inputs' symbols. Propagates with the general-purpose package "uncertainties"
(first-order propagation with exact derivatives) and prints one JSON object:

    {"value": y, "u_c": u_c(y), "sensitivities": {symbol: dy/dx, ...}}

Usage: python3 budget_check.py MODEL.json
"""
import json
import math
import sys

import uncertainties
from uncertainties import umath


def main(path):
    with open(path, encoding="utf-8") as f:
        model = json.load(f)
    inputs = model["inputs"]
    symbols = [i["symbol"] for i in inputs]
    names = {"umath": umath, "__builtins__": {}}
    names.update({k: getattr(umath, k) for k in ("exp", "log", "sqrt", "sin", "cos")})
    code = compile(model["expression"], "expression", "eval")

    # Independent inputs: value, exact sensitivities and, without
    # correlations, the combined standard uncertainty.
    free = [uncertainties.ufloat(i["value"], i["u"], tag=i["symbol"]) for i in inputs]
    y = eval(code, dict(names), dict(zip(symbols, free)))
    out = {
        "value": y.nominal_value,
        "u_c": y.std_dev,
        "sensitivities": {s: y.derivatives.get(v, 0.0) for s, v in zip(symbols, free)},
    }

    pairs = model.get("correlations") or []
    if pairs:
        n = len(inputs)
        r = [[1.0 if a == b else 0.0 for b in range(n)] for a in range(n)]
        for p in pairs:
            a, b = symbols.index(p["a"]), symbols.index(p["b"])
            r[a][b] = r[b][a] = p["r"]
        tied = uncertainties.correlated_values_norm(
            [(i["value"], i["u"]) for i in inputs], r)
        out["u_c"] = eval(code, dict(names), dict(zip(symbols, tied))).std_dev
    json.dump(out, sys.stdout)
    sys.stdout.write("\n")


if __name__ == "__main__":
    if len(sys.argv) != 2:
        sys.exit("usage: budget_check.py MODEL.json")
    main(sys.argv[1])
