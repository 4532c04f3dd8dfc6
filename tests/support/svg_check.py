#!/usr/bin/env python3
"""Checks that a file is well-formed XML with an <svg> root, using only the Python standard
library (xml.etree.ElementTree, a non-validating XML 1.0 parser). Prints JSON
{"root": local tag name, "elements": element count, "drawn": path/polyline/polygon/line/rect/
image/text elements}; exits 1 with the parser's message on malformed XML."""
import json
import sys
import xml.etree.ElementTree as ET


def local(tag):
    return tag.rsplit("}", 1)[-1]


def main(path):
    try:
        root = ET.parse(path).getroot()
    except ET.ParseError as e:
        print("malformed XML in %s: %s" % (path, e), file=sys.stderr)
        raise SystemExit(1)
    elements = list(root.iter())
    drawn = sum(1 for e in elements
                if local(e.tag) in ("path", "polyline", "polygon", "line", "rect", "image", "text", "use"))
    print(json.dumps({"root": local(root.tag), "elements": len(elements), "drawn": drawn}))


if __name__ == "__main__":
    main(sys.argv[1])
