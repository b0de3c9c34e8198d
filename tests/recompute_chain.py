#!/usr/bin/env python3
"""Recomputes a sinkbook chain from `sinkbook --format json entries PROJECT`, following
docs/ledger-format.md only (canonical encodings v1 and v2), with Python's own hashlib. It shares no code
with sinkbook. Prints one line per entry: seq, leaf hex, chain hex; then, for every seal, `seal`,
its seq, tree size and the RFC 6962 tree head recomputed from the leaves before it. Exits 1 on
the first mismatch."""
import datetime
import hashlib
import json
import struct
import sys

KINDS = {
    name: i
    for i, name in enumerate(
        "injection receipt redelivery production leakage equipment-leak emission survey "
        "tracer-sample carbonation application soil-sample reversal calibration seal".split()
    )
}
SIGNS = {"adds": 0, "deducts": 1, "neutral": 2}
EPOCH = datetime.date(1970, 1, 1)


def s(text):
    b = text.encode("utf-8")
    return struct.pack("<I", len(b)) + b


def opt(value, enc):
    return b"\x00" if value is None else b"\x01" + enc(value)


def days(iso):
    return (datetime.date.fromisoformat(iso) - EPOCH).days


def micros(rfc3339):
    t = datetime.datetime.strptime(rfc3339, "%Y-%m-%dT%H:%M:%S.%fZ").replace(tzinfo=datetime.timezone.utc)
    delta = t - datetime.datetime(1970, 1, 1, tzinfo=datetime.timezone.utc)
    return (delta.days * 86400 + delta.seconds) * 1_000_000 + delta.microseconds


def encode(project, e):
    """v1; v2 when the entry names the registry role that recorded it: version byte 2, the same
    fields, then the role."""
    by = e.get("recorded_by")
    b = bytes([1 if by is None else 2]) + s(project) + struct.pack("<Q", e["seq"]) + bytes([KINDS[e["kind"]]]) + s(e["site"])
    b += struct.pack("<ii", days(e["period_from"]), days(e["period_to"]))
    b += struct.pack("<I", len(e["reading"]))
    for name, value in e["reading"]:
        b += s(name) + s(value)
    b += struct.pack("<q", e["co2_g"]) + bytes([SIGNS[e["sign"]]]) + struct.pack("<q", micros(e["recorded_at"]))
    b += s(e["key"]) + opt(e["meter"], s) + opt(e["note"], s)
    b += opt(e["corrects"], lambda c: struct.pack("<Q", c)) + opt(e["reason"], s)
    evidence = None if e["evidence_name"] is None else (e["evidence_name"], e["evidence_sha256"])
    b += opt(evidence, lambda ev: s(ev[0]) + bytes.fromhex(ev[1]))
    if by is not None:
        b += s(by)
    return b


def mth(leaves):
    """RFC 6962 §2.1 Merkle tree head: split at the largest power of two below n."""
    if not leaves:
        return hashlib.sha256(b"").digest()
    if len(leaves) == 1:
        return leaves[0]
    k = 1
    while k * 2 < len(leaves):
        k *= 2
    return hashlib.sha256(b"\x01" + mth(leaves[:k]) + mth(leaves[k:])).digest()


def main():
    project = sys.argv[1]
    chain = bytes(32)
    leaves = []
    seals = []
    for e in json.load(sys.stdin):
        leaf = hashlib.sha256(b"\x00" + encode(project, e)).digest()
        chain = hashlib.sha256(chain + leaf).digest()
        print(e["seq"], leaf.hex(), chain.hex())
        if leaf.hex() != e["leaf_hash"] or chain.hex() != e["chain_hash"]:
            print(f"mismatch at seq {e['seq']}", file=sys.stderr)
            return 1
        if e["kind"] == "seal":
            seals.append((e["seq"], dict(e["reading"]), mth(leaves)))
        leaves.append(leaf)
    for seq, reading, root in seals:
        print("seal", seq, reading["tree_size"], root.hex())
        if int(reading["tree_size"]) != seq or reading["root"] != root.hex():
            print(f"seal at seq {seq}: tree head differs", file=sys.stderr)
            return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
