#!/usr/bin/env python3
"""Writes the seed corpora of the fuzz targets into mzcore/fuzz/corpus/<target>/ (git-ignored).

Seeds come from the repository's fixtures: whole files (mzml_document), single <spectrum> and
<chromatogram> elements cut from them (mzml_spectrum), every binary array with its encoding
(binary_decoder), formulas and ion types of the demo truth tables (formula, ion_type), and the
default configuration (config_toml; from `mzsift config` when the binary is given).

Usage: seed_corpus.py REPO_ROOT [MZSIFT_BINARY]
"""

import gzip
import hashlib
import pathlib
import re
import subprocess
import sys

ROOT = pathlib.Path(sys.argv[1]).resolve()
MZSIFT = sys.argv[2] if len(sys.argv) > 2 else None
CORPUS = ROOT / "mzcore" / "fuzz" / "corpus"

# Selector byte of the binary_decoder target (mzcore_fuzz::encoding_of): bits 0-1 numeric type,
# bits 2-4 compression, bit 5 "raw payload".
NUMERIC = {"MS:1000521": 0, "MS:1000523": 1, "MS:1000519": 2, "MS:1000522": 3}
COMPRESSION = {
    "MS:1000576": 0, "MS:1000574": 1, "MS:1002312": 2, "MS:1002313": 3, "MS:1002314": 4,
    "MS:1002746": 5, "MS:1002747": 6, "MS:1002748": 7,
}


def put(target, data):
    d = CORPUS / target
    d.mkdir(parents=True, exist_ok=True)
    (d / hashlib.sha1(data).hexdigest()).write_bytes(data)


def main():
    fixtures = sorted((ROOT / "fixtures").glob("*.mzML")) + sorted(
        (ROOT / "fixtures").glob("*.mzML.gz"))
    counts = {}
    for f in fixtures:
        data = f.read_bytes()
        put("mzml_document", data)
        text = gzip.decompress(data) if f.name.endswith(".gz") else data
        # A cut-off copy: files cut by a full disk are what the reader meets most.
        put("mzml_document", text[: len(text) // 2])
        for m in list(re.finditer(rb"<(?:\w+:)?spectrum .*?</(?:\w+:)?spectrum>", text, re.S))[:3]:
            put("mzml_spectrum", m.group(0))
        for m in re.finditer(rb"<(?:\w+:)?chromatogram .*?</(?:\w+:)?chromatogram>", text, re.S):
            put("mzml_spectrum", m.group(0))
        for m in re.finditer(rb"<(?:\w+:)?binaryDataArray .*?</(?:\w+:)?binaryDataArray>", text, re.S):
            block = m.group(0).decode("latin-1")
            acc = re.findall(r'accession="(MS:\d+)"', block)
            num = next((NUMERIC[a] for a in acc if a in NUMERIC), 1)
            comp = next((COMPRESSION[a] for a in acc if a in COMPRESSION), None)
            b64 = re.search(r"<(?:\w+:)?binary>(.*?)</(?:\w+:)?binary>", block, re.S)
            length = re.search(r'arrayLength="(\d+)"', block)
            if comp is None or b64 is None:
                continue
            payload = re.sub(r"\s", "", b64.group(1)).encode()
            if length is None:
                # The spectrum's defaultArrayLength, found before this array.
                before = text[: m.start()].decode("latin-1")
                found = re.findall(r'defaultArrayLength="(\d+)"', before)
                length = int(found[-1]) if found else 0
            else:
                length = int(length.group(1))
            selector = num | comp << 2
            put("binary_decoder", bytes([selector]) + (length & 0xFFFF).to_bytes(2, "little") + payload)
    formulas, ions = {"C6H4Cl2", "C12Br10O", "CHCl3", "C2H5OH", "C60", "H2O", "(CH3)2CO"}, {
        "M+.", "M+H", "M-H", "M+Na", "M+NH4", "M+2H", "M-H2O+H", "2M+H", "M+Cl"}
    for t in sorted((ROOT / "fixtures" / "demo").glob("*.truth.tsv")):
        for line in t.read_text().splitlines()[1:]:
            cells = line.split("\t")
            if len(cells) > 2:
                formulas.add(cells[1])
                ions.add(cells[2])
    for f in sorted(formulas):
        put("formula", f.encode())
    for i in sorted(ions):
        put("ion_type", i.encode())
        put("ion_type", f"C6H4Cl2|{i}".encode())
    configs = ["threads = 2\n", "[reader]\nmax_event_bytes = 1024\n",
               "[flag]\nmin_snr = 20.0\n", "[pipeline]\nin_flight = 4\n"]
    if MZSIFT:
        configs.append(subprocess.run([MZSIFT, "config"], check=True,
                                      capture_output=True, text=True).stdout)
    for c in configs:
        put("config_toml", c.encode())
    rules = ROOT / "fixtures" / "qc-rules.toml"
    text = rules.read_text()
    put("qc_rules", text.encode())
    # Each table of the shipped rules alone, so the fuzzer starts from every rule kind.
    for block in text.split("\n\n"):
        if "[" in block:
            put("qc_rules", block.encode())
    for d in sorted(CORPUS.iterdir()):
        counts[d.name] = len(list(d.iterdir()))
    print("seed corpus:", ", ".join(f"{k} {v}" for k, v in counts.items()))


main()
