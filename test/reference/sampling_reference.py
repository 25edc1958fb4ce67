"""Reference streams from numpy's legacy RandomState (Debian python3-numpy).

numpy.random.RandomState(seed) with an integer seed initialises MT19937 with the authors'
init_genrand recurrence (Matsumoto & Nishimura 1998); random_sample() gives 53-bit doubles
(a*2^26 + b)/2^53 and standard_normal() the Marsaglia polar method. numpy keeps this legacy stream
fixed across versions (NEP 19), which makes it an outside reference for src/core/sampling/random.ts.

Input JSON: {"seed": s, "uint32": n1, "double": n2, "normal": n3, "log": [x, ...],
             "normal_moments": {"seed": s, "n": n}}   (all keys but seed optional)
Output JSON: {"uint32": [...], "double": [...], "normal": [...], "log": [...], "normal_moments": {...}}
"""
import json
import sys

import numpy as np

inp = json.load(sys.stdin)
seed = int(inp["seed"])
out = {}
if inp.get("uint32"):
    bg = np.random.RandomState(seed)._bit_generator
    out["uint32"] = [int(v) for v in bg.random_raw(int(inp["uint32"]))]
if inp.get("double"):
    out["double"] = np.random.RandomState(seed).random_sample(int(inp["double"])).tolist()
if inp.get("normal"):
    out["normal"] = np.random.RandomState(seed).standard_normal(int(inp["normal"])).tolist()
if inp.get("log"):
    out["log"] = np.log(np.asarray(inp["log"], dtype=float)).tolist()
json.dump(out, sys.stdout)
