/**
 * Outside references for the campaign tests: Python's csv module (RFC 4180 reading)
 * and its XML and HTML parsers, run through python3.
 */
import { execFileSync } from "node:child_process";
import { requireTool } from "../helpers/tools.js";

export const HAS_PYTHON = requireTool("python3", "python3");

/** Rows as Python's csv.reader (strict) reads them. */
export function pythonCsvRows(text: string): string[][] {
  const out = execFileSync("python3", ["-c", "import csv,sys,json; print(json.dumps(list(csv.reader(sys.stdin, strict=True))))"], { input: text, encoding: "utf8" });
  return JSON.parse(out) as string[][];
}

/**
 * An HTML page as Python reads it: xml.etree parses it (throws on anything not
 * well-formed), html.parser lists every href and src and the text of each table row.
 */
export function pythonHtml(file: string): { root: string; links: { attr: string; value: string }[]; rows: string[][]; text: string } {
  const script = String.raw`
import json, sys, xml.etree.ElementTree as ET
from html.parser import HTMLParser
src = open(sys.argv[1], encoding="utf-8").read()
root = ET.fromstring(src.split("\n", 1)[1])  # after the DOCTYPE line
class P(HTMLParser):
    def __init__(self):
        super().__init__(); self.links = []; self.rows = []; self.cell = None; self.text = []
    def handle_starttag(self, tag, attrs):
        for k, v in attrs:
            if k in ("href", "src"): self.links.append({"attr": k, "value": v})
        if tag == "tr": self.rows.append([])
        if tag in ("td", "th"): self.cell = ""
    def handle_endtag(self, tag):
        if tag in ("td", "th") and self.rows: self.rows[-1].append(self.cell.strip()); self.cell = None
    def handle_data(self, data):
        self.text.append(data)
        if self.cell is not None: self.cell += data
p = P(); p.feed(src)
print(json.dumps({"root": root.tag, "links": p.links, "rows": p.rows, "text": "".join(p.text)}))
`;
  return JSON.parse(execFileSync("python3", ["-c", script, file], { encoding: "utf8" }));
}
