#!/usr/bin/python3
"""Checks of the HTML report, standard library only (run with /usr/bin/python3).

  html_check.py structure REPORT.html [--figure KEY ...] [--table CLASS ...]
      Valid-HTML checks: doctype first, <html lang>, <meta charset>, <title>;
      every non-void element closed in order (tag balance); unique id
      attributes; no external resource (no src=, no http(s) links, no
      url(...) in styles); every --figure KEY present as an <svg> with
      data-figure="KEY" inside a <figure> with a <figcaption>; every --table
      CLASS present as a <table class="...CLASS...">.
  html_check.py svg FILE.svg ...
      Each file parses as XML with an <svg> root in the SVG namespace.
  html_check.py png SCREENSHOT.png [--min-nonwhite FRACTION] [--min-colours N]
      Decodes the PNG (zlib + struct, filters 0-4, 8-bit RGB/RGBA/grey) and
      fails if fewer than FRACTION of the pixels are non-white or fewer than
      N distinct colours appear.
Exit status 0 when every check passes; 1 with one line per failure on stderr.
"""
import argparse
import html.parser
import re
import struct
import sys
import xml.etree.ElementTree as ET
import zlib

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source", "track", "wbr"}
# Elements whose end tag HTML allows to be omitted; the report always closes
# them, so they are checked like any other element.
SVG_NS = "{http://www.w3.org/2000/svg}svg"


class Checker(html.parser.HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.errors = []
        self.stack = []  # (tag, attrs, line)
        self.ids = {}
        self.doctype = None
        self.first_thing = None
        self.html_lang = None
        self.charset = False
        self.title = ""
        self.in_title = False
        self.figures = {}  # data-figure -> (inside <figure>, figure has caption)
        self.figure_stack = []  # [key list, has caption]
        self.tables = []
        self.in_svg = 0

    def error_at(self, msg):
        self.errors.append("line %d: %s" % (self.getpos()[0], msg))

    def handle_decl(self, decl):
        if self.first_thing is None:
            self.first_thing = "doctype"
        self.doctype = decl

    def handle_starttag(self, tag, attrs):
        if self.first_thing is None:
            self.first_thing = tag
        a = dict(attrs)
        if "id" in a:
            if a["id"] in self.ids:
                self.error_at("duplicate id %r (first at line %d)" % (a["id"], self.ids[a["id"]]))
            else:
                self.ids[a["id"]] = self.getpos()[0]
        if "src" in a:
            self.error_at("external resource: <%s src=%r>" % (tag, a["src"]))
        for k in ("href", "xlink:href"):
            v = a.get(k)
            if v is not None and not v.startswith("#"):
                self.error_at("link leaves the page: <%s %s=%r>" % (tag, k, v))
        if tag == "html":
            self.html_lang = a.get("lang")
        if tag == "meta" and (a.get("charset", "").lower() == "utf-8"):
            self.charset = True
        if tag == "title":
            self.in_title = True
        if tag == "figure":
            self.figure_stack.append([[], False])
        if tag == "figcaption" and self.figure_stack:
            self.figure_stack[-1][1] = True
        if tag == "svg":
            self.in_svg += 1
            key = a.get("data-figure")
            if key is not None:
                if key in self.figures:
                    self.error_at("figure %r twice" % key)
                self.figures[key] = None
                if self.figure_stack:
                    self.figure_stack[-1][0].append(key)
        if tag == "table":
            self.tables.append(a.get("class", ""))
        if tag in VOID:
            return
        self.stack.append((tag, self.getpos()[0]))

    def handle_startendtag(self, tag, attrs):
        # <x/>: fine inside SVG (XML syntax) and for void elements.
        if tag in VOID or self.in_svg:
            saved = list(self.stack)
            self.handle_starttag(tag, attrs)
            self.stack = saved
            if tag == "svg":
                self.in_svg -= 1
            return
        self.error_at("self-closed non-void element <%s/>" % tag)

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        if not self.stack:
            self.error_at("end tag </%s> with nothing open" % tag)
            return
        open_tag, line = self.stack.pop()
        if open_tag != tag:
            self.error_at("end tag </%s> closes <%s> opened at line %d" % (tag, open_tag, line))
        if tag == "title":
            self.in_title = False
        if tag == "svg":
            self.in_svg -= 1
        if tag == "figure" and self.figure_stack:
            keys, caption = self.figure_stack.pop()
            for k in keys:
                self.figures[k] = caption

    def handle_data(self, data):
        if self.in_title:
            self.title += data
        if self.stack and self.stack[-1][0] == "style" and re.search(r"url\(\s*['\"]?[^#'\"\s)]", data):
            self.error_at("style sheet loads a url(...) outside the page")


def check_structure(args):
    text = open(args.report, encoding="utf-8").read()
    c = Checker()
    c.feed(text)
    c.close()
    errors = list(c.errors)
    if not text.startswith("<!DOCTYPE html>"):
        errors.append("document does not start with <!DOCTYPE html>")
    if c.html_lang is None or not c.html_lang:
        errors.append("<html> has no lang attribute")
    if not c.charset:
        errors.append("no <meta charset=\"utf-8\">")
    if not c.title.strip():
        errors.append("empty or missing <title>")
    for tag, line in c.stack:
        errors.append("<%s> opened at line %d is never closed" % (tag, line))
    if re.search(r"<script[^>]*\bsrc=", text):
        errors.append("external script")
    for key in args.figure or []:
        if key not in c.figures:
            errors.append("figure %r missing (no <svg data-figure=%r>)" % (key, key))
        elif not c.figures[key]:
            errors.append("figure %r is not inside a <figure> with a <figcaption>" % key)
    for cls in args.table or []:
        if not any(cls in t.split() for t in c.tables):
            errors.append("no <table class=%r>" % cls)
    print("%d figures, %d tables, %d ids" % (len(c.figures), len(c.tables), len(c.ids)))
    return errors


def check_svg(args):
    errors = []
    for f in args.files:
        try:
            root = ET.parse(f).getroot()
        except ET.ParseError as e:
            errors.append("%s: not well-formed XML: %s" % (f, e))
            continue
        if root.tag != SVG_NS:
            errors.append("%s: root is %s, not an SVG <svg>" % (f, root.tag))
    print("%d SVG files" % len(args.files))
    return errors


def decode_png(path):
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise ValueError("not a PNG file")
    pos, idat, width, height, depth, ctype, interlace = 8, b"", 0, 0, 0, 0, 0
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        pos += 12 + length
        if kind == b"IHDR":
            width, height, depth, ctype, _, _, interlace = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat += body
        elif kind == b"IEND":
            break
    channels = {0: 1, 2: 3, 4: 2, 6: 4}.get(ctype)
    if depth != 8 or channels is None or interlace != 0:
        raise ValueError("unsupported PNG: depth %d, colour type %d, interlace %d" % (depth, ctype, interlace))
    raw = zlib.decompress(idat)
    stride = width * channels
    rows, prev, i = [], bytearray(stride), 0
    for _ in range(height):
        f = raw[i]
        line = bytearray(raw[i + 1:i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - channels] if x >= channels else 0
            b = prev[x]
            c = prev[x - channels] if x >= channels else 0
            if f == 1:
                line[x] = (line[x] + a) & 255
            elif f == 2:
                line[x] = (line[x] + b) & 255
            elif f == 3:
                line[x] = (line[x] + ((a + b) >> 1)) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pred = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[x] = (line[x] + pred) & 255
        rows.append(bytes(line))
        prev = line
    return width, height, channels, rows


def check_png(args):
    width, height, channels, rows = decode_png(args.png)
    colours, nonwhite = set(), 0
    for line in rows:
        for x in range(0, len(line), channels):
            px = line[x:x + min(channels, 3)]
            colours.add(px)
            if any(v < 245 for v in px):
                nonwhite += 1
    total = width * height
    frac = nonwhite / total if total else 0.0
    print("%dx%d, %.2f %% non-white, %d colours" % (width, height, 100 * frac, len(colours)))
    errors = []
    if frac < args.min_nonwhite:
        errors.append("only %.3f %% of pixels non-white (need %.3f %%)" % (100 * frac, 100 * args.min_nonwhite))
    if len(colours) < args.min_colours:
        errors.append("only %d distinct colours (need %d)" % (len(colours), args.min_colours))
    return errors


def main():
    p = argparse.ArgumentParser()
    sub = p.add_subparsers(dest="cmd", required=True)
    s = sub.add_parser("structure")
    s.add_argument("report")
    s.add_argument("--figure", action="append")
    s.add_argument("--table", action="append")
    v = sub.add_parser("svg")
    v.add_argument("files", nargs="+")
    g = sub.add_parser("png")
    g.add_argument("png")
    g.add_argument("--min-nonwhite", type=float, default=0.02)
    g.add_argument("--min-colours", type=int, default=8)
    args = p.parse_args()
    errors = {"structure": check_structure, "svg": check_svg, "png": check_png}[args.cmd](args)
    for e in errors:
        print(e, file=sys.stderr)
    return 1 if errors else 0


if __name__ == "__main__":
    sys.exit(main())
