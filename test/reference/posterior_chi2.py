"""scipy.stats.chi2.ppf / cdf for the cases sent. Input {"cases": [[p, df], ...]}; output {"ppf": [...]}."""
import json
import sys

from scipy import stats

req = json.load(sys.stdin)
json.dump({"ppf": [float(stats.chi2.ppf(p, df)) for p, df in req["cases"]]}, sys.stdout)
