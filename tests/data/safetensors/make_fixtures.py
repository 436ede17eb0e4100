#!/usr/bin/env python3
"""Writes the safetensors test fixtures of TaskPhrase.

This script is the *independent reference writer* for the C# reader and writer in
src/TaskPhrase/Conditioning: it uses only the Python standard library (struct, json) and
follows the published format (huggingface/safetensors README, "Format"): an 8-byte
little-endian u64 header length N, N bytes of UTF-8 JSON header, then the byte buffer.
Valid files are laid out as the reference implementation's serializer does
(safetensors/src/tensor.rs, `prepare`): tensors sorted by descending dtype alignment, then by
name; `__metadata__` first; compact JSON; header padded with spaces to a multiple of 8.

Malformed files are written byte by byte, one defect per file, named for the defect.
It also writes SHA256SUMS (hashlib). All numbers are invented test data. Run from any directory:

    python3 tests/data/safetensors/make_fixtures.py
"""

import hashlib
import json
import math
import pathlib
import struct

HERE = pathlib.Path(__file__).resolve().parent

# Reference dtype order (increasing alignment) and element sizes.
DTYPES = [
    ("BOOL", 1), ("U8", 1), ("I8", 1), ("F8_E5M2", 1), ("F8_E4M3", 1), ("F8_E8M0", 1),
    ("I16", 2), ("U16", 2), ("F16", 2), ("BF16", 2), ("I32", 4), ("U32", 4), ("F32", 4),
    ("F64", 8), ("I64", 8), ("U64", 8),
]
ORDER = {name: i for i, (name, _) in enumerate(DTYPES)}
SIZE = dict(DTYPES)


def pack(dtype, values):
    """Little-endian bytes of `values` in `dtype`."""
    if dtype == "BF16":
        out = b""
        for v in values:
            f32 = struct.pack("<f", v)
            # bfloat16 is the upper half of a float32; only exactly representable values are used.
            assert struct.unpack("<f", b"\x00\x00" + f32[2:])[0] == v or math.isnan(v), v
            out += f32[2:]
        return out
    fmt = {"F32": "f", "F16": "e", "F64": "d", "I64": "q", "U64": "Q", "I32": "i", "U8": "B"}[dtype]
    return struct.pack("<%d%s" % (len(values), fmt), *values)


def canonical(tensors, metadata=None):
    """A valid file in the reference layout. tensors: {name: (dtype, shape, values)}."""
    items = sorted(tensors.items(), key=lambda kv: (-ORDER[kv[1][0]], kv[0]))
    header = {}
    if metadata:
        header["__metadata__"] = dict(sorted(metadata.items()))
    data = b""
    for name, (dtype, shape, values) in items:
        raw = pack(dtype, values)
        assert len(raw) == math.prod(shape) * SIZE[dtype], name
        header[name] = {"dtype": dtype, "shape": list(shape), "data_offsets": [len(data), len(data) + len(raw)]}
        data += raw
    text = json.dumps(header, separators=(",", ":"), ensure_ascii=False).encode("utf-8")
    text += b" " * ((8 - len(text) % 8) % 8)
    return struct.pack("<Q", len(text)) + text + data


def raw(header, data=b"", prefix=None):
    """A file with exactly this header text (str or bytes) and buffer; prefix overrides the length."""
    text = header.encode("utf-8") if isinstance(header, str) else header
    return (struct.pack("<Q", len(text)) if prefix is None else prefix) + text + data


def write(name, content):
    (HERE / name).write_bytes(content)


# A 2-layer FiLM generator, d = 3, E = 4. Every number is a small dyadic rational, so float32
# arithmetic on them is exact and the tests can compare computed γ/β with hand arithmetic.
FILM = {
    "film.0.gamma.weight": ("F32", [3, 4], [0.5, 0, 0, 0,
                                           0, 0.25, 0, 1,
                                           1, 1, 1, 1]),
    "film.0.gamma.bias": ("F32", [3], [1, 0, -0.5]),
    "film.0.beta.weight": ("F32", [3, 4], [1, -1, 0, 0,
                                          0, 0, 2, 0,
                                          0, 0, 0, 4]),
    "film.0.beta.bias": ("F32", [3], [0, 0.5, -1]),
    "film.1.gamma.weight": ("F32", [3, 4], [0, 0, 0, 2,
                                           -1, 0, 0.5, 0,
                                           0.125, 0.125, 0, 0]),
    "film.1.gamma.bias": ("F32", [3], [0.5, 1, 0]),
    "film.1.beta.weight": ("F32", [3, 4], [0.5, 0.5, 0.5, 0.5,
                                          0, -2, 0, 0,
                                          1, 0, 0, -1]),
    "film.1.beta.bias": ("F32", [3], [-0.25, 0, 2]),
}
NOTE = "TaskPhrase test fixture; invented numbers"


def film_variant(drop=(), replace=None, add=None):
    tensors = {k: v for k, v in FILM.items() if k not in drop}
    tensors.update(replace or {})
    tensors.update(add or {})
    return tensors


def main():
    # ---- valid files -------------------------------------------------------------------------
    write("film-2layer-d3-e4.safetensors", canonical(FILM, {"note": NOTE}))
    write("film-2layer-d3-e4-residual.safetensors", canonical(FILM, {"gamma": "residual", "note": NOTE}))
    write("dtypes.safetensors", canonical({
        "bf16": ("BF16", [2, 2], [1.0, -2.5, 0.15625, 196608.0]),
        "f16": ("F16", [4], [0.5, -1.75, 65504.0, 2.0 ** -24]),
        "f32": ("F32", [2], [0.1, -3.0e38]),
        "i64": ("I64", [2], [-1, 2 ** 40]),
        "u8": ("U8", [3], [0, 127, 255]),
        "scalar": ("F32", [], [42.0]),
        "empty": ("F32", [0, 3], []),
        'odd "name" \\ \u03b3': ("F32", [1], [7.0]),
    }, {"comment": "tab\there, quote \" and \u03b3", "framework": "none"}))

    # ---- malformed files: the safetensors container -----------------------------------------
    ok_entry = '{"dtype":"F32","shape":[1],"data_offsets":[0,4]}'
    one = pack("F32", [1.0])
    write("file-shorter-than-length-prefix.safetensors", b"\x10\x00\x00\x00\x00")
    write("header-length-beyond-file.safetensors", raw('{"a":%s}' % ok_entry, one, prefix=struct.pack("<Q", 4096)))
    write("header-length-over-limit.safetensors", raw('{"a":%s}' % ok_entry, one, prefix=struct.pack("<Q", 200_000_000)))
    # The length written as decimal text instead of a binary u64.
    write("header-length-not-a-number.safetensors", raw('{"a":%s}' % ok_entry, one, prefix=b"00000057"))
    write("header-not-utf8.safetensors", raw(b'{"a\xff":' + ok_entry.encode() + b"}", one))
    write("header-not-object.safetensors", raw("[1,2,3]", b""))
    write("bad-json.safetensors", raw('{"a":%s,}' % ok_entry, one))
    write("duplicate-tensor-name.safetensors", raw('{"a":%s,"a":{"dtype":"F32","shape":[1],"data_offsets":[4,8]}}' % ok_entry, one + one))
    write("tensor-entry-not-object.safetensors", raw('{"a":[1,2]}', b""))
    write("unknown-dtype.safetensors", raw('{"a":{"dtype":"float32","shape":[1],"data_offsets":[0,4]}}', one))
    write("dtype-size-mismatch.safetensors", raw('{"a":{"dtype":"F64","shape":[2],"data_offsets":[0,8]}}', one + one))
    write("unknown-tensor-key.safetensors", raw('{"a":{"dtype":"F32","shape":[1],"offsets":[0,4]}}', one))
    write("missing-shape.safetensors", raw('{"a":{"dtype":"F32","data_offsets":[0,4]}}', one))
    write("negative-offset.safetensors", raw('{"a":{"dtype":"F32","shape":[1],"data_offsets":[-4,0]}}', one))
    write("offset-not-integer.safetensors", raw('{"a":{"dtype":"F32","shape":[1],"data_offsets":[0,4.0]}}', one))
    write("offset-too-large.safetensors", raw('{"a":{"dtype":"F32","shape":[1],"data_offsets":[0,18446744073709551616]}}', one))
    write("shape-overflow.safetensors", raw('{"a":{"dtype":"F32","shape":[4294967296,4294967296,4],"data_offsets":[0,4]}}', one))
    write("offsets-end-before-begin.safetensors", raw('{"a":{"dtype":"F32","shape":[0],"data_offsets":[4,0]}}', one))
    four = pack("F32", [1.0, 2.0, 3.0, 4.0])
    write("overlapping-offsets.safetensors", raw(
        '{"a":{"dtype":"F32","shape":[4],"data_offsets":[0,16]},"b":{"dtype":"F32","shape":[4],"data_offsets":[8,24]}}',
        four + four[:8]))
    write("gap-in-buffer.safetensors", raw(
        '{"a":{"dtype":"F32","shape":[4],"data_offsets":[0,16]},"b":{"dtype":"F32","shape":[4],"data_offsets":[20,36]}}',
        four + b"\x00" * 4 + four))
    write("trailing-bytes-after-tensors.safetensors", raw('{"a":{"dtype":"F32","shape":[4],"data_offsets":[0,16]}}', four + b"\x00" * 4))
    write("truncated-data.safetensors", canonical(FILM, {"note": NOTE})[:-12])
    write("metadata-value-not-string.safetensors", raw('{"__metadata__":{"gamma":1},"a":%s}' % ok_entry, one))
    write("metadata-not-object.safetensors", raw('{"__metadata__":["residual"],"a":%s}' % ok_entry, one))

    # ---- well-formed files that are not valid FiLM generators --------------------------------
    write("film-missing-beta-bias.safetensors", canonical(film_variant(drop=["film.1.beta.bias"])))
    write("film-layer-gap.safetensors", canonical(film_variant(
        drop=[k for k in FILM if k.startswith("film.1.")],
        add={k.replace("film.1.", "film.2."): v for k, v in FILM.items() if k.startswith("film.1.")})))
    write("film-gamma-bias-wrong-shape.safetensors", canonical(film_variant(replace={"film.0.gamma.bias": ("F32", [2], [1, 0])})))
    write("film-weight-embedding-width-5.safetensors", canonical({
        "film.0.gamma.weight": ("F32", [3, 5], [0.0] * 15),
        "film.0.gamma.bias": ("F32", [3], [1, 1, 1]),
        "film.0.beta.weight": ("F32", [3, 5], [0.0] * 15),
        "film.0.beta.bias": ("F32", [3], [0, 0, 0]),
    }))
    write("film-f16-weights.safetensors", canonical(film_variant(replace={"film.0.gamma.weight": ("F16", [3, 4], FILM["film.0.gamma.weight"][2])})))
    write("film-unknown-gamma-metadata.safetensors", canonical(FILM, {"gamma": "Residual"}))
    write("film-misspelt-tensor-name.safetensors", canonical(film_variant(add={"film.0.gamma.weights": ("F32", [1], [0.0])})))
    write("film-no-film-tensors.safetensors", canonical({"decoder.0.weight": ("F32", [2, 2], [1, 0, 0, 1])}))
    write("film-nan-weight.safetensors", canonical(film_variant(replace={"film.1.beta.weight": ("F32", [3, 4], [0.5, 0.5, float("nan"), 0.5] + [0.0] * 8)})))

    # SHA-256 of every fixture, in `sha256sum -c` format: an independent check of the hashes the
    # C# code reports (FilmGenerator.Sha256).
    lines = []
    for path in sorted(HERE.glob("*.safetensors")):
        lines.append("%s  %s\n" % (hashlib.sha256(path.read_bytes()).hexdigest(), path.name))
    (HERE / "SHA256SUMS").write_text("".join(lines))


if __name__ == "__main__":
    main()
