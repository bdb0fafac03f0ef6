#!/usr/bin/python3
"""Label PNG frames written by PIL 9.4 (Debian's /usr/bin/python3), and expected.json with their pixels.

    /usr/bin/python3 tests/ShapeNoise.Imaging.Tests/Reading/Corpus/png/make_png.py

- palette_identity_*.png: Image.fromarray(uint8 labels, mode='P'). PIL gives a new 'P' image its default palette,
  which it writes as a 256-entry PLTE with entry i = (i, i, i) (checked below from the written chunk), so the palette
  index is the label.
- palette_quantized.png: Image.fromarray(labels, mode='L').quantize(): PIL reorders the palette (entry 0 is not
  (0, 0, 0)), so the index is not the grey value: a colour-mapped image, to be refused.
- grey16_*.png: Image.fromarray(uint16 labels) (mode 'I;16'), written as 16-bit greyscale (colour type 0).
"""
import json
import os
import struct

import numpy as np
from PIL import Image

HERE = os.path.dirname(os.path.abspath(__file__))
H, W = 24, 32


def chunks(fn):
    d = open(fn, 'rb').read()
    i, out = 8, {}
    while i < len(d):
        n = struct.unpack('>I', d[i:i + 4])[0]
        out.setdefault(d[i + 4:i + 8].decode(), d[i + 8:i + 8 + n])
        i += 12 + n
    return out


def frame(t, ids):
    a = np.zeros((H, W), dtype=np.int64)
    for r in range(H // 8):
        for c in range(W // 8):
            a[r * 8:(r + 1) * 8, c * 8:(c + 1) * 8] = ids[(r * 4 + c + t) % len(ids)]
    return a


expected = {}
for f in os.listdir(HERE):
    if f.endswith('.png'):
        os.remove(os.path.join(HERE, f))
for t in range(2):
    a = frame(t, [0, 1, 2, 200, 255, 7, 0, 9]).astype(np.uint8)
    fn = f'palette_identity_{t}.png'
    Image.fromarray(a, mode='P').save(os.path.join(HERE, fn))
    c = chunks(os.path.join(HERE, fn))
    assert c['IHDR'][9] == 3 and c['PLTE'] == bytes(v for i in range(256) for v in (i, i, i)), 'PIL palette not the identity'
    expected[fn] = {'sum': int(a.sum()), 'pixels': [[0, 0, int(a[0, 0])], [12, 20, int(a[12, 20])], [23, 31, int(a[23, 31])]]}
    b = frame(t, [0, 1, 300, 65535, 4000, 7]).astype(np.uint16)
    fn = f'grey16_{t}.png'
    Image.fromarray(b).save(os.path.join(HERE, fn))
    c = chunks(os.path.join(HERE, fn))
    assert c['IHDR'][8] == 16 and c['IHDR'][9] == 0
    expected[fn] = {'sum': int(b.sum()), 'pixels': [[0, 0, int(b[0, 0])], [12, 20, int(b[12, 20])], [23, 31, int(b[23, 31])]]}
q = Image.fromarray(frame(0, [0, 1, 2, 200]).astype(np.uint8), mode='L').quantize()
q.save(os.path.join(HERE, 'palette_quantized.png'))
c = chunks(os.path.join(HERE, 'palette_quantized.png'))
assert c['IHDR'][9] == 3 and c['PLTE'][:3] != b'\0\0\0'
expected['palette_quantized.png'] = {'refuse': 'colour'}
with open(os.path.join(HERE, 'expected.json'), 'w') as f:
    json.dump(expected, f, indent=1, sort_keys=True)
print(len(expected), 'files')
