#!/usr/bin/env python3
"""Writes the loader's test corpus: tests/data/bad/* (each must fail with the message listed in
tests/data/bad/EXPECTED) and tests/data/good/* (each must load). Kept as a script so the exact
bytes (CRLF, BOM, binary .npy headers) are readable here. The files are committed; run this only
to change them:  /usr/bin/python3 tests/data/make_corpus.py
Only the standard library is used, so the .npy bytes are written by hand following the published
.npy format description (magic, version, little-endian header length, dict literal, data)."""
import os
import struct

HERE = os.path.dirname(os.path.abspath(__file__))
BAD = os.path.join(HERE, "bad")
GOOD = os.path.join(HERE, "good")


def write(folder, name, data):
    os.makedirs(folder, exist_ok=True)
    with open(os.path.join(folder, name), "wb") as f:
        f.write(data if isinstance(data, bytes) else data.encode("utf-8"))


def npy(descr, shape, payload, version=(1, 0), fortran=False, header=None, pad=True):
    """A .npy file; `header` replaces the dict text when given."""
    if header is None:
        shape_text = "(" + ", ".join(str(s) for s in shape) + ("," if len(shape) == 1 else "") + ")"
        header = "{'descr': '%s', 'fortran_order': %s, 'shape': %s, }" % (descr, "True" if fortran else "False", shape_text)
    h = header.encode("latin1")
    length_size = 2 if version[0] == 1 else 4
    if pad:
        total = 6 + 2 + length_size + len(h) + 1
        h += b" " * ((64 - total % 64) % 64) + b"\n"
    length = struct.pack("<H" if length_size == 2 else "<I", len(h))
    return b"\x93NUMPY" + bytes(version) + length + h + payload


def f8(values):
    return struct.pack("<%dd" % len(values), *values)


def f4(values):
    return struct.pack("<%df" % len(values), *values)


# ---- bad CSV/TSV -------------------------------------------------------------------------
write(BAD, "empty.csv", "")
write(BAD, "only_bom_and_blank_lines.csv", b"\xef\xbb\xbf\r\n\r\n")
write(BAD, "header_only.csv", "id,width,height\n")
write(BAD, "one_item.csv", "id,width,height\nfern,1,2\n")
write(BAD, "ragged_long.csv", "id,width,height\nfern,1,2\nmoss,3,4,5\n")
write(BAD, "ragged_short.csv", "id,width,height\nfern,1,2\nmoss,3\n")
write(BAD, "ragged.tsv", "id\twidth\theight\nfern\t1\t2\nmoss\t3\t4\t5\n")
write(BAD, "not_a_number.csv", "id,width,height\nfern,1,2\nmoss,3,4\nsage,abc,6\n")
write(BAD, "empty_value.csv", "id,width,height\nfern,1,2\nmoss,,4\nsage,5,6\n")
write(BAD, "nan.csv", "id,width,height\nfern,1,2\nmoss,3,nan\nsage,5,6\n")
write(BAD, "infinite.csv", "id,width,height\nfern,1,2\nmoss,3,4\nsage,-inf,6\n")
write(BAD, "overflow.csv", "id,width,height\nfern,1,2\nmoss,3,1e999\nsage,5,6\n")
write(BAD, "no_features.csv", "colour,family\ngreen,plant\ngreen,plant\n")
write(BAD, "duplicate_id.csv", "id,width,height\nfern,1,2\nmoss,3,4\nfern,5,6\n")
write(BAD, "empty_id.csv", "id,width,height\nfern,1,2\n,3,4\n")
write(BAD, "duplicate_column.csv", "id,width,width\nfern,1,2\nmoss,3,4\n")
write(BAD, "unclosed_quote.csv", 'id,note,width\nfern,"soft,1\nmoss,hard,3\n')
write(BAD, "quote_closed_late.csv", 'id,note,width\nfern,"soft,1\nmoss,"hard",3\n')
write(BAD, "text_after_quote.csv", 'id,note,width\nfern,"soft"x,1\nmoss,hard,3\n')
# Line numbers count physical lines: a quoted line break and CRLF ends must not shift them.
write(BAD, "error_after_quoted_newline.csv",
      b'\xef\xbb\xbfid,note,width\r\nfern,"two\r\nlines",1\r\nmoss,"say ""hi""",2\r\nsage,plain,x\r\n')
write(BAD, "unknown_id_column.csv", "id,width,height\nfern,1,2\nmoss,3,4\n")
write(BAD, "exclude_all.csv", "id,width,height\nfern,1,2\nmoss,3,4\n")

# ---- bad .npy ------------------------------------------------------------------------------
write(BAD, "empty.npy", b"")
write(BAD, "not_npy.npy", b"id,width\nfern,1\n")
write(BAD, "version_4.npy", npy("<f8", (2, 2), f8([1, 2, 3, 4]), version=(4, 0)))
write(BAD, "big_endian.npy", npy(">f8", (2, 2), struct.pack(">4d", 1, 2, 3, 4)))
write(BAD, "int32.npy", npy("<i4", (2, 2), struct.pack("<4i", 1, 2, 3, 4)))
write(BAD, "fortran.npy", npy("<f8", (2, 2), f8([1, 2, 3, 4]), fortran=True))
write(BAD, "three_d.npy", npy("<f8", (2, 2, 1), f8([1, 2, 3, 4])))
write(BAD, "cut_short.npy", npy("<f8", (3, 2), f8([1, 2, 3, 4, 5])))
write(BAD, "extra_bytes.npy", npy("<f4", (2, 2), f4([1, 2, 3, 4]) + b"\0\0"))
write(BAD, "header_cut_short.npy", npy("<f8", (2, 2), b"")[:30])
write(BAD, "bad_header_syntax.npy", npy("<f8", (2, 2), f8([1, 2, 3, 4]),
                                        header="{'descr': '<f8', 'fortran_order': False, 'shape': (2; 2), }"))
write(BAD, "missing_shape.npy", npy("<f8", (2, 2), f8([1, 2, 3, 4]),
                                    header="{'descr': '<f8', 'fortran_order': False, }"))
write(BAD, "nan.npy", npy("<f8", (2, 3), f8([1, 2, 3, 4, float("nan"), 6])))
write(BAD, "inf_f4.npy", npy("<f4", (2, 2), f4([1, float("inf"), 3, 4])))
write(BAD, "one_row.npy", npy("<f8", (1, 2), f8([1, 2])))
write(BAD, "tags_too_short.npy", npy("<f8", (3, 2), f8([1, 2, 3, 4, 5, 6])))
write(BAD, "tags_too_short.csv", "family\nplant\nplant\n")

# ---- good files ----------------------------------------------------------------------------
# RFC 4180 quoting: separators, doubled quotes and line breaks inside quoted fields.
write(GOOD, "quoting.csv",
      'id,note,width,height\n'
      '"fern, large","says ""soft""",1.5,2\n'
      'moss,"two\nlines",3,4e-1\n'
      '"sage",,+5, 6 \n')
write(GOOD, "crlf_bom.csv", b"\xef\xbb\xbfid,width,height\r\nfern,1,2\r\nmoss,3,4\r\nsage,5,6")
write(GOOD, "tabs.tsv", "name\tfamily\twidth\theight\nfern\tplant\t1\t2\nmoss\tplant\t3\t4\nslate\tstone\t5\t6\n")
write(GOOD, "no_id.csv", "width,height,family\n1,2,plant\n3,4,plant\n5,6,stone\n")
write(GOOD, "constant_column.csv", "id,width,height\nfern,1,7\nmoss,3,7\nsage,5,7\n")
write(GOOD, "pictures.csv", "id,picture,width\nfern,pics/fern.png,1\nmoss,pics/moss.jpg,2\nsage,pics/missing.png,3\n")
write(os.path.join(GOOD, "pics"), "fern.png", b"not really a png; only its presence is checked")
write(os.path.join(GOOD, "pics"), "moss.jpg", b"not really a jpeg; only its presence is checked")
write(GOOD, "small_v1.npy", npy("<f8", (3, 2), f8([1, 2, 3, 4, 5, 6])))
write(GOOD, "small_v2_f4.npy", npy("<f4", (3, 2), f4([1, 2, 3, 4, 5, 6]), version=(2, 0)))
write(GOOD, "small_v3_1d.npy", npy("<f8", (3,), f8([1, 2, 3]), version=(3, 0)))
write(GOOD, "small_tags.csv", "id,family\nfern,plant\nmoss,plant\nslate,stone\n")
