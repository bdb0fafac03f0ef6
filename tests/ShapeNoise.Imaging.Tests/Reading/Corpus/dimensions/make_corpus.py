#!/usr/bin/python3
"""Writes the dimensions conformance corpus with Python tifffile (Debian's /usr/bin/python3, tifffile 2023.2.3) and
expected.json, each file's expected outcome. Run from this folder: /usr/bin/python3 make_corpus.py

Every plane (series s, time t, z, channel c) holds distinct rectangles, so a wrong plane choice changes the pixel sums:
rectangle A, label 1 + c + 10 z + 100 s + 1000 t, at x = 4 + t .. 4 + t + w (w = 8 + 2 c + 4 s), y = 4 .. 4 + h (h = 6 + 2 z);
for c = 1 a second rectangle B, label A + 50, at x = 18 + t .. 26 + t, y = 12 .. 20.

Expected values come from the arrays handed to tifffile and from the writer's documented layout:
 - tifffile imwrite(imagej=True): "data shapes up to 6 dimensions in TZCYXS order" (tifffile docstring), i.e. ImageJ
   hyperstack pages with C fastest, then Z, then T; the header keys images/channels/slices/frames/finterval/unit.
 - tifffile imwrite(ome=True): OME-XML Pixels SizeT/SizeZ/SizeC, DimensionOrder from the axes, one TiffData per series
   (OME-TIFF specification, OME Data Model 2016-06 schema), several write() calls = several Image elements (series).
 - TIFF 6.0 XResolution/YResolution (px per ResolutionUnit; 3 = centimetre).
"""
import json
import numpy as np
import tifffile

W, H = 32, 24


def plane(t, z=0, c=0, s=0):
    a = np.zeros((H, W), np.uint16)
    w, h, lab = 8 + 2 * c + 4 * s, 6 + 2 * z, 1 + c + 10 * z + 100 * s + 1000 * t
    a[4:4 + h, 4 + t:4 + t + w] = lab
    if c == 1:
        a[12:20, 18 + t:26 + t] = lab + 50
    return a


def sums(frames):
    return [int(f.astype(np.int64).sum()) for f in frames]


expected = {}


def expect(name, **kw):
    expected[name] = kw


# 1. ImageJ hyperstack TZCYX, T=3 Z=1 C=2 (tifffile docstring: imagej=True, metadata={'axes': 'TZCYX'}).
T, Z, C = 3, 1, 2
a = np.stack([np.stack([np.stack([plane(t, z, c) for c in range(C)]) for z in range(Z)]) for t in range(T)])
tifffile.imwrite('ij_tzcyx_c2.tif', a, imagej=True, metadata={'axes': 'TZCYX'})
expect('ij_tzcyx_c2.tif', pages=6, refused_without='--channel',
       pick={'channel': 1}, frames=3, sums=sums([plane(t, 0, 1) for t in range(T)]),
       out_of_range={'channel': 2})

# 2. ImageJ hyperstack TZYX, T=3 Z=2.
T, Z = 3, 2
a = np.stack([np.stack([plane(t, z) for z in range(Z)]) for t in range(T)])
tifffile.imwrite('ij_tzyx_z2.tif', a, imagej=True, metadata={'axes': 'TZYX'})
expect('ij_tzyx_z2.tif', pages=6, refused_without='--z-plane',
       pick={'z': 1}, frames=3, sums=sums([plane(t, 1) for t in range(T)]), out_of_range={'z': 2})

# 3. ImageJ TYX with finterval (s) and unit um; XResolution 2 px/um -> 0.5 um/px; 30 s = 0.5 min.
T = 4
a = np.stack([plane(t) for t in range(T)])
tifffile.imwrite('ij_tyx_finterval.tif', a, imagej=True, resolution=(2.0, 2.0),
                 metadata={'axes': 'TYX', 'finterval': 30, 'unit': 'um'})
expect('ij_tyx_finterval.tif', pages=4, pick={}, frames=4, sums=sums(list(a)),
       pixel_size_um=0.5, pixel_size_source='ImageJ header', frame_interval_min=0.5, frame_interval_source='ImageJ header')

# 4. ImageJ plain stack: only slices (ImageJ calls the pages of a plain stack 'slices'): refused without --z-is-time.
a = np.stack([plane(t) for t in range(4)])
tifffile.imwrite('ij_plain_slices.tif', a, imagej=True, metadata={'axes': 'ZYX'})
expect('ij_plain_slices.tif', pages=4, refused_without='--z-is-time',
       pick={'z_is_time': True}, frames=4, sums=sums(list(a)))

# 5. ImageJ header whose images= does not match the page count (description written by hand): refused.
a = np.stack([plane(t) for t in range(3)])
tifffile.imwrite('ij_count_mismatch.tif', a, photometric='minisblack', metadata=None,
                 description='ImageJ=1.11a\nimages=5\nframes=5\n')
expect('ij_count_mismatch.tif', pages=3, refused_without='images=5')

# 6. ImageJ, non-square pixels: XResolution 2 px/um, YResolution 1/0.65 px/um -> 0.5 x 0.65 um.
a = np.stack([plane(t) for t in range(3)])
tifffile.imwrite('ij_nonsquare.tif', a, imagej=True, resolution=(2.0, 1 / 0.65), metadata={'axes': 'TYX', 'unit': 'um'})
expect('ij_nonsquare.tif', pages=3, pick={}, frames=3, native_sums=sums(list(a)),
       pixel_size_um=0.5, pixel_size_source='ImageJ header', resampled_width=32, resampled_height=31)

# 7. OME-TIFF TCYX, T=3 C=2 (tifffile writes DimensionOrder XYZCT).
T, C = 3, 2
a = np.stack([np.stack([plane(t, 0, c) for c in range(C)]) for t in range(T)])
tifffile.imwrite('ome_c2.tif', a, ome=True, metadata={'axes': 'TCYX'})
expect('ome_c2.tif', pages=6, refused_without='--channel',
       pick={'channel': 1}, frames=3, sums=sums([plane(t, 0, 1) for t in range(T)]), out_of_range={'channel': 5})

# 8. OME-TIFF TZYX, T=3 Z=2.
T, Z = 3, 2
a = np.stack([np.stack([plane(t, z) for z in range(Z)]) for t in range(T)])
tifffile.imwrite('ome_z2.tif', a, ome=True, metadata={'axes': 'TZYX'})
expect('ome_z2.tif', pages=6, refused_without='--z-plane',
       pick={'z': 0}, frames=3, sums=sums([plane(t, 0) for t in range(T)]))

# 9. OME-TIFF CTYX (DimensionOrder XYZTC: C slowest, so pages 0-2 are channel 0, pages 3-5 channel 1).
T, C = 3, 2
a = np.stack([np.stack([plane(t, 0, c) for t in range(T)]) for c in range(C)])
tifffile.imwrite('ome_ctyx.tif', a, ome=True, metadata={'axes': 'CTYX'})
expect('ome_ctyx.tif', pages=6, refused_without='--channel',
       pick={'channel': 1}, frames=3, sums=sums([plane(t, 0, 1) for t in range(T)]))

# 10. OME-TIFF with two series (two write() calls = two Image elements): 3 frames, then 2 frames.
s0 = np.stack([plane(t, 0, 0, 0) for t in range(3)])
s1 = np.stack([plane(t, 0, 0, 1) for t in range(2)])
with tifffile.TiffWriter('ome_two_series.tif', ome=True) as w:
    w.write(s0, metadata={'axes': 'TYX'})
    w.write(s1, metadata={'axes': 'TYX'})
expect('ome_two_series.tif', pages=5, refused_without='--series',
       pick={'series': 1}, frames=2, sums=sums(list(s1)), out_of_range={'series': 2})

# 11. OME-TIFF with PhysicalSizeX/Y in nm and TimeIncrement in s: 325 nm = 0.325 um, 90 s = 1.5 min.
a = np.stack([plane(t) for t in range(3)])
tifffile.imwrite('ome_nm_seconds.tif', a, ome=True,
                 metadata={'axes': 'TYX', 'PhysicalSizeX': 325, 'PhysicalSizeXUnit': 'nm', 'PhysicalSizeY': 325,
                           'PhysicalSizeYUnit': 'nm', 'TimeIncrement': 90, 'TimeIncrementUnit': 's'})
expect('ome_nm_seconds.tif', pages=3, pick={}, frames=3, sums=sums(list(a)),
       pixel_size_um=0.325, pixel_size_source='OME-XML', frame_interval_min=1.5, frame_interval_source='OME-XML')

# 12. OME-TIFF with non-square pixels: PhysicalSizeX 0.5 um, PhysicalSizeY 0.65 um -> height 24 * 1.3 = 31.2 -> 31 rows.
a = np.stack([plane(t) for t in range(3)])
tifffile.imwrite('ome_nonsquare.tif', a, ome=True, metadata={'axes': 'TYX', 'PhysicalSizeX': 0.5, 'PhysicalSizeY': 0.65})
expect('ome_nonsquare.tif', pages=3, pick={}, frames=3, native_sums=sums(list(a)),
       pixel_size_um=0.5, pixel_size_source='OME-XML', resampled_width=32, resampled_height=31)

# 13. Plain TIFF (no description) with X/YResolution per cm: 20000 px/cm = 0.5 um, 1e4/0.65 px/cm = 0.65 um.
a = np.stack([plane(t) for t in range(3)])
tifffile.imwrite('plain_res_cm.tif', a, photometric='minisblack', metadata=None,
                 resolution=(20000, 1e4 / 0.65), resolutionunit='CENTIMETER')
expect('plain_res_cm.tif', pages=3, pick={}, frames=3, native_sums=sums(list(a)),
       pixel_size_um=0.5, pixel_size_source='TIFF resolution tags', resampled_width=32, resampled_height=31)

# 14. tifffile shaped description of a 4-D array without axes names ({"shape": [3, 2, 24, 32]}): which axis is time
#     is unknown, so it is refused rather than read as 6 frames.
a = np.stack([np.stack([plane(t, z) for z in range(2)]) for t in range(3)])
tifffile.imwrite('tf_shape_4d.tif', a, photometric='minisblack')
expect('tf_shape_4d.tif', pages=6, refused_without='axes')

with open('expected.json', 'w') as f:
    json.dump(expected, f, indent=1, sort_keys=True)
    f.write('\n')
