#!/usr/bin/python3
"""Reads report pages and the outputs they are checked against, for
tests/report_browser_test.cpp and tests/report_page_test.cpp. Prints one fact
a line, sorted, so the C++ tests compare plain lines.

  report_dom.py dom FILE          the page (or chromium's --dump-dom of it):
                                    cell MODEL STATUS COUNT    run cells of each model's calendar
                                    timeline STATUS MODEL DESCRIPTION
                                    chart SOURCE               landing-offset charts
  report_dom.py check-json FILE   `check --format json`: cell MODEL STATUS COUNT, and
                                  timeline STATUS MODEL DESCRIPTION per pattern
  report_dom.py nightly-json FILE `nightly --format json`: chart SOURCE per drift entry
  report_dom.py html5 FILE        strict HTML5 parse (html5lib): prints each error; exit 1 on any
  report_dom.py png FILE          a PNG (8-bit RGB/RGBA, not interlaced): size W H, colours N,
                                    non-background PERMILLE (pixels unlike the top-left one)
"""
import collections
import json
import struct
import sys
import zlib


def dom_facts(path):
    import html5lib  # python3-html5lib (Debian)
    with open(path, "rb") as f:
        doc = html5lib.parse(f, treebuilder="etree", namespaceHTMLElements=False)
    cells = collections.Counter()
    lines = []
    def tag_of(el):
        return el.tag.split("}")[-1] if isinstance(el.tag, str) else ""

    for el in doc.iter():
        tag = tag_of(el)
        cls = (el.get("class") or "").split()
        if tag == "svg" and "calendar" in cls:
            for run in el.iter():
                if tag_of(run) == "g" and "run" in (run.get("class") or "").split():
                    cells[(el.get("data-model"), run.get("data-status"))] += 1
        elif tag == "figure" and "timeline" in cls and el.get("data-pattern") is not None:
            lines.append("timeline %s %s %s" % (el.get("data-status"), el.get("data-model"), el.get("data-pattern")))
        elif tag == "figure" and "offsets" in cls:
            lines.append("chart %s" % el.get("data-source"))
    lines += ["cell %s %s %d" % (m, s, n) for (m, s), n in cells.items()]
    return sorted(lines)


def check_json_facts(path):
    with open(path) as f:
        doc = json.load(f)
    cells = collections.Counter((r["model"], r["status"]) for r in doc["runs"])
    lines = ["cell %s %s %d" % (m, s, n) for (m, s), n in cells.items()]
    lines += ["timeline %s %s %s" % (p["status"], p["model"], p["description"]) for p in doc.get("patterns", [])]
    return sorted(lines)


def nightly_json_facts(path):
    with open(path) as f:
        doc = json.load(f)
    return sorted("chart %s" % d["source"] for d in doc["drift"])


def html5_errors(path):
    import html5lib
    parser = html5lib.HTMLParser(strict=False, namespaceHTMLElements=False)
    with open(path, "rb") as f:
        parser.parse(f)
    return ["%d:%d: %s %s" % (pos[0], pos[1], code, data) for pos, code, data in parser.errors]


def png_facts(path):
    with open(path, "rb") as f:
        data = f.read()
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
    pos, idat, width = 8, b"", 0
    while pos < len(data):
        length, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            width, height, depth, colour, _, _, interlace = struct.unpack(">IIBBBBB", body)
            assert depth == 8 and colour in (2, 6) and interlace == 0, "unsupported PNG layout"
            bpp = 3 if colour == 2 else 4
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    raw = zlib.decompress(idat)
    stride = width * bpp
    rows, prev, i = [], bytearray(stride), 0
    for _ in range(height):  # PNG filters (RFC 2083 §6)
        ftype, line = raw[i], bytearray(raw[i + 1:i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if ftype == 1:
                line[x] = (line[x] + a) & 255
            elif ftype == 2:
                line[x] = (line[x] + b) & 255
            elif ftype == 3:
                line[x] = (line[x] + (a + b) // 2) & 255
            elif ftype == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[x] = (line[x] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        rows.append(bytes(line))
        prev = line
    background = rows[0][:3]
    colours, other = set(), 0
    for row in rows:
        for x in range(0, stride, bpp):
            px = row[x:x + 3]
            colours.add(px)
            other += px != background
    return ["size %d %d" % (width, height), "colours %d" % len(colours),
            "non-background %d" % (1000 * other // (width * height))]


def main():
    if len(sys.argv) != 3:
        sys.exit(__doc__)
    command, path = sys.argv[1], sys.argv[2]
    if command == "dom":
        out = dom_facts(path)
    elif command == "check-json":
        out = check_json_facts(path)
    elif command == "nightly-json":
        out = nightly_json_facts(path)
    elif command == "html5":
        out = html5_errors(path)
        print("\n".join(out))
        sys.exit(1 if out else 0)
    elif command == "png":
        out = png_facts(path)
    else:
        sys.exit(__doc__)
    print("\n".join(out))


if __name__ == "__main__":
    main()
