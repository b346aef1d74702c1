#!/usr/bin/python3
"""Recompute a Parley record's fingerprint chain from its JSON file alone.

Written apart from Parley's Go code, from the encoding as DEVELOPERS.md
("The record's fingerprint") and elicit/fingerprint's doc comment describe
it, with Python's standard library only (json, hashlib, struct, re).
Made with Python 3.11.2 (Debian's /usr/bin/python3).

    /usr/bin/python3 testdata/fingerprint/chain.py RECORD.json ... > OUT

writes a first line naming itself and Python's version, then, for each
record, a line "# record NAME" (the file's base name), a
line "start HEX" (h0), one line "KIND ID VALUE" for each fact in the
chain's order, and a line "head HEX". It reads only the facts, never the
record's own "chain" or "fingerprint" keys. A key that is null, or a null
in a list, reads as the key left out, its zero value (0, "", false, an
empty list, the zero time 0001-01-01T00:00:00Z), as Go's encoding/json
reads it into the record.
"""

import hashlib
import json
import os
import re
import struct
import sys

DOMAIN = "parley record fingerprint v1"
RANK = {"revision": 1, "weight_set": 2, "agreed_prior": 3, "study_data": 4, "event": 5}

ZERO_TIME = "0001-01-01T00:00:00Z"

# As Go's time package reads a JSON time: a fraction of any length after
# "." or ",", of which the first 9 digits count (the rest are cut off).
TIME = re.compile(r"^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2})(?:[.,](\d+))?(Z|[+-]\d{2}:\d{2})$")


def days_from_civil(y, m, d):
    """Days from 1970-01-01 to a proleptic Gregorian date, any year (year 0
    too, which calendar.timegm refuses): H. Hinnant's days_from_civil."""
    y -= m <= 2
    era = y // 400
    yoe = y - era * 400
    doy = (153 * (m + (-3 if m > 2 else 9)) + 2) // 5 + d - 1
    doe = yoe * 365 + yoe // 4 - yoe // 100 + doy
    return era * 146097 + doe - 719468


def get(d, key, zero):
    """d[key], or zero when d is null, lacks the key or has it null."""
    if d is None:
        return zero
    v = d.get(key)
    return zero if v is None else v


def parse_time(s):
    """RFC 3339 text -> (Unix seconds, nanoseconds), nanosecond exact."""
    m = TIME.match(ZERO_TIME if s is None else s)
    if not m:
        raise ValueError("not an RFC 3339 time: %r" % s)
    y, mo, d, h, mi, se = (int(m.group(i)) for i in range(1, 7))
    nanos = int((m.group(7) or "")[:9].ljust(9, "0"))
    secs = days_from_civil(y, mo, d) * 86400 + h * 3600 + mi * 60 + se
    off = m.group(8)
    if off != "Z":
        sign = 1 if off[0] == "+" else -1
        secs -= sign * (int(off[1:3]) * 3600 + int(off[4:6]) * 60)
    return secs, nanos


class Enc:
    def __init__(self):
        self.b = bytearray()

    def i64(self, n):
        self.b += struct.pack(">q", int(0 if n is None else n))

    def f64(self, x):
        self.b += struct.pack(">d", float(0 if x is None else x))

    def boolean(self, v):
        self.b += b"\x01" if v else b"\x00"

    def text(self, s):
        raw = ("" if s is None else s).encode("utf-8")
        self.i64(len(raw))
        self.b += raw

    def time(self, s):
        secs, nanos = parse_time(s)
        self.i64(secs)
        self.i64(nanos)

    def floats(self, xs):
        self.i64(len(xs))
        for x in xs:
            self.f64(x)

    def ints(self, ns):
        self.i64(len(ns))
        for n in ns:
            self.i64(n)

    def answer(self, a):
        self.floats(get(a, "values", []))
        for k in ("lowest", "highest", "best", "confidence"):
            self.f64(get(a, k, 0))
        self.ints(get(a, "counts", []))
        self.boolean(get(a, "percent", False))


def revision(r):
    e = Enc()
    e.text("revision")
    for k in ("id", "question_id", "expert_id", "round"):
        e.i64(get(r, k, 0))
    e.time(get(r, "at", ZERO_TIME))
    e.text(get(r, "reason", ""))
    e.answer(get(r, "answer", {}))
    e.text(get(r, "entered_by", "") or "expert")
    e.text(get(r, "channel", ""))
    return e.b


def weight_set(w):
    e = Enc()
    e.text("weight_set")
    e.i64(get(w, "id", 0))
    e.i64(get(w, "workshop_id", 0))
    e.text(get(w, "scheme", ""))
    by = sorted((int(k), v) for k, v in get(w, "by_expert", {}).items())
    e.i64(len(by))
    for k, v in by:
        e.i64(k)
        e.f64(v)
    e.text(get(w, "reason", ""))
    e.time(get(w, "at", ZERO_TIME))
    return e.b


def agreed_prior(p):
    e = Enc()
    e.text("agreed_prior")
    e.i64(get(p, "id", 0))
    e.i64(get(p, "question_id", 0))
    e.text(get(p, "source", ""))
    d = get(p, "dist", {})
    for k in ("alpha", "beta", "lower", "upper"):
        e.f64(get(d, k, 0))
    c = get(p, "consensus", None)
    e.boolean(c is not None)
    if c is not None:
        e.answer(c)
    c = get(p, "construction", None)
    e.boolean(c is not None)
    if c is not None:
        e.text(get(c, "method", ""))
        for k in ("successes", "trials", "mean", "sd", "low", "high", "coverage", "lower", "upper"):
            e.f64(get(c, k, 0))
    e.text(get(p, "rationale", ""))
    e.i64(get(p, "round", 0))
    e.boolean(get(p, "while_round_open", False))
    e.i64(get(p, "weight_set_id", 0))
    e.ints(get(p, "pooled_revisions", []))
    e.time(get(p, "at", ZERO_TIME))
    return e.b


def study_data(s):
    e = Enc()
    e.text("study_data")
    for k in ("id", "question_id", "successes", "trials"):
        e.i64(get(s, k, 0))
    e.text(get(s, "source", ""))
    e.text(get(s, "observed_on", ""))
    e.time(get(s, "at", ZERO_TIME))
    return e.b


def event(v):
    e = Enc()
    e.text("event")
    e.i64(get(v, "id", 0))
    e.i64(get(v, "workshop_id", 0))
    e.i64(get(v, "question_id", 0))
    e.text(get(v, "kind", ""))
    e.time(get(v, "at", ZERO_TIME))
    e.text(get(v, "reason", ""))
    e.text(get(v, "detail", ""))
    return e.b


def chain(rec):
    w = get(rec, "workshop", {})
    e = Enc()
    e.text(DOMAIN)
    e.i64(get(w, "id", 0))
    e.time(get(w, "created", ZERO_TIME))
    start = hashlib.sha256(e.b).digest()
    facts = []
    for r in get(rec, "revisions", []):
        facts.append(("revision", get(r, "id", 0), get(r, "at", ZERO_TIME), revision(r)))
    for x in get(rec, "weight_history", []):
        facts.append(("weight_set", get(x, "id", 0), get(x, "at", ZERO_TIME), weight_set(x)))
    for q in get(rec, "questions", []):
        for p in get(q, "prior_history", []):
            facts.append(("agreed_prior", get(p, "id", 0), get(p, "at", ZERO_TIME), agreed_prior(p)))
    for s in get(rec, "study_data", []):
        facts.append(("study_data", get(s, "id", 0), get(s, "at", ZERO_TIME), study_data(s)))
    for v in get(rec, "events", []):
        facts.append(("event", get(v, "id", 0), get(v, "at", ZERO_TIME), event(v)))
    facts.sort(key=lambda f: (parse_time(f[2]), RANK[f[0]], int(f[1])))
    h = start
    links = []
    for kind, fid, _, raw in facts:
        h = hashlib.sha256(h + bytes(raw)).digest()
        links.append((kind, int(fid), h.hex()))
    return start.hex(), links, h.hex()


def main(paths):
    print("# made by testdata/fingerprint/chain.py with Python %s, hashlib's SHA-256" % sys.version.split()[0])
    for path in paths:
        with open(path, encoding="utf-8") as f:
            # Whole numbers are kept as their text, so that a float field
            # written "-0" is read as -0.0 (json would make it the int 0).
            rec = json.load(f, parse_int=str)
        start, links, head = chain(rec)
        print("# record", os.path.basename(path))
        print("start", start)
        for kind, fid, value in links:
            print(kind, fid, value)
        print("head", head)


if __name__ == "__main__":
    main(sys.argv[1:])
