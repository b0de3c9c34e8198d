"""Checks the reconciliation lines of a bundle (stdin) from docs/bundle-format.md alone: rebuilds
each record's canonical bytes, recomputes row_hash with hashlib and follows the run of previous
hashes. Prints `reconciliation SEQ ok` per line; exit 1 naming the first that fails. Standard
library only, independent of sinkbook's Rust code."""

import hashlib
import json
import struct
import sys
from datetime import datetime, timezone


def s(text):
    b = text.encode("utf-8")
    return struct.pack("<I", len(b)) + b


def opt(value, write):
    return b"\x00" if value is None else b"\x01" + write(value)


def i64(v):
    return struct.pack("<q", v)


def micros(t):
    # YYYY-MM-DDTHH:MM:SS.ffffffZ, UTC
    d = datetime.strptime(t, "%Y-%m-%dT%H:%M:%S.%fZ").replace(tzinfo=timezone.utc)
    delta = d - datetime(1970, 1, 1, tzinfo=timezone.utc)
    return (delta.days * 86400 + delta.seconds) * 1_000_000 + delta.microseconds


def main():
    project = None
    previous = "0" * 64
    due = 0
    for raw in sys.stdin:
        line = json.loads(raw)
        if line["type"] == "header":
            project = line["project"]
        if line["type"] != "reconciliation":
            continue
        seq = line["seq"]
        if seq != due or line["previous"] != previous:
            sys.exit(f"reconciliation {seq}: not the record after {due - 1}")
        b = bytes([1]) + s("reconciliation") + s(project) + struct.pack("<Q", seq)
        b += bytes.fromhex(line["previous"]) + s(line["report_name"])
        b += bytes.fromhex(line["report_sha256"]) + s(line["method"])
        b += s(line["materiality"]) + s(line["basis"])
        b += struct.pack("<Q", line["chain_size"]) + bytes.fromhex(line["chain_head"])
        b += struct.pack("<I", len(line["lines"]))
        for l in line["lines"]:
            b += s(l["period"]) + s(l["quantity"])
            b += opt(l["ledger_g"], i64) + opt(l["report_g"], i64)
            b += i64(l["difference_g"]) + s(l["note"])
        b += struct.pack("<I", len(line["years"]))
        for y in line["years"]:
            b += struct.pack("<i", y["year"]) + i64(y["stored_g"]) + s(y["counted"])
            b += i64(y["misstatement_g"]) + i64(y["threshold_g"]) + s(y["verdict"])
        b += s(line["verdict"]) + s(line["role"])
        b += opt(line["by"], s) + opt(line["recorded_by"], s)
        b += i64(micros(line["recorded_at"]))
        if hashlib.sha256(b"\x00" + b).hexdigest() != line["row_hash"]:
            sys.exit(f"reconciliation {seq}: row_hash differs")
        previous = line["row_hash"]
        due += 1
        print(f"reconciliation {seq} ok")


main()
