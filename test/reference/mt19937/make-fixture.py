"""Reference outputs of MT19937 for Veil's generator test.

CPython's `random.Random.seed(n)` for a non-negative int n calls the reference `init_by_array`
with n split into 32-bit words (least significant first), and `getrandbits(32)` returns
`genrand_int32`. So CPython serves as an independent reference implementation.
Run: python3 test/reference/mt19937/make-fixture.py > test/reference/mt19937/reference.json
"""
import json
import random
import sys


def key_to_int(key):
    return sum(k << (32 * i) for i, k in enumerate(key))


cases = []
for key in ([0x123, 0x234, 0x345, 0x456], [5489], [90210, 7, 1]):
    r = random.Random()
    r.seed(key_to_int(key))
    cases.append({"key": key, "first": [r.getrandbits(32) for _ in range(1000)]})

print(json.dumps({"generator": f"CPython {sys.version.split()[0]} random module (MT19937)", "cases": cases}))
