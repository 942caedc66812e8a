"""Shared bookkeeping of the cross-check scripts: tolerant comparison, the largest relative
difference seen per field, one line per case, and the closing 'N passed, M failed' line."""

import sys

RTOL = 1e-9
# Smallest magnitude compared relatively; below it (p-values that underflow toward 0) two
# values agree if both are below it.
TINY = 1e-280


class Tally:
    def __init__(self):
        self.passed = 0
        self.failed = 0
        self.worst = {}

    def note(self, field, rel):
        self.worst[field] = max(self.worst.get(field, 0.0), rel)

    def close(self, a, b, field):
        """True when a and b agree to RTOL relative (None only matches None)."""
        if a is None or b is None:
            return a is None and b is None
        if isinstance(a, str) or isinstance(b, str):
            return a == b
        if abs(a) < TINY and abs(b) < TINY:
            return True
        rel = abs(a - b) / max(abs(a), abs(b)) if a != b else 0.0
        self.note(field, rel)
        return rel <= RTOL

    def record(self, label, problems, shown=8):
        if problems:
            self.failed += 1
            print(f"FAIL {label}")
            for p in problems[:shown]:
                print(f"     {p}")
        else:
            self.passed += 1
            print(f"ok   {label}")

    def finish(self):
        print("largest relative difference per field: " + ", ".join(f"{k} {v:.1e}" for k, v in sorted(self.worst.items())))
        print(f"{self.passed} passed, {self.failed} failed")
        sys.exit(1 if self.failed else 0)
