#!/usr/bin/python3
"""Writes the TIFF container conformance corpus and expected.json (run with Debian's /usr/bin/python3:
tifffile 2023.2.3, numpy; libtiff-tools 4.5 for tiffcp).

    /usr/bin/python3 tests/ShapeNoise.Imaging.Tests/Reading/Corpus/container/make_corpus.py

Valid files are written by tifffile (TiffWriter.write / imwrite; layouts as documented in tifffile's docstrings:
`compression`, `predictor`, `tile`, `bigtiff`, `byteorder`, `rowsperstrip`, `planarconfig`) or converted by libtiff's
tiffcp (man tiffcp: `-r` rows per strip, `-c lzw:2` LZW with horizontal predictor, `-c packbits`, `-t` tiles,
`-c jpeg`, `-c zstd`). For every valid file the expectation is computed here from the numpy array that was written:
shape, sum, SHA-256 of the values as little-endian uint32 (ids above 2^31 - 1 by their unsigned value) and a few
pixels. Damaged files are derived from valid ones by truncation or by patching one IFD field at the byte position the
TIFF 6.0 specification (section 2, "Image File Directory") and the BigTIFF specification (Aware Systems) give for it;
their expectation is a refusal whose message contains a keyword.
"""
import hashlib
import json
import os
import shutil
import struct
import subprocess
import sys

import numpy as np
import tifffile

HERE = os.path.dirname(os.path.abspath(__file__))
H, W = 24, 32
expected = {}


def labels(pages, ids, dtype):
    """Label pages: 8x8 px blocks numbered from `ids` (0 = background), shifted by one block per page."""
    out = np.zeros((pages, H, W), dtype=dtype)
    cols = W // 8
    for p in range(pages):
        for r in range(H // 8):
            for c in range(cols):
                out[p, r * 8:(r + 1) * 8, c * 8:(c + 1) * 8] = ids[(r * cols + c + p) % len(ids)]
        out[p, 3, 5] = ids[-1]  # one odd pixel per page so the pages differ inside a block too
    return out


def record_decode(name, arr, source):
    a = np.asarray(arr)
    if a.ndim == 2:
        a = a[None]
    u32 = a.astype(np.int64).astype(np.uint32).astype('<u4')
    picks = [(0, 0, 0), (0, 3, 5), (a.shape[0] - 1, H - 1, W - 1), (a.shape[0] - 1, 12, 20)]
    expected[name] = {
        'outcome': 'decode', 'source': source, 'shape': list(a.shape), 'sum': int(a.astype(object).sum()),
        'sha256_u32le': hashlib.sha256(u32.tobytes()).hexdigest(),
        'pixels': [[p, y, x, int(a[p, y, x])] for p, y, x in picks],
    }


def record_refuse(name, keyword, source):
    expected[name] = {'outcome': 'refuse', 'source': source, 'problem': keyword}


def path(name):
    return os.path.join(HERE, name)


def tiffcp(args, src, dst):
    subprocess.run(['tiffcp', *args, path(src), path(dst)], check=True)


# ---- the IFD patcher: TIFF 6.0 section 2 (classic), BigTIFF specification (Aware Systems) -------------------------
def ifd_entries(data, page=0):
    """(entry_offset, tag, type, count, value_field_offset) for the entries of IFD `page`, plus the BigTIFF flag."""
    bo = '<' if data[:2] == b'II' else '>'
    big = struct.unpack(bo + 'H', data[2:4])[0] == 43
    ifd = struct.unpack(bo + 'Q', data[8:16])[0] if big else struct.unpack(bo + 'I', data[4:8])[0]
    for _ in range(page + 1):
        if big:
            n = struct.unpack(bo + 'Q', data[ifd:ifd + 8])[0]; start, size, nxt = ifd + 8, 20, 'Q'
        else:
            n = struct.unpack(bo + 'H', data[ifd:ifd + 2])[0]; start, size, nxt = ifd + 2, 12, 'I'
        entries = []
        for i in range(n):
            e = start + i * size
            tag, typ = struct.unpack(bo + 'HH', data[e:e + 4])
            count = struct.unpack(bo + ('Q' if big else 'I'), data[e + 4:e + (12 if big else 8)])[0]
            entries.append((e, tag, typ, count, e + (12 if big else 8)))
        this = ifd
        ifd = struct.unpack(bo + nxt, data[start + n * size:start + n * size + (8 if big else 4)])[0]
    return bo, big, this, entries


def patch_value(data, tag, value, page=0):
    """Overwrites the (inline) value of `tag` in IFD `page`, keeping its type (SHORT, LONG or LONG8)."""
    bo, big, _, entries = ifd_entries(data, page)
    for e, t, typ, count, v in entries:
        if t == tag:
            fmt = {3: 'H', 4: 'I', 16: 'Q'}[typ]
            struct.pack_into(bo + fmt, data, v, value)
            return
    raise KeyError(tag)


def patch_raw(data, offset, fmt, value):
    struct.pack_into(fmt, data, offset, value)


def derive(src, dst, edit):
    data = bytearray(open(path(src), 'rb').read())
    data = edit(data) or data
    open(path(dst), 'wb').write(bytes(data))


def write(name, arr, source, **kw):
    kw.setdefault('metadata', None)
    kw.setdefault('photometric', 'minisblack')  # else tifffile takes a leading axis of 3 for RGB planes
    tifffile.imwrite(path(name), arr, **kw)
    back = tifffile.imread(path(name))
    assert np.array_equal(back.reshape(arr.shape), arr), name  # tifffile reads back what it wrote
    record_decode(name, arr, source)


def main():
    for f in os.listdir(HERE):
        if f.endswith('.tif'):
            os.remove(path(f))

    ids16 = [0, 1, 7, 300, 65535, 12, 0, 4000, 2, 9, 0, 513]
    u16 = labels(3, ids16, np.uint16)
    write('uint16_pages.tif', u16, "tifffile imwrite(uint16 (3,24,32), metadata=None): 3 pages, 1 strip each, no compression")
    write('uint16_shaped.tif', u16, "tifffile imwrite(uint16 (3,24,32)) with its default JSON shape description", metadata={})
    write('uint8.tif', labels(2, [0, 1, 2, 255, 17, 0, 99], np.uint8), "tifffile imwrite(uint8 (2,24,32))")
    write('int16.tif', labels(2, [0, 1, 2, 32767, 17], np.int16), "tifffile imwrite(int16 (2,24,32)), SampleFormat 2")
    ids32 = [0, 1, 3_000_000_000, 4_294_967_295, 2_147_483_647, 2_147_483_648, 5]
    write('uint32_above_2p31.tif', labels(2, ids32, np.uint32), "tifffile imwrite(uint32 (2,24,32)) with ids 2^31 and 2^32-1")
    write('int32.tif', labels(2, [0, 1, 2_147_483_647, 70000], np.int32), "tifffile imwrite(int32 (2,24,32))")
    ids64 = [0, 1, 4_294_967_295, 3_000_000_000, 42]
    write('int64_fits.tif', labels(2, ids64, np.int64), "tifffile imwrite(int64 (2,24,32)), BitsPerSample 64, SampleFormat 2; max 2^32-1")
    write('uint64_fits.tif', labels(2, ids64, np.uint64), "tifffile imwrite(uint64 (2,24,32)), BitsPerSample 64, SampleFormat 1")
    write('int64_deflate_pred2.tif', labels(2, ids64, np.int64), "tifffile imwrite(int64, compression='zlib', predictor=2)",
          compression='zlib', predictor=2)
    write('bigtiff.tif', u16, "tifffile imwrite(uint16 (3,24,32), bigtiff=True)", bigtiff=True)
    write('tiled.tif', u16, "tifffile imwrite(uint16 (3,24,32), tile=(16,16)): 2x2 tiles, the lower ones cut by the page edge",
          tile=(16, 16))
    write('deflate_pred2.tif', u16, "tifffile imwrite(uint16, compression='zlib', predictor=2)", compression='zlib', predictor=2)
    write('deflate_uint32_pred2.tif', labels(2, ids32, np.uint32), "tifffile imwrite(uint32, compression='zlib', predictor=2)",
          compression='zlib', predictor=2)
    write('bigendian.tif', u16, "tifffile imwrite(uint16, byteorder='>')", byteorder='>')
    write('bigendian_deflate_pred2.tif', u16, "tifffile imwrite(uint16, byteorder='>', compression='zlib', predictor=2)",
          byteorder='>', compression='zlib', predictor=2)
    write('bigtiff_bigendian_strips.tif', u16, "tifffile imwrite(uint16, bigtiff=True, byteorder='>', rowsperstrip=5)",
          bigtiff=True, byteorder='>', rowsperstrip=5)
    write('rowsperstrip5.tif', u16, "tifffile imwrite(uint16, rowsperstrip=5): 5 strips, the last of 4 rows", rowsperstrip=5)

    # libtiff's tiffcp (man tiffcp): other writers of the same layouts
    for dst, args, what in [('tiffcp_rows1.tif', ['-r', '1'], 'strips of 1 row'),
                            ('tiffcp_lzw_pred2.tif', ['-c', 'lzw:2'], 'LZW with horizontal predictor'),
                            ('tiffcp_lzw.tif', ['-c', 'lzw'], 'LZW without predictor'),
                            ('tiffcp_packbits.tif', ['-c', 'packbits'], 'PackBits'),
                            ('tiffcp_zip_pred2.tif', ['-c', 'zip:2'], 'Deflate with horizontal predictor'),
                            ('tiffcp_tiled.tif', ['-t', '-w', '48', '-l', '32'], '48x32 tiles, one tile larger than the page'),
                            ('tiffcp_tiled16_lzw.tif', ['-t', '-w', '16', '-l', '16', '-c', 'lzw:2'], '16x16 tiles, LZW, predictor 2'),
                            ('tiffcp_bigendian_lzw.tif', ['-B', '-c', 'lzw:2'], 'big-endian, LZW with predictor')]:
        tiffcp(args, 'uint16_pages.tif', dst)
        record_decode(dst, u16, f"tiffcp {' '.join(args)} uint16_pages.tif ({what})")
    tiffcp(['-c', 'lzw:2'], 'uint8.tif', 'tiffcp_uint8_lzw_pred2.tif')
    record_decode('tiffcp_uint8_lzw_pred2.tif', labels(2, [0, 1, 2, 255, 17, 0, 99], np.uint8), "tiffcp -c lzw:2 uint8.tif")

    # ---- refused: sample types and compressions ---------------------------------------------------------------
    too_big = labels(2, [0, 1, 4_294_967_296, 3], np.int64)
    tifffile.imwrite(path('int64_too_big.tif'), too_big, metadata=None, photometric='minisblack')
    record_refuse('int64_too_big.tif', 'does not fit in 32 bits', "tifffile imwrite(int64) with a label 2^32")
    tifffile.imwrite(path('int16_negative.tif'), labels(2, [0, 1, -5, 3], np.int16), metadata=None, photometric='minisblack')
    record_refuse('int16_negative.tif', 'negative', "tifffile imwrite(int16) with a label -5")
    tifffile.imwrite(path('float32.tif'), labels(2, [0, 1, 2], np.float32), metadata=None, photometric='minisblack')
    record_refuse('float32.tif', 'floating-point', "tifffile imwrite(float32), SampleFormat 3")
    tiffcp(['-c', 'lzw:3'], 'float32.tif', 'float32_pred3.tif')
    record_refuse('float32_pred3.tif', 'floating-point', "tiffcp -c lzw:3 float32.tif (floating-point predictor)")
    derive('deflate_pred2.tif', 'uint16_pred3_patched.tif', lambda d: patch_value(d, 317, 3))
    record_refuse('uint16_pred3_patched.tif', 'floating-point predictor', "deflate_pred2.tif with Predictor (317) patched to 3")
    tifffile.imwrite(path('lzma.tif'), u16, metadata=None, photometric='minisblack', compression='lzma')
    record_refuse('lzma.tif', 'LZMA (34925)', "tifffile imwrite(compression='lzma')")
    tiffcp(['-c', 'zstd'], 'uint8.tif', 'tiffcp_zstd.tif')
    record_refuse('tiffcp_zstd.tif', 'ZSTD (50000)', "tiffcp -c zstd uint8.tif")
    tiffcp(['-c', 'jpeg'], 'uint8.tif', 'tiffcp_jpeg.tif')
    record_refuse('tiffcp_jpeg.tif', 'JPEG (7)', "tiffcp -c jpeg uint8.tif (8-bit grey JPEG)")
    derive('uint16_pages.tif', 'oldjpeg_patched.tif', lambda d: patch_value(d, 259, 6))
    record_refuse('oldjpeg_patched.tif', 'old-style JPEG (6)', "uint16_pages.tif with Compression (259) patched to 6")
    derive('uint16_pages.tif', 'ccitt_patched.tif', lambda d: patch_value(d, 259, 4))
    record_refuse('ccitt_patched.tif', 'CCITT', "uint16_pages.tif with Compression (259) patched to 4 (CCITT T.6)")
    rgb = np.zeros((H, W, 3), np.uint8); rgb[..., 0] = 5
    tifffile.imwrite(path('rgb.tif'), rgb, metadata=None, photometric='rgb')
    record_refuse('rgb.tif', 'colour', "tifffile imwrite(uint8 (24,32,3), photometric='rgb')")
    tifffile.imwrite(path('rgb_planar.tif'), np.moveaxis(rgb, -1, 0).copy(), metadata=None, photometric='rgb', planarconfig='separate')
    record_refuse('rgb_planar.tif', 'colour', "tifffile imwrite(uint8 (3,24,32), photometric='rgb', planarconfig='separate')")

    # ---- damaged containers ------------------------------------------------------------------------------------
    data = open(path('uint16_pages.tif'), 'rb').read()
    _, _, ifd2, _ = ifd_entries(bytearray(data), 1)
    _, _, ifd3, e3 = ifd_entries(bytearray(data), 2)
    so = [v for e, t, typ, c, v in e3 if t == 273][0]
    off3 = struct.unpack('<I', data[so:so + 4])[0]
    # tifffile writes page 1's IFD, then the three pages' strips back to back, then the IFDs of pages 2 and 3
    open(path('truncated_after_page1.tif'), 'wb').write(data[:off3 + 700])   # cut inside page 3's strip
    record_refuse('truncated_after_page1.tif', 'truncated', "uint16_pages.tif cut in the middle of page 3's strip (pages 2-3 IFDs lost)")
    one = u16[0]
    tifffile.imwrite(path('one_page.tmp'), one, metadata=None, photometric='minisblack')
    d1 = open(path('one_page.tmp'), 'rb').read(); os.remove(path('one_page.tmp'))
    open(path('truncated_pixels.tif'), 'wb').write(d1[:len(d1) - 700])    # IFD intact, its strip cut short
    record_refuse('truncated_pixels.tif', 'truncated', "tifffile imwrite(uint16 (24,32)) cut 700 bytes before the end of its strip")

    def deflate_cut(d):
        bo, big, _, entries = ifd_entries(d, 0)
        v = [v for e, t, typ, c, v in entries if t == 279][0]
        struct.pack_into(bo + 'I', d, v, struct.unpack(bo + 'I', d[v:v + 4])[0] // 2)
    derive('deflate_pred2.tif', 'deflate_stream_cut.tif', deflate_cut)
    record_refuse('deflate_stream_cut.tif', 'truncated', "deflate_pred2.tif with page 1's StripByteCounts halved (the zlib stream ends early)")
    open(path('truncated_ifd.tif'), 'wb').write(data[:ifd2 + 30])       # page 2 directory cut after 2 entries
    record_refuse('truncated_ifd.tif', 'truncated', "uint16_pages.tif cut inside page 2's IFD")
    derive('uint16_pages.tif', 'rowsperstrip0.tif', lambda d: patch_value(d, 278, 0))
    record_refuse('rowsperstrip0.tif', 'RowsPerStrip', "uint16_pages.tif with RowsPerStrip (278) patched to 0")

    def huge(name, w, h, keyword, compression=1):
        # A hand-built one-page classic TIFF (TIFF 6.0 section 2): 8 LONG/SHORT entries, one 2000-byte strip.
        n = 9
        ifd = 8
        strip = ifd + 2 + n * 12 + 4
        ents = [(256, 4, 1, w), (257, 4, 1, h), (258, 3, 1, 16), (259, 3, 1, compression), (262, 3, 1, 1),
                (273, 4, 1, strip), (277, 3, 1, 1), (278, 4, 1, h), (279, 4, 1, 2000)]
        b = bytearray(b'II*\x00' + struct.pack('<I', ifd) + struct.pack('<H', n))
        for tag, typ, cnt, val in ents:
            b += struct.pack('<HHI', tag, typ, cnt) + (struct.pack('<HH', val, 0) if typ == 3 else struct.pack('<I', val))
        b += struct.pack('<I', 0) + bytes(2000)
        open(path(name), 'wb').write(bytes(b))
        record_refuse(name, keyword, f"hand-built TIFF claiming {w}x{h} uint16 px with one 2000-byte strip (compression {compression})")

    huge('claims_100000x100000.tif', 100000, 100000, 'too large')
    huge('claims_50000x50000.tif', 50000, 50000, 'too large')
    huge('claims_20000x20000.tif', 20000, 20000, 'do not cover')
    huge('claims_20000x20000_deflate.tif', 20000, 20000, 'do not cover', compression=8)

    def bigtiff_strip_beyond(d):
        bo, big, _, entries = ifd_entries(d, 0)
        v = [v for e, t, typ, c, v in entries if t == 273][0]
        struct.pack_into(bo + 'Q', d, v, len(d) + 1_000_000)
    derive('bigtiff.tif', 'bigtiff_strip_beyond_end.tif', bigtiff_strip_beyond)
    record_refuse('bigtiff_strip_beyond_end.tif', 'beyond the end', "bigtiff.tif with page 1's StripOffsets patched past the file end")
    derive('bigtiff.tif', 'bigtiff_ifd_offset_huge.tif', lambda d: patch_raw(d, 8, '<Q', 0xFFFF_FFFF_FFFF_FF00))
    record_refuse('bigtiff_ifd_offset_huge.tif', 'beyond the end', "bigtiff.tif with the first-IFD offset (bytes 8-15) patched to 2^64-256")

    def bigtiff_count_huge(d):
        _, _, ifd, _ = ifd_entries(d, 0)
        struct.pack_into('<Q', d, ifd, 1 << 40)
    derive('bigtiff.tif', 'bigtiff_entry_count_huge.tif', bigtiff_count_huge)
    record_refuse('bigtiff_entry_count_huge.tif', 'entries', "bigtiff.tif with page 1's entry count patched to 2^40")

    def bigtiff_tagcount_huge(d):
        bo, big, _, entries = ifd_entries(d, 0)
        e = [e for e, t, typ, c, v in entries if t == 273][0]
        struct.pack_into(bo + 'Q', d, e + 4, 1 << 62)
    derive('bigtiff.tif', 'bigtiff_tag_count_huge.tif', bigtiff_tagcount_huge)
    record_refuse('bigtiff_tag_count_huge.tif', 'values', "bigtiff.tif with StripOffsets' value count patched to 2^62")

    def tag_data_beyond(d):
        # rowsperstrip5.tif keeps its 5 StripOffsets out of line; point them past the end
        bo, big, _, entries = ifd_entries(d, 0)
        v = [v for e, t, typ, c, v in entries if t == 273][0]
        struct.pack_into(bo + 'I', d, v, len(d) + 10)
    derive('rowsperstrip5.tif', 'tag_data_beyond_end.tif', tag_data_beyond)
    record_refuse('tag_data_beyond_end.tif', 'beyond the end', "rowsperstrip5.tif with the StripOffsets array offset patched past the file end")

    def strip_count_huge(d):
        bo, big, _, entries = ifd_entries(d, 0)
        v = [v for e, t, typ, c, v in entries if t == 279][0]
        struct.pack_into(bo + 'I', d, v, 0xFFFF_FFF0)
    derive('uint16_pages.tif', 'stripbytecount_huge.tif', strip_count_huge)
    record_refuse('stripbytecount_huge.tif', 'beyond the end', "uint16_pages.tif with page 1's StripByteCounts patched to 2^32-16")

    def strips_missing(d):
        # rowsperstrip5.tif: claim 2 strips instead of 5 (count fields of StripOffsets and StripByteCounts)
        bo, big, _, entries = ifd_entries(d, 0)
        for e, t, typ, c, v in entries:
            if t in (273, 279):
                struct.pack_into(bo + 'I', d, e + 4, 2)
    derive('rowsperstrip5.tif', 'strips_do_not_cover.tif', strips_missing)
    record_refuse('strips_do_not_cover.tif', 'do not cover', "rowsperstrip5.tif with 2 of its 5 strips listed")

    with open(path('expected.json'), 'w') as f:
        f.write('{\n' + ',\n'.join(f' {json.dumps(k)}: {json.dumps(v)}' for k, v in sorted(expected.items())) + '\n}\n')
    write_readme()
    print(f"{len(expected)} files, {sum(os.path.getsize(path(k)) for k in expected)} bytes")


README_HEAD = """# TIFF container conformance corpus

Small label files (32 x 24 px, 1-3 pages) that `TiffContainerTests` decodes, and damaged or unsupported files it must
refuse with an `InputException` (exit 2) whose message names the file and contains the keyword below. Everything here
is written by `make_corpus.py` (run it with Debian's `/usr/bin/python3`: tifffile 2023.2.3, numpy; libtiff-tools 4.5
for `tiffcp`); this README and `expected.json` are written by the same run.

Sources of the expectations:
- valid files: the numpy array handed to tifffile (which read each file back equal), in the layout tifffile's
  `TiffWriter.write` docstring documents for the arguments given (`compression`, `predictor`, `tile`, `bigtiff`,
  `byteorder`, `rowsperstrip`, `planarconfig`), or converted by `tiffcp` with the options of its man page (`-r` rows per
  strip, `-c lzw:2` LZW with horizontal predictor, `-c zip:2`, `-c packbits`, `-t -w -l` tiles, `-B` big-endian).
  `expected.json` gives the shape (pages, rows, columns), the sum of the labels, the SHA-256 of all labels as
  little-endian uint32 (so ids above 2^31 - 1 count by their unsigned value) and four pixels.
- damaged files: one field patched at the byte position of the TIFF 6.0 specification (Adobe 1992, section 2, "Image
  File Directory": 12-byte entries tag, type, count, value/offset) or the BigTIFF specification (Aware Systems: 8-byte
  header offset at byte 8, 8-byte entry counts, 20-byte entries), or the file cut short.

| file | made by | expected |
| --- | --- | --- |
"""


def write_readme():
    rows = []
    for k, v in sorted(expected.items()):
        out = (f"decodes: {v['shape'][0]} pages, sum {v['sum']}" if v['outcome'] == 'decode'
               else f"exit 2, message contains `{v['problem']}`")
        rows.append(f"| `{k}` | {v['source'].replace('|', '/')} | {out} |")
    with open(path('README.md'), 'w') as f:
        f.write(README_HEAD + '\n'.join(rows) + '\n')


if __name__ == '__main__':
    if shutil.which('tiffcp') is None:
        sys.exit('tiffcp (libtiff-tools) is needed')
    main()
