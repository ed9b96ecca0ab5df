"""The native model format: TOML, or the same structure written as JSON.

A model file, in TOML::

    name = "Plant platform, south bay"
    units = "m"          # m, mm, cm, ft or in; results do not depend on it
    dimension = 3        # 3 = space frame; 2 = plane frame, coordinates [x, y]

    [joints]             # id = [x, y, z]
    A = [0.0, 0.0, 0.0]
    B = [4.0, 0.0, 0.0]
    C = [2.0, 0.0, 3.0]

    [members]            # id = [end, end]
    AB = ["A", "B"]
    BC = ["B", "C"]
    CA = ["C", "A"]

    [supports]           # joint = what is held
    A = "pin"            # every translation held
    B = "yz"             # the axes held
    C = [[0.0, 0.6, 0.8]]  # or direction vectors held (need not be unit length)

The JSON form is one object with the same keys: ``{"name": ..., "joints":
{"A": [0, 0, 0], ...}, "members": {"AB": ["A", "B"], ...}, "supports": {...}}``.

Ids are strings.  ``dimension`` defaults to 3, ``units`` to ``"m"`` and
``name`` to the file name without its suffix.  Named tags of joints and members (see :attr:`Frame.joint_tags`) are tables
``[tags.joints.<attribute>]`` and ``[tags.members.<attribute>]`` of
``label = [ids]``::

    [tags.members.role]
    chord = ["AB"]
    web = ["BC", "CA"]

    [tags.joints.frame]
    "1" = ["A", "B", "C"]

An item listed under no label of an attribute has the label ``""``; an id
that is not in the model, or is listed under two labels of one attribute, is
an error.

Member properties (see :attr:`Frame.member_properties`) are tables
``[properties.members.<name>]``; the one known is ``EA``, the axial
stiffness in any consistent unit::

    [properties.members.EA]
    default = 2.0e5          # every member not named below
    "role=chord" = 4.0e5     # every member tagged role = chord
    AB = 1.0e5               # one member

A member id wins over a selector, a selector over the default; a member left
without a value is an error.

Loads (``force_units``, ``[loads.NAME]``, ``[combinations.NAME]``,
``[self_weight]``, ``[notional]``) are read and written by :mod:`spaceframe.io.loads`.

The member tag ``carries`` makes members one-way: labels ``tension`` (rods,
cables, guys) and ``compression`` (props); members not listed carry both
(:func:`spaceframe.model.one_way_members`)::

    [tags.members.carries]
    tension = ["BC", "CA"]

A model may declare the prestress it is built and kept in, as member forces
(+ tension; members not listed carry none)::

    [prestress]
    BC = 10.0

The top-level keys ``groups`` and ``notes`` are reserved for later
versions and accepted without a word; any other unknown key draws a
:class:`SpaceframeWarning`.

The package has one module per job: :mod:`.read` (documents to checked
frames, with every message for bad input), :mod:`.write` (frames to files);
source lines for messages come from :mod:`spaceframe.io.sourcelines`.

Reading is built for large models: arrays are made by NumPy from the parsed
lists, ids are mapped to indices through one dict, and the type checks run
over whole lists at C speed.  Source lines are never computed for a valid
model: the parsers give none for values, so the text is searched for the one
item a message is about, only when a message is raised.
"""


from __future__ import annotations

from .read import (KEYS, PROPERTIES, RESERVED_KEYS, frame_from_document, json_line, read_json,
                   read_toml, toml_line)
from .write import dump_json, dump_toml

__all__ = ["read_toml", "read_json", "frame_from_document", "dump_toml", "dump_json",
           "toml_line", "json_line", "KEYS", "RESERVED_KEYS", "PROPERTIES"]
