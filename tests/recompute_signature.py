"""Checks the signature lines of a bundle (stdin) from docs/bundle-format.md alone: rebuilds each
statement's message and row bytes, recomputes row_hash with hashlib and verifies the ed25519
signature with the `cryptography` package. Prints `signature SEQ ok` per line; exit 1 naming the
first that fails. Independent of sinkbook's Rust code."""

import hashlib
import json
import struct
import sys
from datetime import datetime, timezone

from cryptography.exceptions import InvalidSignature
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey


def s(text):
    b = text.encode("utf-8")
    return struct.pack("<I", len(b)) + b


def micros(t):
    # YYYY-MM-DDTHH:MM:SS.ffffffZ, UTC
    d = datetime.strptime(t, "%Y-%m-%dT%H:%M:%S.%fZ").replace(tzinfo=timezone.utc)
    epoch = datetime(1970, 1, 1, tzinfo=timezone.utc)
    delta = d - epoch
    return (delta.days * 86400 + delta.seconds) * 1_000_000 + delta.microseconds


def main():
    project = None
    count = 0
    for raw in sys.stdin:
        line = json.loads(raw)
        if line["type"] == "header":
            project = line["project"]
        if line["type"] != "signature":
            continue
        message = (
            bytes([1])
            + s("statement")
            + s(project)
            + struct.pack("<Q", line["seal_seq"])
            + s(line["period"])
            + struct.pack("<Q", line["tree_size"])
            + bytes.fromhex(line["root"])
            + s(line["role"])
            + s(line["statement"])
            + struct.pack("<q", micros(line["signed_at"]))
        )
        key = bytes.fromhex(line["public_key"])
        sig = bytes.fromhex(line["signature"])
        row = bytes([1]) + s("signature") + struct.pack("<Q", line["seq"])
        row += struct.pack("<I", len(message)) + message + key + sig
        if hashlib.sha256(b"\x00" + row).hexdigest() != line["row_hash"]:
            sys.exit(f"signature {line['seq']}: row_hash differs")
        try:
            Ed25519PublicKey.from_public_bytes(key).verify(sig, message)
        except InvalidSignature:
            sys.exit(f"signature {line['seq']}: ed25519 signature does not verify")
        print(f"signature {line['seq']} ok")
        count += 1
    if count == 0:
        sys.exit("no signature lines")


if __name__ == "__main__":
    main()
