#!/usr/bin/env python3
"""Validate the Harbor Street example data (registry.yaml, probes.csv, probes-holdout.csv).

Standard library only. Usage:

    python3 check_examples.py [--dir DIR] [--scenario PATH/TO/scenario.md] [--self-test]

Exit codes: 0 all checks passed, 1 a check failed, 2 bad usage or unreadable input.
Every problem is printed as ``file:line:col: message`` (line/column 0 when there is no position).

What is checked (the rules the example data was written to):
  * registry: version 1, model id, default thresholds, the twelve task ids with their titles,
    controller manifolds, latent_dims and confirm flags exactly as in the scenario table;
    8-12 approved phrases per task, 2-4 must_reject look-alikes per task; no duplicate phrase
    (case/punctuation-insensitive) inside or across tasks, no must_reject equal to a phrase;
    no negation word in an approved phrase; every approved phrase names its task's object and
    no other task's object; phrases are plain strings (no YAML value that would load as a
    boolean/number/null); no unknown keys.
  * probe suites: UTF-8, RFC 4180 quoting, header ``utterance,expect,kind,note``, four fields
    per row, every expect a task id or ``reject``, every kind known and consistent with expect,
    a note on every row; no utterance equal to an approved or must_reject phrase; no duplicates
    within or across the two suites; negated probes carry a negation cue; paraphrases are not
    one-word edits of an approved phrase; the per-kind minimum counts.

Normalisation mirrors TaskPhrase's TextNormalizer (src/TaskPhrase/Text/TextNormalizer.cs):
NFKC, control/format characters dropped, white space collapsed, lower case, leading and trailing
punctuation and symbols stripped (the "match key"). Comparisons use a looser key on top of it
(apostrophes dropped, inner punctuation read as a space), so "i'd like" and "id like" collide.
"""

from __future__ import annotations

import argparse
import os
import re
import sys
import tempfile
import unicodedata

# --------------------------------------------------------------------------------------------
# The scenario table (copied from the project's design/scenario.md, "Demo scenario: the Harbor
# Street flat"). With --scenario PATH the script also parses that file and checks this copy
# against it, so a change to the scenario cannot silently drift from the example data.
# id -> (task text, manifold, latent_dims, confirm)
# --------------------------------------------------------------------------------------------
SCENARIO = {
    "hall-light": ("press the hall light switch", "reach-press.v1", 1, False),
    "keys-hook": ("hang the keys on the hook by the door", "hang-hook.v2", 2, False),
    "mail-pickup": ("pick the letters up off the door mat", "floor-pick.v3", 2, False),
    "water-basil": ("water the basil on the kitchen windowsill", "pour-arc.v2", 2, False),
    "page-turn": ("turn the page of the book on the reading stand", "page-flip.v1", 1, False),
    "phone-fetch": ("bring the phone from the charger", "fetch-carry.v4", 2, False),
    "pill-organizer": ("open today's compartment of the pill organizer", "lid-open.v1", 1, True),
    "kettle-pour": ("pour hot water from the kettle into the teapot", "pour-arc.v2", 2, True),
    "window-latch": ("open or close the window latch", "latch-turn.v1", 1, False),
    "remote-fetch": ("hand over the TV remote", "fetch-carry.v4", 2, False),
    "blanket": ("pull the blanket over her knees", "drape-pull.v1", 2, True),
    "fish-food": ("sprinkle food into the goldfish tank", "shake-over.v1", 1, False),
}

# Words that name each task's object. Every approved phrase must contain one of its own task's
# words and none of another task's, so tasks that share a motion stay apart (the data brief).
OBJECT_WORDS = {
    "hall-light": {"light", "lights"},
    "keys-hook": {"key", "keys"},
    "mail-pickup": {"letters", "mail", "post", "envelopes"},
    "water-basil": {"basil", "plant", "herbs"},
    "page-turn": {"page"},
    "phone-fetch": {"phone", "mobile"},
    "pill-organizer": {"pill", "pills", "tablets", "medication"},
    "kettle-pour": {"kettle", "teapot"},
    "window-latch": {"window", "latch"},
    "remote-fetch": {"remote", "clicker"},
    "blanket": {"blanket", "rug"},
    "fish-food": {"fish", "goldfish", "tank", "aquarium"},
}

EXPECTED_MODEL = "all-minilm-l6-v2"
EXPECTED_DEFAULTS = {"accept": 0.60, "margin": 0.04}
PHRASES_MIN, PHRASES_MAX = 8, 12
MUST_REJECT_MIN, MUST_REJECT_MAX = 2, 4
HEADER = ["utterance", "expect", "kind", "note"]
REJECT = "reject"

IN_SCOPE_KINDS = {"paraphrase", "asr-slip", "harmless-extra"}
REJECT_KINDS = {"negated", "look-alike", "out-of-domain", "nonsense", "ambiguous"}

# Minimum rows per kind (and in total) for each suite. probes.csv numbers are from the data brief;
# the holdout suite is smaller and has proportionally smaller floors.
MINIMUMS = {
    "probes.csv": {
        "total": 200, "paraphrase": 60, "asr-slip": 25, "harmless-extra": 15, "negated": 20,
        "look-alike": 20, "out-of-domain": 30, "nonsense": 20, "ambiguous": 3,
    },
    "probes-holdout.csv": {
        "total": 80, "paraphrase": 24, "asr-slip": 10, "harmless-extra": 6, "negated": 8,
        "look-alike": 8, "out-of-domain": 12, "nonsense": 8, "ambiguous": 2,
    },
}
PARAPHRASES_PER_TASK = {"probes.csv": 4, "probes-holdout.csv": 2}

# Negation cues. The decision procedure names "don't", "do not", "never", "no longer"; the rest are
# the usual English negators (common practice), including contractions typed without apostrophe.
NEGATION_WORDS = {
    "not", "no", "never", "none", "nothing", "nobody", "nowhere", "neither", "nor", "cannot",
    "without", "dont", "doesnt", "didnt", "wont", "cant", "isnt", "arent", "wasnt", "werent",
    "shouldnt", "wouldnt", "couldnt", "mustnt", "neednt", "havent", "hasnt", "hadnt", "aint",
}

REGISTRY_KEYS = {"version", "model", "defaults", "tasks"}
DEFAULTS_KEYS = {"accept", "margin"}
TASK_KEYS = {"id", "title", "confirm", "accept", "margin", "controller", "phrases", "must_reject", "also_words"}
CONTROLLER_KEYS = {"manifold", "latent_dims", "decoder"}
KEBAB = re.compile(r"^[a-z0-9]+(?:-[a-z0-9]+)*$")


# --------------------------------------------------------------------------------------------
# Problems
# --------------------------------------------------------------------------------------------
class Problems:
    """Collects problems as 'file:line:col: message' lines."""

    def __init__(self) -> None:
        self.items: list[str] = []

    def add(self, file: str, line: int, col: int, message: str) -> None:
        self.items.append(f"{file}:{line}:{col}: {message}")

    def __len__(self) -> int:
        return len(self.items)


class InputError(Exception):
    """Unreadable input (exit code 2)."""


# --------------------------------------------------------------------------------------------
# Normalisation (mirrors src/TaskPhrase/Text/TextNormalizer.cs)
# --------------------------------------------------------------------------------------------
_DROP_CATEGORIES = {"Cc", "Cf", "Co", "Cn", "Cs"}


def normalize(text: str) -> str:
    """NFKC, drop control/format/private/unassigned characters, collapse white space, trim."""
    result = text
    for _ in range(5):  # repeat until stable, as the C# normaliser does
        nfkc = unicodedata.normalize("NFKC", result)
        out: list[str] = []
        pending_space = False
        for ch in nfkc:
            cat = unicodedata.category(ch)
            if ch.isspace() or cat in ("Zs", "Zl", "Zp"):
                pending_space = bool(out)
                continue
            if cat in _DROP_CATEGORIES or ch == "\ufffd":
                continue
            if pending_space:
                out.append(" ")
                pending_space = False
            out.append(ch)
        again = "".join(out)
        if again == result:
            break
        result = again
    return result


def _is_edge(ch: str) -> bool:
    # C# char.IsPunctuation / char.IsSymbol look at UTF-16 code units, so characters outside the
    # BMP (most emoji) are surrogates there and are not stripped; mirror that.
    if ch == " ":
        return True
    if ord(ch) > 0xFFFF:
        return False
    return unicodedata.category(ch)[0] in ("P", "S")


def match_key(text: str) -> str:
    """The exact-match key: normalised, lower case, edge punctuation and symbols removed."""
    n = normalize(text).lower()
    start, end = 0, len(n)
    while start < end and _is_edge(n[start]):
        start += 1
    while end > start and _is_edge(n[end - 1]):
        end -= 1
    return n[start:end]


_APOSTROPHES = {"'", "\u2019", "\u2018", "`"}


def loose_key(text: str) -> str:
    """Case- and punctuation-insensitive key: the match key, apostrophes dropped, other
    punctuation read as a space, white space collapsed. Equal match keys give equal loose keys."""
    out: list[str] = []
    for ch in match_key(text):
        if ch in _APOSTROPHES:
            continue
        out.append(" " if unicodedata.category(ch)[0] == "P" else ch)
    return " ".join("".join(out).split())


def words(text: str) -> list[str]:
    """Lower-case words of a text (apostrophes dropped, so "don't" -> "dont")."""
    return re.findall(r"[^\W_]+", "".join(c for c in normalize(text).lower() if c not in _APOSTROPHES))


def word_tokens_keep_apostrophe(text: str) -> list[str]:
    """Words split on apostrophes too ("kettle's" -> "kettle", "s"), for object-word checks."""
    return re.findall(r"[^\W_]+", normalize(text).lower())


def negation_cues(text: str) -> list[str]:
    """Negation words found in a text (see NEGATION_WORDS; also any word ending in n't)."""
    found = [w for w in words(text) if w in NEGATION_WORDS]
    raw = normalize(text).lower()
    found += re.findall(r"\b\w+n['\u2019]t\b", raw)
    return found


# --------------------------------------------------------------------------------------------
# A strict reader for the YAML subset the registry uses
# (block mappings, block sequences, flow mappings/sequences of scalars, plain and quoted scalars,
# comments). Anything outside the subset is reported, not guessed. The registry itself is read by
# TaskPhrase with a full YAML parser; this reader only has to agree on the subset.
# --------------------------------------------------------------------------------------------
class YamlError(Exception):
    def __init__(self, line: int, col: int, message: str) -> None:
        super().__init__(message)
        self.line, self.col, self.message = line, col, message


class Scalar:
    """A scalar with its position and whether it was quoted."""

    def __init__(self, value: object, line: int, col: int, quoted: bool, raw: str) -> None:
        self.value, self.line, self.col, self.quoted, self.raw = value, line, col, quoted, raw


class Node:
    """A mapping (dict of key -> (key Scalar, value)) or sequence (list) with its position."""

    def __init__(self, kind: str, line: int, col: int) -> None:
        self.kind, self.line, self.col = kind, line, col
        self.map: dict[str, tuple[Scalar, object]] = {}
        self.seq: list[object] = []


_YAML11_NON_STRINGS = {"yes", "no", "on", "off", "y", "n", "true", "false", "null", "~"}
_INT = re.compile(r"^[-+]?(0|[1-9][0-9]*)$")
_FLOAT = re.compile(r"^[-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)?$")


def _resolve_plain(raw: str, line: int, col: int) -> Scalar:
    if raw == "" or raw in ("null", "Null", "NULL", "~"):
        return Scalar(None, line, col, False, raw)
    if raw in ("true", "True", "TRUE"):
        return Scalar(True, line, col, False, raw)
    if raw in ("false", "False", "FALSE"):
        return Scalar(False, line, col, False, raw)
    if _INT.match(raw):
        return Scalar(int(raw), line, col, False, raw)
    if _FLOAT.match(raw):
        return Scalar(float(raw), line, col, False, raw)
    if raw[0] in "[]{},#&*!|>%@`\"'" or raw.startswith(("- ", "? ", ": ")) or raw in ("-", "?", ":"):
        raise YamlError(line, col, f"plain scalar {raw!r} starts with a YAML indicator; quote it")
    if ": " in raw or raw.endswith(":"):
        raise YamlError(line, col, f"plain scalar {raw!r} contains ': '; quote it")
    return Scalar(raw, line, col, False, raw)


def _scan_quoted(text: str, pos: int, line: int) -> tuple[str, int]:
    """Reads a quoted scalar starting at text[pos]; returns (value, index after closing quote)."""
    quote = text[pos]
    i = pos + 1
    out: list[str] = []
    while i < len(text):
        ch = text[i]
        if quote == "'" and ch == "'":
            if i + 1 < len(text) and text[i + 1] == "'":
                out.append("'")
                i += 2
                continue
            return "".join(out), i + 1
        if quote == '"' and ch == "\\":
            if i + 1 >= len(text):
                break
            esc = text[i + 1]
            simple = {"\\": "\\", '"': '"', "n": "\n", "t": "\t", "/": "/", "0": "\0", " ": " "}
            if esc in simple:
                out.append(simple[esc])
                i += 2
                continue
            if esc in "xuU":
                width = {"x": 2, "u": 4, "U": 8}[esc]
                digits = text[i + 2:i + 2 + width]
                if len(digits) != width or not re.fullmatch(r"[0-9a-fA-F]+", digits):
                    raise YamlError(line, i + 1, f"bad \\{esc} escape in double-quoted scalar")
                out.append(chr(int(digits, 16)))
                i += 2 + width
                continue
            raise YamlError(line, i + 1, f"unsupported escape \\{esc} in double-quoted scalar")
        if quote == '"' and ch == '"':
            return "".join(out), i + 1
        out.append(ch)
        i += 1
    raise YamlError(line, pos + 1, "quoted scalar is not closed on its line (multi-line scalars are not used here)")


def _strip_comment(text: str) -> str:
    """Removes a trailing comment (a '#' at the start or after white space, outside quotes)."""
    i = 0
    quote = None
    while i < len(text):
        ch = text[i]
        if quote:
            if quote == '"' and ch == "\\":
                i += 2
                continue
            if ch == quote:
                if quote == "'" and i + 1 < len(text) and text[i + 1] == "'":
                    i += 2
                    continue
                quote = None
        elif ch in "'\"" and (i == 0 or text[i - 1] in " \t[{,:-"):
            quote = ch
        elif ch == "#" and (i == 0 or text[i - 1] in " \t"):
            return text[:i].rstrip()
        i += 1
    return text.rstrip()


def _parse_flow(text: str, line: int, col: int) -> object:
    """Parses a one-line flow mapping {a: b, ...} or flow sequence [a, b, ...] of scalars."""
    opener = text[0]
    closer = "}" if opener == "{" else "]"
    node = Node("map" if opener == "{" else "seq", line, col)
    i = 1
    items: list[tuple[str, int, bool, str]] = []  # (text, column, quoted, "item" or "colon")
    expect_item = True
    while i < len(text):
        ch = text[i]
        if ch in " \t":
            i += 1
            continue
        if ch == closer:
            rest = text[i + 1:].strip()
            if rest:
                raise YamlError(line, col + i + 1, f"unexpected text after flow collection: {rest!r}")
            break
        if ch == ",":
            if expect_item:
                raise YamlError(line, col + i, "empty entry in flow collection")
            expect_item = True
            i += 1
            continue
        if not expect_item:
            raise YamlError(line, col + i, "missing ',' between flow entries")
        if ch in "[{":
            raise YamlError(line, col + i, "nested flow collections are not used in this registry")
        start = i
        if ch in "'\"":
            value, i = _scan_quoted(text, i, line)
            items.append((value, col + start, True, "item"))
        else:
            j = i
            while j < len(text) and text[j] not in ",]}" and not (text[j] == ":" and j + 1 < len(text) and text[j + 1] in " \t"):
                j += 1
            items.append((text[i:j].strip(), col + start, False, "item"))
            i = j
        # mapping key separator
        k = i
        while k < len(text) and text[k] in " \t":
            k += 1
        if k < len(text) and text[k] == ":":
            items.append((":", col + k, False, "colon"))
            i = k + 1
            continue
        expect_item = False
    else:
        raise YamlError(line, col, f"flow collection is not closed with '{closer}' on its line")

    if node.kind == "seq":
        for value, c, quoted, kind in items:
            if kind == "colon":
                raise YamlError(line, c, "':' inside a flow sequence")
            node.seq.append(Scalar(value, line, c, True, value) if quoted else _resolve_plain(value, line, c))
        return node
    # mapping: expect item colon item triples
    idx = 0
    while idx < len(items):
        key, kc, kq, _ = items[idx]
        if idx + 1 >= len(items) or items[idx + 1][3] != "colon":
            raise YamlError(line, kc, "flow mapping entry needs 'key: value'")
        if idx + 2 >= len(items) or items[idx + 2][3] == "colon":
            raise YamlError(line, kc, f"flow mapping key {key!r} has no value")
        value, vc, vq, _ = items[idx + 2]
        if key in node.map:
            raise YamlError(line, kc, f"duplicate key {key!r}")
        node.map[key] = (Scalar(key, line, kc, kq, key), Scalar(value, line, vc, True, value) if vq else _resolve_plain(value, line, vc))
        idx += 3
    return node


def _parse_value_text(text: str, line: int, col: int) -> object:
    if text.startswith(("{", "[")):
        return _parse_flow(text, line, col)
    if text.startswith(("'", '"')):
        value, end = _scan_quoted(text, 0, line)
        if text[end:].strip():
            raise YamlError(line, col + end, f"unexpected text after quoted scalar: {text[end:].strip()!r}")
        return Scalar(value, line, col, True, text)
    if text.startswith(("|", ">")):
        raise YamlError(line, col, "block scalars (| or >) are not used in this registry")
    return _resolve_plain(text, line, col)


def _split_key(text: str) -> tuple[str, str, int] | None:
    """Splits 'key: value' / 'key:' into (key, value, value offset); None when not a mapping entry."""
    if text.startswith(("'", '"', "{", "[")):
        return None
    m = re.match(r"^([^\s:#][^:#]*?)\s*:(?:\s+|$)", text)
    if not m:
        return None
    return m.group(1), text[m.end():], m.end()


class _Lines:
    def __init__(self, source: str) -> None:
        self.lines: list[list] = []  # [lineno, indent, text]
        for number, raw in enumerate(source.split("\n"), start=1):
            raw = raw.rstrip("\r")
            if "\t" in raw[: len(raw) - len(raw.lstrip())]:
                raise YamlError(number, 1, "tab in indentation; YAML indents with spaces")
            stripped = _strip_comment(raw)
            if not stripped.strip():
                continue
            if stripped.strip() in ("---", "..."):
                raise YamlError(number, 1, "document markers are not used in this registry")
            indent = len(stripped) - len(stripped.lstrip(" "))
            self.lines.append([number, indent, stripped.strip()])


def _parse_block(lines: _Lines, i: int, indent: int) -> tuple[object, int]:
    number, ind, text = lines.lines[i]
    if ind != indent:
        raise YamlError(number, ind + 1, f"unexpected indentation (expected column {indent + 1})")
    if text == "-" or text.startswith("- "):
        return _parse_seq(lines, i, indent)
    return _parse_map(lines, i, indent)


def _parse_seq(lines: _Lines, i: int, indent: int) -> tuple[object, int]:
    number, _, _ = lines.lines[i]
    node = Node("seq", number, indent + 1)
    while i < len(lines.lines):
        number, ind, text = lines.lines[i]
        if ind < indent:
            break
        if ind > indent:
            raise YamlError(number, ind + 1, "unexpected indentation inside a sequence")
        if not (text == "-" or text.startswith("- ")):
            break
        rest = text[1:].lstrip(" ")
        item_col = ind + (len(text) - len(rest))
        if not rest:
            if i + 1 < len(lines.lines) and lines.lines[i + 1][1] > indent:
                value, i = _parse_block(lines, i + 1, lines.lines[i + 1][1])
                node.seq.append(value)
                continue
            node.seq.append(Scalar(None, number, item_col + 1, False, ""))
            i += 1
            continue
        if _split_key(rest) is not None:
            lines.lines[i] = [number, item_col, rest]
            value, i = _parse_map(lines, i, item_col)
            node.seq.append(value)
            continue
        node.seq.append(_parse_value_text(rest, number, item_col + 1))
        i += 1
    return node, i


def _parse_map(lines: _Lines, i: int, indent: int) -> tuple[object, int]:
    number, _, _ = lines.lines[i]
    node = Node("map", number, indent + 1)
    while i < len(lines.lines):
        number, ind, text = lines.lines[i]
        if ind < indent:
            break
        if ind > indent:
            raise YamlError(number, ind + 1, "unexpected indentation inside a mapping")
        if text == "-" or text.startswith("- "):
            break
        split = _split_key(text)
        if split is None:
            raise YamlError(number, ind + 1, f"expected 'key: value', found {text!r}")
        key, value_text, offset = split
        key_scalar = Scalar(key, number, ind + 1, False, key)
        if key in node.map:
            raise YamlError(number, ind + 1, f"duplicate key {key!r}")
        if value_text:
            node.map[key] = (key_scalar, _parse_value_text(value_text, number, ind + offset + 1))
            i += 1
            continue
        i += 1
        if i < len(lines.lines) and (lines.lines[i][1] > indent or (lines.lines[i][1] == indent and lines.lines[i][2].startswith("- "))):
            value, i = _parse_block(lines, i, lines.lines[i][1])
            node.map[key] = (key_scalar, value)
        else:
            node.map[key] = (key_scalar, Scalar(None, number, ind + offset + 1, False, ""))
    return node, i


def parse_yaml_subset(source: str) -> Node:
    """Parses the registry's YAML subset; raises YamlError with line and column."""
    lines = _Lines(source)
    if not lines.lines:
        raise YamlError(1, 1, "the file holds no YAML content")
    node, i = _parse_block(lines, 0, lines.lines[0][1])
    if i < len(lines.lines):
        number, ind, text = lines.lines[i]
        raise YamlError(number, ind + 1, f"unexpected content {text!r}")
    if not isinstance(node, Node) or node.kind != "map":
        raise YamlError(1, 1, "the registry must be a mapping at the top level")
    return node


# --------------------------------------------------------------------------------------------
# Registry checks
# --------------------------------------------------------------------------------------------
class Registry:
    def __init__(self) -> None:
        self.tasks: dict[str, dict] = {}  # id -> {"phrases": [(text, line, col)], "must_reject": [...]}


def _did_you_mean(key: str, allowed: set[str]) -> str:
    import difflib
    close = difflib.get_close_matches(key, sorted(allowed), n=1)
    return f" (did you mean '{close[0]}'?)" if close else ""


def _check_keys(node: Node, allowed: set[str], where: str, file: str, problems: Problems) -> None:
    for key, (ks, _) in node.map.items():
        if key not in allowed:
            problems.add(file, ks.line, ks.col, f"unknown key '{key}' in {where}{_did_you_mean(key, allowed)}; allowed: {', '.join(sorted(allowed))}")


def _scalar(value: object) -> Scalar | None:
    return value if isinstance(value, Scalar) else None


def _string_list(value: object, what: str, file: str, problems: Problems, line: int, col: int) -> list[Scalar]:
    if not isinstance(value, Node) or value.kind != "seq":
        problems.add(file, line, col, f"{what} must be a list of strings")
        return []
    out = []
    for item in value.seq:
        s = _scalar(item)
        if s is None or not isinstance(s.value, str):
            pos = (s.line, s.col) if s else (getattr(item, "line", line), getattr(item, "col", col))
            raw = s.raw if s else "a nested collection"
            problems.add(file, pos[0], pos[1], f"{what} entry {raw!r} is not a string; quote it")
            continue
        if not s.quoted and s.value.lower() in _YAML11_NON_STRINGS:
            problems.add(file, s.line, s.col, f"{what} entry {s.value!r} reads as a boolean or null in some YAML parsers; quote it")
        out.append(s)
    return out


def check_registry(path: str, problems: Problems) -> Registry:
    file = os.path.basename(path)
    try:
        with open(path, "rb") as fh:
            data = fh.read()
    except OSError as exc:
        raise InputError(f"{path}: cannot read the registry: {exc.strerror}") from exc
    try:
        source = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise InputError(f"{path}: not UTF-8 (byte {exc.start}); save the file as UTF-8") from exc
    if source.startswith("\ufeff"):
        source = source[1:]
    registry = Registry()
    try:
        root = parse_yaml_subset(source)
    except YamlError as exc:
        problems.add(file, exc.line, exc.col, exc.message)
        return registry

    _check_keys(root, REGISTRY_KEYS, "the registry", file, problems)
    version = _scalar(root.map.get("version", (None, None))[1])
    if version is None or version.value != 1:
        problems.add(file, version.line if version else 1, version.col if version else 1, "version must be 1")
    model = _scalar(root.map.get("model", (None, None))[1])
    if model is None or model.value != EXPECTED_MODEL:
        problems.add(file, model.line if model else 1, model.col if model else 1, f"model must be '{EXPECTED_MODEL}'")
    defaults = root.map.get("defaults", (None, None))[1]
    if not isinstance(defaults, Node) or defaults.kind != "map":
        problems.add(file, 1, 1, f"defaults must be a mapping {EXPECTED_DEFAULTS}")
    else:
        _check_keys(defaults, DEFAULTS_KEYS, "defaults", file, problems)
        for key, expected in EXPECTED_DEFAULTS.items():
            s = _scalar(defaults.map.get(key, (None, None))[1])
            if s is None or not isinstance(s.value, (int, float)) or isinstance(s.value, bool) or abs(float(s.value) - expected) > 1e-12:
                problems.add(file, s.line if s else defaults.line, s.col if s else defaults.col, f"defaults.{key} must be {expected} (the design default; do not tune in the example)")

    tasks = root.map.get("tasks", (None, None))[1]
    if not isinstance(tasks, Node) or tasks.kind != "seq":
        problems.add(file, 1, 1, "tasks must be a list of task mappings")
        return registry

    seen_phrase: dict[str, tuple[str, int]] = {}  # loose key -> (task id, line)
    for task in tasks.seq:
        if not isinstance(task, Node) or task.kind != "map":
            problems.add(file, getattr(task, "line", 0), getattr(task, "col", 0), "each task must be a mapping")
            continue
        _check_keys(task, TASK_KEYS, "a task", file, problems)
        id_s = _scalar(task.map.get("id", (None, None))[1])
        if id_s is None or not isinstance(id_s.value, str):
            problems.add(file, task.line, task.col, "task has no id")
            continue
        tid = id_s.value
        if not KEBAB.match(tid):
            problems.add(file, id_s.line, id_s.col, f"task id '{tid}' is not kebab-case")
        if tid in registry.tasks:
            problems.add(file, id_s.line, id_s.col, f"task id '{tid}' appears twice")
            continue
        if tid not in SCENARIO:
            problems.add(file, id_s.line, id_s.col, f"task id '{tid}' is not in the scenario table{_did_you_mean(tid, set(SCENARIO))}")
            continue
        text, manifold, dims, confirm = SCENARIO[tid]
        entry = {"phrases": [], "must_reject": [], "line": id_s.line}
        registry.tasks[tid] = entry

        title = _scalar(task.map.get("title", (None, None))[1])
        expected_title = text[0].upper() + text[1:]
        if title is None or title.value != expected_title:
            problems.add(file, title.line if title else id_s.line, title.col if title else id_s.col, f"{tid}: title must be '{expected_title}' (the scenario table's task)")
        conf = _scalar(task.map.get("confirm", (None, None))[1])
        if conf is None or conf.value is not confirm:
            problems.add(file, conf.line if conf else id_s.line, conf.col if conf else id_s.col, f"{tid}: confirm must be {str(confirm).lower()} as in the scenario table")
        for key in ("accept", "margin"):
            if key in task.map:
                ks = task.map[key][0]
                problems.add(file, ks.line, ks.col, f"{tid}: per-task '{key}' override; the example keeps the design defaults untuned")
        ctrl = task.map.get("controller", (None, None))[1]
        if not isinstance(ctrl, Node) or ctrl.kind != "map":
            problems.add(file, id_s.line, id_s.col, f"{tid}: controller must be a mapping {{manifold, latent_dims}}")
        else:
            _check_keys(ctrl, CONTROLLER_KEYS, f"{tid}.controller", file, problems)
            m = _scalar(ctrl.map.get("manifold", (None, None))[1])
            if m is None or m.value != manifold:
                problems.add(file, m.line if m else ctrl.line, m.col if m else ctrl.col, f"{tid}: controller.manifold must be '{manifold}' as in the scenario table")
            d = _scalar(ctrl.map.get("latent_dims", (None, None))[1])
            if d is None or d.value != dims or isinstance(d.value, bool):
                problems.add(file, d.line if d else ctrl.line, d.col if d else ctrl.col, f"{tid}: controller.latent_dims must be {dims} as in the scenario table")

        pnode = task.map.get("phrases", (None, None))[1]
        phrases = _string_list(pnode, f"{tid}.phrases", file, problems, id_s.line, id_s.col)
        if not PHRASES_MIN <= len(phrases) <= PHRASES_MAX:
            problems.add(file, id_s.line, id_s.col, f"{tid}: has {len(phrases)} approved phrases; write {PHRASES_MIN}-{PHRASES_MAX}")
        for p in phrases:
            key = loose_key(p.value)
            if not key:
                problems.add(file, p.line, p.col, f"{tid}: phrase {p.value!r} is empty after normalisation")
                continue
            if key in seen_phrase:
                other, line = seen_phrase[key]
                problems.add(file, p.line, p.col, f"{tid}: phrase {p.value!r} duplicates a phrase of {other} (line {line}) after normalisation")
                continue
            seen_phrase[key] = (tid, p.line)
            neg = negation_cues(p.value)
            if neg:
                problems.add(file, p.line, p.col, f"{tid}: phrase {p.value!r} contains negation {neg}; approved phrases carry no negation")
            toks = set(word_tokens_keep_apostrophe(p.value))
            if not toks & OBJECT_WORDS[tid]:
                problems.add(file, p.line, p.col, f"{tid}: phrase {p.value!r} does not name the task's object (one of {sorted(OBJECT_WORDS[tid])})")
            for other, objs in OBJECT_WORDS.items():
                if other != tid and toks & objs:
                    problems.add(file, p.line, p.col, f"{tid}: phrase {p.value!r} names {sorted(toks & objs)}, an object of {other}; keep tasks apart")
            entry["phrases"].append((p.value, p.line, p.col))

        if "must_reject" in task.map:
            rnode = task.map["must_reject"][1]
            rejects = _string_list(rnode, f"{tid}.must_reject", file, problems, id_s.line, id_s.col)
        else:
            rejects = []
        if not MUST_REJECT_MIN <= len(rejects) <= MUST_REJECT_MAX:
            problems.add(file, id_s.line, id_s.col, f"{tid}: has {len(rejects)} must_reject look-alikes; write {MUST_REJECT_MIN}-{MUST_REJECT_MAX}")
        for r in rejects:
            entry["must_reject"].append((r.value, r.line, r.col))
        if "also_words" in task.map:
            for w in _string_list(task.map["also_words"][1], f"{tid}.also_words", file, problems, id_s.line, id_s.col):
                if len(w.value.split()) != 1:
                    problems.add(file, w.line, w.col, f"{tid}: also_words entry {w.value!r} must be a single word")
                if negation_cues(w.value):
                    problems.add(file, w.line, w.col, f"{tid}: also_words entry {w.value!r} is a negation word")

    # must_reject lines must not equal any approved phrase, nor repeat each other
    seen_reject: dict[str, tuple[str, int]] = {}
    for tid, entry in registry.tasks.items():
        for text, line, col in entry["must_reject"]:
            key = loose_key(text)
            if key in seen_phrase:
                other, pline = seen_phrase[key]
                problems.add(file, line, col, f"{tid}: must_reject {text!r} equals an approved phrase of {other} (line {pline})")
            if key in seen_reject:
                problems.add(file, line, col, f"{tid}: must_reject {text!r} repeats line {seen_reject[key][1]}")
            seen_reject[key] = (tid, line)

    for tid in SCENARIO:
        if tid not in registry.tasks:
            problems.add(file, tasks.line, tasks.col, f"task '{tid}' from the scenario table is missing")
    return registry


# --------------------------------------------------------------------------------------------
# RFC 4180 reader
# --------------------------------------------------------------------------------------------
def parse_rfc4180(text: str, file: str, problems: Problems) -> list[tuple[int, list[str]]]:
    """Parses CSV text strictly by RFC 4180 (fields separated by ',', a field containing ',', '"'
    or a line break must be quoted, '"' inside a quoted field doubled). Records end in CRLF as the
    RFC says or in LF (the repository's line ending; common practice). Returns (line, fields)."""
    records: list[tuple[int, list[str]]] = []
    i, n = 0, len(text)
    line = 1
    while i < n:
        start_line = line
        fields: list[str] = []
        while True:
            if i < n and text[i] == '"':
                col = i - (text.rfind("\n", 0, i) + 1) + 1
                i += 1
                buf: list[str] = []
                while True:
                    if i >= n:
                        problems.add(file, start_line, col, "quoted field is not closed")
                        return records
                    ch = text[i]
                    if ch == '"':
                        if i + 1 < n and text[i + 1] == '"':
                            buf.append('"')
                            i += 2
                            continue
                        i += 1
                        break
                    if ch == "\n":
                        line += 1
                    buf.append(ch)
                    i += 1
                fields.append("".join(buf))
                if i < n and text[i] not in ",\r\n":
                    col = i - (text.rfind("\n", 0, i) + 1) + 1
                    problems.add(file, line, col, "text after a closing quote; double the quote (\"\") inside a quoted field")
                    while i < n and text[i] not in ",\r\n":
                        i += 1
            else:
                j = i
                while j < n and text[j] not in ",\r\n":
                    if text[j] == '"':
                        col = j - (text.rfind("\n", 0, j) + 1) + 1
                        problems.add(file, line, col, "bare '\"' in an unquoted field; quote the field and double the quote")
                    j += 1
                fields.append(text[i:j])
                i = j
            if i < n and text[i] == ",":
                i += 1
                continue
            break
        if i < n and text[i] == "\r":
            if i + 1 < n and text[i + 1] == "\n":
                i += 1
            else:
                col = i - (text.rfind("\n", 0, i) + 1) + 1
                problems.add(file, line, col, "bare carriage return; end records with CRLF or LF")
        if i < n and text[i] == "\n":
            i += 1
            line += 1
        records.append((start_line, fields))
    return records


# --------------------------------------------------------------------------------------------
# Probe suite checks
# --------------------------------------------------------------------------------------------
def _word_edit_distance(a: list[str], b: list[str]) -> int:
    prev = list(range(len(b) + 1))
    for i, wa in enumerate(a, 1):
        cur = [i]
        for j, wb in enumerate(b, 1):
            cur.append(min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (wa != wb)))
        prev = cur
    return prev[-1]


def check_probes(path: str, registry: Registry, problems: Problems, seen: dict[str, tuple[str, int]]) -> dict[str, int]:
    """Checks one probe suite; 'seen' carries utterance keys across suites. Returns kind counts."""
    file = os.path.basename(path)
    try:
        with open(path, "rb") as fh:
            data = fh.read()
    except OSError as exc:
        raise InputError(f"{path}: cannot read the probe suite: {exc.strerror}") from exc
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise InputError(f"{path}: not UTF-8 (byte {exc.start}); save the file as UTF-8") from exc
    if text.startswith("\ufeff"):
        problems.add(file, 1, 1, "byte order mark at the start; save as UTF-8 without BOM")
        text = text[1:]
    records = parse_rfc4180(text, file, problems)
    counts: dict[str, int] = {}
    if not records:
        problems.add(file, 1, 1, "the probe suite is empty; it needs the header utterance,expect,kind,note")
        return counts
    header_line, header = records[0]
    if header != HEADER:
        problems.add(file, header_line, 1, f"header must be {','.join(HEADER)}, found {','.join(header)}")
        return counts

    approved: dict[str, str] = {}
    rejected: dict[str, str] = {}
    approved_words: dict[str, list[list[str]]] = {}
    for tid, entry in registry.tasks.items():
        for p, _, _ in entry["phrases"]:
            approved[loose_key(p)] = tid
            approved_words.setdefault(tid, []).append(loose_key(p).split())
        for r, _, _ in entry["must_reject"]:
            rejected[loose_key(r)] = tid

    per_task_paraphrase: dict[str, int] = {}
    for line, fields in records[1:]:
        if fields == [""]:
            problems.add(file, line, 1, "empty line; remove it")
            continue
        if len(fields) != len(HEADER):
            problems.add(file, line, 1, f"row has {len(fields)} fields, expected {len(HEADER)} ({','.join(HEADER)}); quote fields that contain commas")
            continue
        utterance, expect, kind, note = fields
        if utterance != utterance.strip():
            problems.add(file, line, 1, f"utterance {utterance!r} has leading or trailing spaces")
        if not utterance:
            problems.add(file, line, 1, "empty utterance")
            continue
        if expect != REJECT and expect not in SCENARIO:
            problems.add(file, line, 1, f"expect {expect!r} is neither a task id nor '{REJECT}'{_did_you_mean(expect, set(SCENARIO))}")
        if kind in IN_SCOPE_KINDS:
            if expect == REJECT:
                problems.add(file, line, 1, f"kind '{kind}' expects a task id, not '{REJECT}'")
        elif kind in REJECT_KINDS:
            if expect != REJECT:
                problems.add(file, line, 1, f"kind '{kind}' must expect '{REJECT}', found {expect!r}")
        else:
            problems.add(file, line, 1, f"unknown kind {kind!r}; use one of {', '.join(sorted(IN_SCOPE_KINDS | REJECT_KINDS))}")
        if not note.strip():
            problems.add(file, line, 1, "note is empty; say in a few words what the row tests")
        counts[kind] = counts.get(kind, 0) + 1

        key = loose_key(utterance)
        dedup_key = key if key else "raw:" + normalize(utterance)
        if key and key in approved:
            problems.add(file, line, 1, f"utterance {utterance!r} equals an approved phrase of {approved[key]}; probes must be unseen wordings")
        if key and key in rejected:
            problems.add(file, line, 1, f"utterance {utterance!r} equals a must_reject line of {rejected[key]}; write a different look-alike")
        if dedup_key in seen:
            other_file, other_line = seen[dedup_key]
            problems.add(file, line, 1, f"utterance {utterance!r} duplicates {other_file} line {other_line} after normalisation")
        else:
            seen[dedup_key] = (file, line)
        if kind == "negated" and not negation_cues(utterance):
            problems.add(file, line, 1, f"negated probe {utterance!r} carries no negation cue")
        if kind in IN_SCOPE_KINDS and expect in SCENARIO and negation_cues(utterance):
            problems.add(file, line, 1, f"in-scope probe {utterance!r} contains negation {negation_cues(utterance)}")
        if kind == "paraphrase" and expect in approved_words:
            uw = key.split()
            for pw in approved_words[expect]:
                if _word_edit_distance(uw, pw) <= 1:
                    problems.add(file, line, 1, f"paraphrase {utterance!r} is one word away from the approved phrase {' '.join(pw)!r}; write a genuinely new wording (or make it an asr-slip / harmless-extra)")
                    break
            per_task_paraphrase[expect] = per_task_paraphrase.get(expect, 0) + 1

    mins = MINIMUMS.get(file)
    if mins:
        total = sum(counts.values())
        if total < mins["total"]:
            problems.add(file, 0, 0, f"{total} probe rows; at least {mins['total']} are needed")
        for kind, minimum in mins.items():
            if kind != "total" and counts.get(kind, 0) < minimum:
                problems.add(file, 0, 0, f"{counts.get(kind, 0)} '{kind}' rows; at least {minimum} are needed")
        per_task_min = PARAPHRASES_PER_TASK[file]
        for tid in SCENARIO:
            if per_task_paraphrase.get(tid, 0) < per_task_min:
                problems.add(file, 0, 0, f"{per_task_paraphrase.get(tid, 0)} paraphrase rows for {tid}; at least {per_task_min} are needed")
    return counts


# --------------------------------------------------------------------------------------------
# Scenario cross-check
# --------------------------------------------------------------------------------------------
def check_scenario_file(path: str, problems: Problems) -> None:
    """Parses the scenario table in scenario.md and compares it with SCENARIO."""
    file = os.path.basename(path)
    try:
        with open(path, encoding="utf-8") as fh:
            lines = fh.read().split("\n")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"{path}: cannot read the scenario: {exc}") from exc
    found: dict[str, tuple[str, str, int, bool, int]] = {}
    for number, raw in enumerate(lines, start=1):
        cells = [c.strip() for c in raw.strip().strip("|").split("|")]
        if len(cells) != 4 or not KEBAB.match(cells[0]) or cells[0] == "id":
            continue
        m = re.match(r"^([a-z0-9.-]+),\s*(\d+)$", cells[2])
        if not m:
            problems.add(file, number, 1, f"cannot read 'manifold, axes' from {cells[2]!r}")
            continue
        confirm = cells[3].lower().startswith("yes")
        found[cells[0]] = (cells[1], m.group(1), int(m.group(2)), confirm, number)
    for tid, (text, manifold, dims, confirm) in SCENARIO.items():
        if tid not in found:
            problems.add(file, 0, 0, f"task {tid} of the checker's table is not in the scenario file")
            continue
        ftext, fman, fdims, fconf, number = found[tid]
        if (ftext, fman, fdims, fconf) != (text, manifold, dims, confirm):
            problems.add(file, number, 1, f"scenario row for {tid} is {(ftext, fman, fdims, fconf)}, the checker has {(text, manifold, dims, confirm)}; update check_examples.py")
    for tid, (*_, number) in found.items():
        if tid not in SCENARIO:
            problems.add(file, number, 1, f"scenario task {tid} is not in the checker's table; update check_examples.py")


# --------------------------------------------------------------------------------------------
# Driver
# --------------------------------------------------------------------------------------------
def run(directory: str, scenario: str | None) -> tuple[Problems, dict[str, dict[str, int]], Registry]:
    problems = Problems()
    if scenario:
        check_scenario_file(scenario, problems)
    registry = check_registry(os.path.join(directory, "registry.yaml"), problems)
    seen: dict[str, tuple[str, int]] = {}
    counts = {}
    for name in ("probes.csv", "probes-holdout.csv"):
        counts[name] = check_probes(os.path.join(directory, name), registry, problems, seen)
    return problems, counts, registry


def self_test(directory: str) -> int:
    """Copies the data to a temporary folder, breaks it one way at a time and checks that the
    matching problem is reported (and that the unbroken copy passes)."""
    def read(name: str) -> str:
        with open(os.path.join(directory, name), encoding="utf-8") as fh:
            return fh.read()

    base = {name: read(name) for name in ("registry.yaml", "probes.csv", "probes-holdout.csv")}
    first_phrase = "      - press the hall light switch\n"
    assert first_phrase in base["registry.yaml"], "self-test expects the hall-light phrase 'press the hall light switch'"
    cases = [
        ("unbroken copy passes", {}, None),
        ("wrong manifold", {"registry.yaml": ("manifold: reach-press.v1", "manifold: reach-press.v2")}, "controller.manifold must be 'reach-press.v1'"),
        ("wrong axes", {"registry.yaml": ("manifold: hang-hook.v2, latent_dims: 2", "manifold: hang-hook.v2, latent_dims: 1")}, "controller.latent_dims must be 2"),
        ("confirm flag dropped", {"registry.yaml": ("title: Pull the blanket over her knees\n    confirm: true", "title: Pull the blanket over her knees\n    confirm: false")}, "blanket: confirm must be true"),
        ("unknown key", {"registry.yaml": ("    must_reject:\n      - throw the keys", "    must_rejects:\n      - throw the keys")}, "did you mean 'must_reject'"),
        ("duplicate phrase", {"registry.yaml": (first_phrase, first_phrase + "      - Press the hall-light switch!\n")}, "duplicates a phrase of hall-light"),
        ("negation in phrase", {"registry.yaml": (first_phrase, first_phrase + "      - don't leave the hall light off\n")}, "contains negation"),
        ("phrase names another object", {"registry.yaml": (first_phrase, first_phrase + "      - light by the window\n")}, "an object of window-latch"),
        ("tuned threshold", {"registry.yaml": ("accept: 0.60", "accept: 0.55")}, "defaults.accept must be 0.6"),
        ("yaml boolean phrase", {"registry.yaml": (first_phrase, first_phrase + "      - light\n      - yes\n")}, "reads as a boolean"),
        ("probe equals phrase", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nTurn on the hall light.,hall-light,paraphrase,copy\n")}, "equals an approved phrase of hall-light"),
        ("probe equals must_reject", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nthrow the keys!,reject,look-alike,copy\n")}, "equals a must_reject line of keys-hook"),
        ("duplicate across suites", {"probes-holdout.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\n" + base["probes.csv"].split("\n")[1] + "\n")}, "duplicates probes.csv line 2"),
        ("bad quoting", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nsay \"hi\" now,reject,nonsense,quote\n")}, "bare '\"' in an unquoted field"),
        ("unquoted comma", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nwell, feed them,fish-food,paraphrase,comma\n")}, "row has 5 fields"),
        ("unknown expect", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nfeed them fishies,fish-feed,paraphrase,typo\n")}, "did you mean 'fish-food'"),
        ("kind and expect disagree", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nplease dont feed them,fish-food,negated,mismatch\n")}, "kind 'negated' must expect 'reject'"),
        ("negated without cue", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nleave the goldfish be,reject,negated,no cue\n")}, "carries no negation cue"),
        ("paraphrase too close", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expect,kind,note\nfeed the fishes,fish-food,paraphrase,too close\n")}, "one word away from the approved phrase"),
        ("wrong header", {"probes.csv": ("utterance,expect,kind,note\n", "utterance,expected,kind,note\n")}, "header must be utterance,expect,kind,note"),
    ]
    failures = 0
    for name, edits, expected in cases:
        with tempfile.TemporaryDirectory() as tmp:
            for fname, content in base.items():
                if fname in edits:
                    old, new = edits[fname]
                    assert old in content, f"self-test case '{name}': text to replace not found in {fname}"
                    content = content.replace(old, new, 1)
                with open(os.path.join(tmp, fname), "w", encoding="utf-8", newline="") as fh:
                    fh.write(content)
            problems, _, _ = run(tmp, None)
        if expected is None:
            ok = len(problems) == 0
        else:
            ok = any(expected in p for p in problems.items)
        print(f"{'ok  ' if ok else 'FAIL'} {name}")
        if not ok:
            failures += 1
            for p in problems.items[:5]:
                print(f"       got: {p}")
    # normalisation facts (TextNormalizer's documented behaviour)
    checks = [
        (match_key("  Feed   the FISH!! "), "feed the fish"),
        (match_key("\uff26eed the fish"), "feed the fish"),          # NFKC: fullwidth F
        (match_key("feed\u200b the fish"), "feed the fish"),         # format character dropped
        (loose_key("I'd like the hall-light."), "id like the hall light"),
        (loose_key("i\u2019d like the hall light"), "id like the hall light"),
        (sorted(negation_cues("please dont water it")), ["dont"]),
        (sorted(negation_cues("i no longer want it")), ["no"]),
        (negation_cues("water the plant by the front window"), []),
    ]
    for got, want in checks:
        ok = got == want
        print(f"{'ok  ' if ok else 'FAIL'} normalisation {want!r}")
        failures += 0 if ok else 1
    print(f"self-test: {failures} failure(s)")
    return 1 if failures else 0


def main(argv: list[str]) -> int:
    here = os.path.dirname(os.path.abspath(__file__))
    parser = argparse.ArgumentParser(description="Validate the Harbor Street example registry and probe suites.")
    parser.add_argument("--dir", default=here, help="folder holding registry.yaml, probes.csv, probes-holdout.csv (default: this script's folder)")
    parser.add_argument("--scenario", help="path of design/scenario.md, to check the built-in scenario table against it")
    parser.add_argument("--self-test", action="store_true", help="break copies of the data one way at a time and check each break is reported")
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:
        return 2 if exc.code else 0
    try:
        if args.self_test:
            return self_test(args.dir)
        problems, counts, registry = run(args.dir, args.scenario)
    except InputError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
    for p in problems.items:
        print(p)
    phrases = sum(len(t["phrases"]) for t in registry.tasks.values())
    rejects = sum(len(t["must_reject"]) for t in registry.tasks.values())
    print(f"registry.yaml: {len(registry.tasks)} tasks, {phrases} approved phrases, {rejects} must_reject lines")
    for name, c in counts.items():
        detail = ", ".join(f"{k} {v}" for k, v in sorted(c.items()))
        print(f"{name}: {sum(c.values())} rows ({detail})")
    if problems:
        print(f"FAILED: {len(problems)} problem(s)")
        return 1
    print("OK: all checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
