#!/usr/bin/env python3
"""Checks grammar/stoik.ebnf against the example files, with no parser of our
own in between: it reads the W3C EBNF text, interprets it directly, and
asserts that every grammar/examples/**/*.stoik file is a `file`, that every
rule used is defined and every rule defined is used, and that a list of
short texts gets the verdict written beside each.

    python3 grammar/check_grammar.py          # exit 0 when all checks pass

Only the Python standard library is needed.  The interpreter follows every
alternative (it computes the set of end positions of each rule at each
offset), so it accepts exactly the strings the grammar describes, without
the longest-match reading convention the parser adds on top.
"""
from __future__ import annotations

import pathlib
import re
import sys
from functools import lru_cache

HERE = pathlib.Path(__file__).resolve().parent
GRAMMAR = HERE / "stoik.ebnf"
EXAMPLES = HERE / "examples"

# Short texts with the verdict the grammar must give: (text, parses, why).
CASES = [
    ("reaction: N2O4(g)->2 NO2(g)\n", False, "arrow without surrounding whitespace"),
    ("reaction: Na+ +Cl- <=> NaCl(s)\n", False, "'+' join without whitespace after it"),
    ("Reaction: A <=> B\n", False, "keyword not lowercase"),
    ("reactions: A <=> B\n", False, "unknown keyword"),
    ("  K = 3.2\n", False, "continuation line before any statement"),
    ("species CO = H2O\n", False, "CO reads as a formula, so it is no alias"),
    ("species e- = C2H5OH(l)\n", False, "e- is reserved"),
    ("reaction: A <=> B ; K = 3.2 at\n", False, "'at' without a temperature"),
    ("reaction: A <=> B\n  K = 3.2 K at 298.15 K extra\n", False, "trailing word after a value"),
    ("reaction: A <=> B\n  K = 1.0e5 at 298.15K\n", False, "unit glued to the number"),
    ("reaction: H2O(gas) <=> H2O(l)\n", False, "unknown phase tag"),
    ("reaction: CuSO4 · 5H2O <=> CuSO4\n", False, "spaces around the adduct dot"),
    ("reaction: A <=> \n", False, "empty side"),
    ('reaction: A <=> B ; source = "unterminated\n', False, "unterminated string"),
    ("reaction 2fast: A <=> B\n", False, "label must start with a letter"),
    ("units energy = kJ/mol temperature = K\n", False, "unit defaults need a comma"),
    ("mixture feed\n  N2(g) = \n", False, "entry without a value"),
    ("reaction: A <=> B ; kf = arrhenius(A = 1, B = 2)\n", False, "unknown arrhenius argument"),
    ("mixture m\n  temperature(g) = 1 mol/L\n", False, "temperature is no species"),
    ("# stoik: allow\nreaction: A <=> B\n", True, "a malformed suppression is a plain comment"),
    ("reaction: H2O(G) <=> H2O(l)\n", True, "(G) is a group; G is then an unknown element"),
    ("species Glucose = C6H12O6(aq)\n", True, "Glucose does not read as a formula"),
    ("reaction: 2ethanol <=> B\n", True, "glued coefficient before an alias"),
    ("reaction: A <=> B\r\n  K = 2\r\n", True, "CRLF line breaks"),
    ("reaction: A <=> B\n\tK = 2", True, "tab indentation, no final line break"),
    ("\ufeffreaction: A <=> B\n", True, "byte order mark"),
    ("reaction: A <=> B\n\n# note\n  K = 2\n", True, "blank and comment lines inside a statement"),
    ("reaction: 2 Fe3+ + 2e- <=> 2 Fe^2+\n", True, "2e- is two electrons"),
    ("reaction: H + O2 + M <=> HO2 + M\n", True, "third body"),
    ("reaction: A <=> B ; k = 1 J/mol/K\n", True, "chained division"),
]

# ---------------------------------------------------------------------------
# Reading the EBNF text.

TOKEN = re.compile(
    r"""
    (?P<ws>\s+)
  | (?P<comment>/\*.*?\*/)
  | (?P<define>::=)
  | (?P<name>[A-Za-z][A-Za-z0-9-]*)
  | (?P<literal>'[^']*'|"[^"]*")
  | (?P<hex>\#x[0-9A-Fa-f]+)
  | (?P<cls>\[\^?(?:[^\]]|\#x[0-9A-Fa-f]+)+\])
  | (?P<op>[()|?*+\-])
    """,
    re.VERBOSE | re.DOTALL,
)


def tokenize(text: str) -> list[tuple[str, str]]:
    tokens, pos = [], 0
    while pos < len(text):
        m = TOKEN.match(text, pos)
        if not m:
            line = text.count("\n", 0, pos) + 1
            raise SystemExit(f"stoik.ebnf:{line}: cannot read {text[pos:pos + 20]!r}")
        if m.lastgroup not in ("ws", "comment"):
            tokens.append((m.lastgroup, m.group()))
        pos = m.end()
    return tokens


def parse_class(body: str):
    """Returns (negated, [(lo, hi)]) for a W3C character class."""
    negated = body.startswith("^")
    if negated:
        body = body[1:]
    items, i = [], 0

    def one(j):
        m = re.match(r"#x([0-9A-Fa-f]+)", body[j:])
        if m:
            return int(m.group(1), 16), j + m.end()
        return ord(body[j]), j + 1

    while i < len(body):
        lo, i = one(i)
        hi = lo
        if i + 1 < len(body) and body[i] == "-":
            hi, i = one(i + 1)
        items.append((lo, hi))
    return negated, items


class Reader:
    """Recursive descent over the token list: alternation, sequence,
    difference, postfix operators, atoms."""

    def __init__(self, tokens):
        self.t, self.i = tokens, 0

    def peek(self, k=0):
        j = self.i + k
        return self.t[j] if j < len(self.t) else (None, None)

    def take(self):
        tok = self.t[self.i]
        self.i += 1
        return tok

    def rules(self):
        out = {}
        while self.i < len(self.t):
            kind, name = self.take()
            if kind != "name" or self.take()[0] != "define":
                raise SystemExit(f"expected 'name ::=' near {name!r}")
            if name in out:
                raise SystemExit(f"rule {name} defined twice")
            out[name] = self.alternation()
        return out

    def at_rule_start(self):
        return self.peek()[0] == "name" and self.peek(1)[0] == "define"

    def alternation(self):
        alts = [self.sequence()]
        while self.peek() == ("op", "|"):
            self.take()
            alts.append(self.sequence())
        return alts[0] if len(alts) == 1 else ("alt", alts)

    def sequence(self):
        items = []
        while True:
            kind, value = self.peek()
            if kind is None or self.at_rule_start() or (kind == "op" and value in "|)"):
                break
            items.append(self.difference())
        return items[0] if len(items) == 1 else ("seq", items)

    def difference(self):
        left = self.postfix()
        if self.peek() == ("op", "-"):
            self.take()
            return ("diff", left, self.postfix())
        return left

    def postfix(self):
        node = self.atom()
        while self.peek()[0] == "op" and self.peek()[1] in "?*+":
            node = (self.take()[1], node)
        return node

    def atom(self):
        kind, value = self.take()
        if kind == "name":
            return ("ref", value)
        if kind == "literal":
            return ("lit", value[1:-1])
        if kind == "hex":
            return ("lit", chr(int(value[2:], 16)))
        if kind == "cls":
            return ("cls",) + parse_class(value[1:-1])
        if (kind, value) == ("op", "("):
            node = self.alternation()
            if self.take() != ("op", ")"):
                raise SystemExit("unbalanced parentheses in stoik.ebnf")
            return node
        raise SystemExit(f"unexpected {value!r} in stoik.ebnf")


def references(node, found):
    tag = node[0]
    if tag == "ref":
        found.add(node[1])
    elif tag in ("alt", "seq"):
        for child in node[1]:
            references(child, found)
    elif tag == "diff":
        references(node[1], found)
        references(node[2], found)
    elif tag in ("?", "*", "+"):
        references(node[1], found)


# ---------------------------------------------------------------------------
# Matching: the set of end offsets of a rule from a start offset.

class Matcher:
    def __init__(self, rules, text):
        self.rules, self.text = rules, text
        self.furthest = 0
        self.ends_of_rule = lru_cache(maxsize=None)(self._ends_of_rule)

    def _ends_of_rule(self, name, pos):
        return self.ends(self.rules[name], pos)

    def ends(self, node, pos) -> frozenset:
        tag = node[0]
        if tag == "ref":
            return self.ends_of_rule(node[1], pos)
        if tag == "lit":
            s = node[1]
            if self.text.startswith(s, pos):
                self.furthest = max(self.furthest, pos + len(s))
                return frozenset([pos + len(s)])
            return frozenset()
        if tag == "cls":
            _, negated, ranges = node
            if pos < len(self.text):
                c = ord(self.text[pos])
                if any(lo <= c <= hi for lo, hi in ranges) != negated:
                    self.furthest = max(self.furthest, pos + 1)
                    return frozenset([pos + 1])
            return frozenset()
        if tag == "alt":
            out = set()
            for child in node[1]:
                out |= self.ends(child, pos)
            return frozenset(out)
        if tag == "seq":
            current = {pos}
            for child in node[1]:
                current = {e for p in current for e in self.ends(child, p)}
                if not current:
                    break
            return frozenset(current)
        if tag == "diff":
            return self.ends(node[1], pos) - self.ends(node[2], pos)
        if tag == "?":
            return self.ends(node[1], pos) | {pos}
        if tag in ("*", "+"):
            seen, frontier = set(), {pos}
            while frontier:
                step = {e for p in frontier for e in self.ends(node[1], p)} - seen
                seen |= step
                frontier = step
            return frozenset(seen | ({pos} if tag == "*" else set()))
        raise AssertionError(tag)


def parses(rules, text: str):
    """Returns None when `text` is a `file`, else the furthest offset reached."""
    if not text.endswith("\n"):
        text += "\n"  # A last line without a line break reads as if it had one.
    matcher = Matcher(rules, text)
    if len(text) in matcher.ends_of_rule("file", 0):
        return None
    return matcher.furthest


def location(text, offset):
    line = text.count("\n", 0, offset) + 1
    column = offset - (text.rfind("\n", 0, offset) + 1) + 1
    return f"{line}:{column}"


def main() -> int:
    sys.setrecursionlimit(20000)
    rules = Reader(tokenize(GRAMMAR.read_text(encoding="utf-8"))).rules()
    failures = 0

    used = set()
    for node in rules.values():
        references(node, used)
    for name in sorted(used - rules.keys()):
        print(f"✖ rule {name} is used but not defined")
        failures += 1
    for name in sorted(rules.keys() - used - {"file"}):
        print(f"✖ rule {name} is defined but never used")
        failures += 1

    examples = sorted(EXAMPLES.rglob("*.stoik"))
    if not examples:
        print(f"✖ no examples under {EXAMPLES}")
        failures += 1
    for path in examples:
        text = path.read_text(encoding="utf-8")
        stop = parses(rules, text)
        name = path.relative_to(EXAMPLES)
        if stop is None:
            print(f"✓ {name}")
        else:
            print(f"✖ {name}: does not parse; furthest reach {location(text, stop)}")
            failures += 1

    for text, expected, why in CASES:
        accepted = parses(rules, text) is None
        verdict = "parses" if accepted else "is rejected"
        mark = "✓" if accepted == expected else "✖"
        failures += accepted != expected
        print(f"{mark} {text!r} {verdict} ({why})")

    print(f"{len(rules)} rules, {len(examples)} example files, {failures} failures")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
