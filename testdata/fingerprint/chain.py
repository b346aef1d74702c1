#!/usr/bin/python3
"""Recompute a Parley record's fingerprint chain from its JSON file alone.

Written apart from Parley's Go code, from the encoding as DEVELOPERS.md
("The record's fingerprint") and elicit/fingerprint's doc comment describe
it, with Python's standard library only (json, hashlib, struct, re,
calendar). Made with Python 3.11.2 (Debian's /usr/bin/python3).

    /usr/bin/python3 testdata/fingerprint/chain.py RECORD.json ... > OUT

writes a first line naming itself and Python's version, then, for each
record, a line "# record NAME" (the file's base name), a
line "start HEX" (h0), one line "KIND ID VALUE" for each fact in the
chain's order, and a line "head HEX". It reads only the facts, never the
record's own "chain" or "fingerprint" keys.
"""

import calendar
import hashlib
import json
import os
import re
import struct
import sys

DOMAIN = "parley record fingerprint v1"
RANK = {"revision": 1, "weight_set": 2, "agreed_prior": 3, "study_data": 4, "event": 5}

TIME = re.compile(r"^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2})(?:\.(\d{1,9}))?(Z|[+-]\d{2}:\d{2})$")


def parse_time(s):
    """RFC 3339 text -> (Unix seconds, nanoseconds), nanosecond exact."""
    m = TIME.match(s)
    if not m:
        raise ValueError("not an RFC 3339 time: %r" % s)
    y, mo, d, h, mi, se = (int(m.group(i)) for i in range(1, 7))
    nanos = int((m.group(7) or "").ljust(9, "0"))
    secs = calendar.timegm((y, mo, d, h, mi, se, 0, 0, 0))
    off = m.group(8)
    if off != "Z":
        sign = 1 if off[0] == "+" else -1
        secs -= sign * (int(off[1:3]) * 3600 + int(off[4:6]) * 60)
    return secs, nanos


class Enc:
    def __init__(self):
        self.b = bytearray()

    def i64(self, n):
        self.b += struct.pack(">q", int(n))

    def f64(self, x):
        self.b += struct.pack(">d", float(x))

    def boolean(self, v):
        self.b += b"\x01" if v else b"\x00"

    def text(self, s):
        raw = s.encode("utf-8")
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
        self.floats(a.get("values", []))
        for k in ("lowest", "highest", "best", "confidence"):
            self.f64(a.get(k, 0))
        self.ints(a.get("counts", []))
        self.boolean(a.get("percent", False))


def revision(r):
    e = Enc()
    e.text("revision")
    for k in ("id", "question_id", "expert_id", "round"):
        e.i64(r[k])
    e.time(r["at"])
    e.text(r.get("reason", ""))
    e.answer(r.get("answer", {}))
    e.text(r.get("entered_by") or "expert")
    e.text(r.get("channel", ""))
    return e.b


def weight_set(w):
    e = Enc()
    e.text("weight_set")
    e.i64(w.get("id", 0))
    e.i64(w["workshop_id"])
    e.text(w["scheme"])
    by = sorted((int(k), v) for k, v in w.get("by_expert", {}).items())
    e.i64(len(by))
    for k, v in by:
        e.i64(k)
        e.f64(v)
    e.text(w.get("reason", ""))
    e.time(w["at"])
    return e.b


def agreed_prior(p):
    e = Enc()
    e.text("agreed_prior")
    e.i64(p["id"])
    e.i64(p["question_id"])
    e.text(p["source"])
    d = p["dist"]
    for k in ("alpha", "beta", "lower", "upper"):
        e.f64(d.get(k, 0))
    c = p.get("consensus")
    e.boolean(c is not None)
    if c is not None:
        e.answer(c)
    c = p.get("construction")
    e.boolean(c is not None)
    if c is not None:
        e.text(c.get("method", ""))
        for k in ("successes", "trials", "mean", "sd", "low", "high", "coverage", "lower", "upper"):
            e.f64(c.get(k, 0))
    e.text(p.get("rationale", ""))
    e.i64(p["round"])
    e.boolean(p.get("while_round_open", False))
    e.i64(p.get("weight_set_id", 0))
    e.ints(p.get("pooled_revisions", []))
    e.time(p["at"])
    return e.b


def study_data(s):
    e = Enc()
    e.text("study_data")
    for k in ("id", "question_id", "successes", "trials"):
        e.i64(s[k])
    e.text(s.get("source", ""))
    e.text(s.get("observed_on", ""))
    e.time(s["at"])
    return e.b


def event(v):
    e = Enc()
    e.text("event")
    e.i64(v["id"])
    e.i64(v["workshop_id"])
    e.i64(v.get("question_id", 0))
    e.text(v["kind"])
    e.time(v["at"])
    e.text(v.get("reason", ""))
    e.text(v.get("detail", ""))
    return e.b


def chain(rec):
    w = rec["workshop"]
    e = Enc()
    e.text(DOMAIN)
    e.i64(w["id"])
    e.time(w["created"])
    start = hashlib.sha256(e.b).digest()
    facts = []
    for r in rec.get("revisions", []):
        facts.append(("revision", r["id"], r["at"], revision(r)))
    for x in rec.get("weight_history", []):
        facts.append(("weight_set", x.get("id", 0), x["at"], weight_set(x)))
    for q in rec.get("questions", []):
        for p in q.get("prior_history", []):
            facts.append(("agreed_prior", p["id"], p["at"], agreed_prior(p)))
    for s in rec.get("study_data", []):
        facts.append(("study_data", s["id"], s["at"], study_data(s)))
    for v in rec.get("events", []):
        facts.append(("event", v["id"], v["at"], event(v)))
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
