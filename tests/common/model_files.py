"""Model files shared by the tests: the format's documented sample, and the registry
of bad inputs.

The bad inputs (:data:`ERROR_CASES`, :data:`WARNING_CASES`) are small files,
each written to its own temporary file by the tests; ``io/test_native.py`` reads
them through the library and ``cli/test_cli_errors.py`` through the command line.
"""

from __future__ import annotations

from dataclasses import dataclass

# The sample of the format's documentation, exactly as written there.
SAMPLE = """\
name = "Plant platform, south bay"
units = "m"          # m, mm, cm, ft or in; results do not depend on it
dimension = 3        # 3 = space frame; 2 = plane frame analysed in its plane, coordinates [x, y]

[joints]             # id = [x, y, z]
A = [0.0, 0.0, 0.0]
B = [4.0, 0.0, 0.0]
C = [2.0, 0.0, 3.0]

[members]            # id = [end, end]
AB = ["A", "B"]
BC = ["B", "C"]
CA = ["C", "A"]

[supports]           # joint = what is held
A = "pin"            # every translation held (x, y, z; in 2D x, y)
B = "yz"             # any non-empty combination of the letters x, y, z: those axes held
# C = [[0.0, 0.6, 0.8]]   # or a list of direction vectors held (inclined roller); need not be unit length
"""

SAMPLE_JSON = """\
{
  "name": "Plant platform, south bay",
  "units": "m",
  "dimension": 3,
  "joints": {
    "A": [0.0, 0.0, 0.0],
    "B": [4.0, 0.0, 0.0],
    "C": [2.0, 0.0, 3.0]
  },
  "members": {
    "AB": ["A", "B"],
    "BC": ["B", "C"],
    "CA": ["C", "A"]
  },
  "supports": {
    "A": "pin",
    "B": "yz"
  }
}
"""

# The base of the bad files: small, one item a line, so each line is known.
BASE = """\
name = "bad input"
[joints]
A = [0.0, 0.0, 0.0]
B = [4.0, 0.0, 0.0]
C = [2.0, 0.0, 3.0]
[members]
AB = ["A", "B"]
BC = ["B", "C"]
CA = ["C", "A"]
[supports]
A = "pin"
B = "yz"
"""

BASE_2D = """\
dimension = 2
[joints]
A = [0.0, 0.0]
B = [4.0, 0.0]
C = [2.0, 3.0]
[members]
AB = ["A", "B"]
BC = ["B", "C"]
CA = ["C", "A"]
[supports]
A = "pin"
B = "y"
"""

BASE_JSON = """\
{
  "name": "bad input",
  "joints": {
    "A": [0.0, 0.0, 0.0],
    "B": [4.0, 0.0, 0.0],
    "C": [2.0, 0.0, 3.0]
  },
  "members": {
    "AB": ["A", "B"],
    "BC": ["B", "C"],
    "CA": ["C", "A"]
  },
  "supports": {
    "A": "pin",
    "B": "yz"
  }
}
"""

HERE = "# here"     # marks the line a message must name


def variant(base: str, old: str, new: str) -> str:
    """``base`` with the one line holding ``old`` replaced by ``new``."""
    assert base.count(old) == 1, old
    return base.replace(old, new)


def line_of(text: str, piece: str, nth: int = 1) -> int:
    """1-based line of the ``nth`` line of ``text`` holding ``piece``."""
    hits = [k for k, line in enumerate(text.splitlines(), 1) if piece in line]
    return hits[nth - 1]


@dataclass(frozen=True)
class Case:
    """One bad model file and what its message must say.

    ``line`` is the line the message must name (None where no line applies);
    ``expect`` are pieces the message must contain: the id, what is wrong and
    the key words of the fix.  The file name is always checked.
    """

    name: str
    suffix: str
    text: str | bytes
    expect: tuple[str, ...]
    line: int | None
    item: str | None = None

    def write(self, folder) -> str:
        path = folder / f"{self.name}{self.suffix}"
        if isinstance(self.text, bytes):
            path.write_bytes(self.text)
        else:
            path.write_text(self.text, encoding="utf-8")
        return str(path)


def _toml(name, old, new, expect, *, item=None, base=BASE, marker=HERE, nth=1):
    text = variant(base, old, new)
    return Case(name, ".toml", text, tuple(expect), line_of(text, marker, nth), item)


def _json(name, old, new, expect, *, at, item=None, nth=1, base=BASE_JSON):
    text = variant(base, old, new)
    return Case(name, ".json", text, tuple(expect), line_of(text, at, nth), item)


ERROR_CASES = [
    # members
    _toml("member-unknown-joint", 'AB = ["A", "B"]', 'AB = ["A", "Bx"]  # here',
          ["member 'AB'", "joint 'Bx'", "not in [joints]",
           "add the joint or correct the id (did you mean 'B'?)"], item="AB"),
    _json("member-unknown-joint-json", '"BC": ["B", "C"]', '"BC": ["B", "Cc"]',
          ["member 'BC'", "joint 'Cc'", 'not in "joints"',
           "add the joint or correct the id (did you mean 'C'?)"],
          at='"BC"', item="BC"),
    _toml("member-one-end", 'AB = ["A", "B"]', 'AB = ["A"]  # here',
          ["member 'AB'", "must be a list of two joint ids", "['A']"], item="AB"),
    _toml("member-three-ends", 'AB = ["A", "B"]', 'AB = ["A", "B", "C"]  # here',
          ["member 'AB'", "must be a list of two joint ids"], item="AB"),
    _toml("member-text", 'BC = ["B", "C"]', 'BC = "B-C"  # here',
          ["member 'BC'", "must be a list of two joint ids", "'B-C'"], item="BC"),
    _toml("member-numbers", 'CA = ["C", "A"]', 'CA = [3, 1]  # here',
          ["member 'CA'", "two joint ids", "put them in quotes"], item="CA"),
    _toml("member-self-loop", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nAA = ["A", "A"]  # here',
          ["member 'AA'", "both ends at joint 'A'", "correct one end or delete the member"],
          item="AA"),
    _json("member-self-loop-json", '"CA": ["C", "A"]', '"CA": ["C", "C"]',
          ["member 'CA'", "both ends at joint 'C'", "delete the member"], at='"CA"', item="CA"),
    _toml("member-zero-length", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nAD = ["A", "D"]  # here',
          ["member 'AD'", "joint 'A'", "joint 'D'", "length 0 m", "zero-length tolerance",
           "move one of them"],
          base=variant(BASE, "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\nD = [0.0, 0.0, 0.0]"),
          item="AD"),
    # ids given twice
    _toml("joint-twice", "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\nA = [1.0, 0.0, 0.0]  # here",
          ["joint id 'A'", "given twice in [joints]", "first at line 3",
           "rename one or delete the repeat"], item="A"),
    _toml("member-twice", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nBC = ["C", "B"]  # here',
          ["member id 'BC'", "given twice in [members]", "first at line 8", "rename one"],
          item="BC"),
    _toml("support-twice", 'B = "yz"', 'B = "yz"\nB = "z"  # here',
          ["joint 'B' has two supports in [supports]", "first at line 12",
           "give each joint one support that holds all its directions"], item="B"),
    _toml("multi-line-joint-twice", "C = [2.0, 0.0, 3.0]",
          "C = [2.0, 0.0, 3.0]\nA = [  # here\n  1.0,\n  0.0,\n  0.0,\n]",
          ["joint id 'A'", "given twice", "first at line 3"], item="A"),
    _toml("section-twice", "[supports]", "[joints]  # here\nD = [1.0, 1.0, 1.0]\n[supports]",
          ["section [joints] appears twice", "first at line 2", "under one [joints] header"],
          item="joints"),
    _toml("name-twice", 'name = "bad input"', 'name = "bad input"\nname = "again"  # here',
          ["key 'name' is given twice (first at line 1); keep one"], item="name"),
    _json("joint-twice-json", '"C": [2.0, 0.0, 3.0]', '"C": [2.0, 0.0, 3.0],\n    "A": [1.0, 0.0, 0.0]',
          ["joint id 'A'", 'given twice in "joints"', "first at line 4", "rename one"],
          at='"A": [1.0', item="A"),
    _json("member-twice-json", '"CA": ["C", "A"]', '"CA": ["C", "A"],\n    "AB": ["B", "A"]',
          ["member id 'AB'", 'given twice in "members"', "first at line 9", "rename one"],
          at='"AB": ["B"', item="AB"),
    _json("support-twice-json", '"B": "yz"', '"B": "yz",\n    "A": "z"',
          ["joint 'A' has two supports in \"supports\"",
           "first at line %d" % line_of(BASE_JSON, '"A": "pin"')],
          at='"A": "z"', item="A"),
    # coordinates
    _toml("coordinate-text", "C = [2.0, 0.0, 3.0]", 'C = [2.0, "0", 3.0]  # here',
          ["joint 'C'", "coordinate y is '0', not a number", "write numbers without quotes"],
          item="C"),
    _toml("coordinate-boolean", "C = [2.0, 0.0, 3.0]", "C = [2.0, true, 3.0]  # here",
          ["joint 'C'", "coordinate y is True, not a number"], item="C"),
    _toml("coordinates-empty", "C = [2.0, 0.0, 3.0]", "C = []  # here",
          ["joint 'C' has no coordinates", "give 3 numbers [x, y, z]"], item="C"),
    _toml("coordinates-not-list", "C = [2.0, 0.0, 3.0]", "C = 2.0  # here",
          ["joint 'C'", "coordinates must be a list of 3 numbers [x, y, z]", "got 2.0"],
          item="C"),
    _json("coordinates-missing-json", '"B": [4.0, 0.0, 0.0]', '"B": null',
          ["joint 'B'", "must be a list of 3 numbers", "got None"], at='"B": null', item="B"),
    _toml("coordinates-two-in-3d", "C = [2.0, 0.0, 3.0]", "C = [2.0, 3.0]  # here",
          ["joint 'C' has 2 coordinates", "3-dimensional (dimension = 3)",
           "give 3 numbers [x, y, z]", "set dimension = 2 at the top of the file"], item="C"),
    _toml("coordinates-three-in-2d", "C = [2.0, 3.0]", "C = [2.0, 3.0, 1.0]  # here",
          ["joint 'C' has 3 coordinates", "2-dimensional (dimension = 2)", "give 2 numbers [x, y]",
           "set dimension = 3 at the top of the file"], base=BASE_2D, item="C"),
    _json("coordinates-two-in-3d-json", '"A": [0.0, 0.0, 0.0]', '"A": [0.0, 0.0]',
          ["joint 'A' has 2 coordinates", 'set "dimension": 2'], at='"A": [0.0, 0.0]', item="A"),
    _toml("coordinate-nan", "C = [2.0, 0.0, 3.0]", "C = [nan, 0.0, 3.0]  # here",
          ["joint 'C'", "not a finite number", "give every coordinate as a finite number"],
          item="C"),
    _json("coordinate-infinity-json", '"B": [4.0, 0.0, 0.0]', '"B": [Infinity, 0.0, 0.0]',
          ["joint 'B'", "not a finite number"], at="Infinity", item="B"),
    _toml("joints-coincident", "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\nD = [0.0, 0.0, 1e-12]  # here",
          ["joints 'A' (line 3) and 'D'", "apart", "coincident-joint tolerance", "1e-09",
           "false mechanism", "merge them into one joint", "or move one of them"], item="D"),
    _toml("key-after-header", "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\ndimension = 3  # here",
          ["joint 'dimension'", "move it above the first [section] header"], item="dimension"),
    # supports
    _toml("support-unknown-joint", 'B = "yz"', 'B = "yz"\nAA = "pin"  # here',
          ["support on joint 'AA'", "not in [joints]",
           "add the joint or correct the id (did you mean 'A'?)"], item="AA"),
    _toml("support-unknown-code", 'B = "yz"', 'B = "yq"  # here',
          ["support on joint 'B'", "unknown code 'yq'", "'pin'", "letters from 'xyz'"], item="B"),
    _toml("support-z-in-2d", 'B = "y"', 'B = "yz"  # here',
          ["support on joint 'B'", "unknown code 'yz'", "letters from 'xy'"], base=BASE_2D,
          item="B"),
    _toml("support-zero-vector", 'B = "yz"', 'B = [[0.0, 0.0, 0.0]]  # here',
          ["support on joint 'B'", "is zero", "give the direction held"], item="B"),
    _toml("support-empty-list", 'B = "yz"', "B = []  # here",
          ["support on joint 'B'", "direction vector needs 3 numbers"], item="B"),
    _json("support-unknown-code-json", '"B": "yz"', '"B": "roller"',
          ["support on joint 'B'", "unknown code 'roller'", "'pin'"], at='"roller"', item="B"),
    # the top level
    _toml("dimension-four", 'name = "bad input"', 'name = "bad input"\ndimension = 4  # here',
          ["dimension must be 2", "or 3", "not 4", "write dimension = 3 or dimension = 2"]),
    _toml("dimension-text", 'name = "bad input"', 'name = "bad input"\ndimension = "3"  # here',
          ["dimension must be 2", "not '3'"]),
    _json("dimension-float-json", '"name": "bad input",', '"name": "bad input",\n  "dimension": 3.5,',
          ["dimension must be 2", "not 3.5", 'write "dimension": 3'], at='"dimension"'),
    _toml("unit-unknown", 'name = "bad input"', 'name = "bad input"\nunits = "meters"  # here',
          ["unknown unit 'meters'", "one of m, mm, cm, ft, in", "results do not depend on it"]),
    _toml("unit-capital", 'name = "bad input"', 'name = "bad input"\nunits = "MM"  # here',
          ["unknown unit 'MM' (did you mean 'mm'?)"]),
    _toml("name-not-text", 'name = "bad input"', "name = 5  # here",
          ["name must be text in quotes", "got 5"]),
    _toml("joints-not-table", "[joints]\nA = [0.0, 0.0, 0.0]\nB = [4.0, 0.0, 0.0]\nC = [2.0, 0.0, 3.0]",
          "joints = [[0.0, 0.0, 0.0]]  # here",
          ["joints must be a table of id = [x, y, z]", "[joints]", "got list"]),
    _toml("supports-not-table", 'name = "bad input"', 'supports = "pin"  # here',
          ["supports must be a table", "[supports]", "got str"],
          base=BASE.replace('[supports]\nA = "pin"\nB = "yz"\n', "")),
    _toml("key-after-members-header", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nunits = "mm"  # here',
          ["member 'units' must be a list of two joint ids",
           "move it above the first [section] header"], item="units"),
    _toml("empty-id", "C = [2.0, 0.0, 3.0]", 'C = [2.0, 0.0, 3.0]\n"" = [1.0, 1.0, 1.0]  # here',
          ["an empty id in [joints]", "give it one or delete the entry"], item=""),
    Case("no-joints", ".toml", 'name = "nothing yet"\nunits = "m"\n',
         ("the model has no joints", "a model needs [joints] (id = [x, y, z])",
          "[members] (id = [end, end])", "[supports]"), None),
    Case("empty-file", ".toml", "", ("the model has no joints", "a model needs [joints]"), None),
    Case("empty-joints", ".toml", 'name = "x"\n[joints]  # here\n[members]\n',
         ("the model has no joints",), 2),
    Case("empty-json", ".json", "{}", ("the model has no joints", '"joints" (id: [x, y, z])', '"members" (id: [end, end])'), None),
    Case("json-list", ".json", "[1, 2, 3]", ("the top level of a model must be an object",), 1),
    # syntax
    _toml("toml-syntax", "B = [4.0, 0.0, 0.0]", "B = [4.0, 0.0 0.0]  # here",
          ["not valid TOML", "unclosed array", "at column", "fix the syntax there"]),
    _toml("toml-unquoted-text", 'name = "bad input"', "name = bad input  # here",
          ["not valid TOML", "at column", "ids and text in quotes"]),
    Case("toml-unclosed-at-end", ".toml", BASE + 'BC = ["B", "C"',
         ("not valid TOML", "at the end of the file"), len((BASE + "x").splitlines())),
    Case("json-in-toml-file", ".toml", SAMPLE_JSON, ("not valid TOML", "looks like JSON",
                                                     "name the file .json"), 1),
    _json("json-syntax", '"AB": ["A", "B"],', '"AB": ["A", "B"],,', ["not valid JSON",
          "at column", "fix the syntax there"], at='"AB"'),
    Case("json-trailing-comma", ".json", variant(BASE_JSON, '"B": "yz"', '"B": "yz",'),
         ("not valid JSON", "none after the last"), line_of(BASE_JSON, '"B": "yz"') + 1),
    Case("toml-in-json-file", ".json", SAMPLE, ("not valid JSON", "looks like TOML",
                                                "name the file .toml"), 1),
    Case("not-utf8", ".toml", b'name = "caf\xe9"\n[joints]\n',
         ("is not UTF-8 text", "save it as UTF-8"), 1),
]

@dataclass(frozen=True)
class WarnCase:
    """One model that loads, with a warning that must say ``expect``."""

    name: str
    suffix: str
    text: str
    expect: tuple[str, ...]
    line: int | None
    n_members: int
    write = Case.write


WARNING_CASES = [
    WarnCase("key-misspelt", ".toml", variant(BASE, "[members]", "[member]  # here"),
             ("unknown key 'member'; did you mean 'members'?", "ignored"),
             line_of(variant(BASE, "[members]", "[member]  # here"), HERE), 0),
    WarnCase("key-unknown", ".toml", "colour = \"red\"  # here\n" + BASE,
             ("unknown key 'colour' is ignored", "the keys of a model are name, units"), 1, 3),
    WarnCase("key-misspelt-json", ".json", variant(BASE_JSON, '"supports"', '"suports"'),
             ("unknown key 'suports'; did you mean 'supports'?",),
             line_of(BASE_JSON, '"supports"'), 3),
    WarnCase("member-repeated-reversed", ".toml",
             variant(BASE, 'CA = ["C", "A"]', 'CA = ["C", "A"]\nBA = ["B", "A"]  # here'),
             ("member 'BA' (line 10) repeats member 'AB' (line 7)", "between joints 'A' and 'B'",
              "two bars between the same pins act as one bar", "counted once",
              "delete the repeats"), 10, 3),
    WarnCase("member-repeated-json", ".json",
             variant(BASE_JSON, '"CA": ["C", "A"]', '"CA": ["C", "A"],\n    "CA2": ["C", "A"]'),
             ("member 'CA2' (line 12) repeats member 'CA' (line 11)", "counted once"), 12, 3),
    WarnCase("support-letter-repeated", ".toml", variant(BASE, 'B = "yz"', 'B = "yzz"  # here'),
             ("support on joint 'B'", "repeated", "held once"), 12, 3),
    WarnCase("support-directions-dependent", ".toml",
             variant(BASE, 'B = "yz"', "B = [[0.0, 1.0, 0.0], [0.0, -2.0, 0.0]]  # here"),
             ("support on joint 'B'", "2 directions given but only 1 are independent",
              "ignored"), 12, 3),
]
