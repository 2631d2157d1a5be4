#!/usr/bin/python3
"""Writes tests/fixtures/fits/astropy-fixed-width.rmf with astropy.io.fits (Debian python3-astropy):
an RMF laid out as other tools do it, not as Kiln writes it. Invented test values.

- extension named 'SPECRESP MATRIX' (HDUCLAS3 FULL), fixed-width F_CHAN/N_CHAN (2J) and MATRIX
  (8E) columns, padded with zeros past N_GRP groups / the row's elements;
- no TLMIN on F_CHAN (OGIP default first channel 1 applies);
- EBOUNDS with D columns; checksums written by astropy.

Run: /usr/bin/python3 scripts/make-astropy-rmf-fits.py [OUT]
"""
import sys
import numpy as np
from astropy.io import fits

out = sys.argv[1] if len(sys.argv) > 1 else 'tests/fixtures/fits/astropy-fixed-width.rmf'
detchans = 8
n_e = 5
energ_lo = np.array([1.0, 1.5, 2.0, 2.5, 3.0], dtype='>f4')
energ_hi = energ_lo + np.float32(0.5)
n_grp = np.array([1, 2, 0, 1, 2], dtype='>i2')
f_chan = np.array([[1, 0], [2, 6], [0, 0], [3, 0], [1, 7]], dtype='>i4')
n_chan = np.array([[3, 0], [2, 2], [0, 0], [4, 0], [1, 2]], dtype='>i4')
matrix = np.zeros((n_e, 8), dtype='>f4')
matrix[0, :3] = [0.25, 0.5, 0.25]
matrix[1, :4] = [0.1, 0.2, 0.3, 0.4]
matrix[3, :4] = [0.125, 0.375, 0.375, 0.125]
matrix[4, :3] = [0.5, 0.25, 0.25]

cols = fits.ColDefs([
    fits.Column(name='ENERG_LO', format='E', unit='keV', array=energ_lo),
    fits.Column(name='ENERG_HI', format='E', unit='keV', array=energ_hi),
    fits.Column(name='N_GRP', format='I', array=n_grp),
    fits.Column(name='F_CHAN', format='2J', array=f_chan),
    fits.Column(name='N_CHAN', format='2J', array=n_chan),
    fits.Column(name='MATRIX', format='8E', array=matrix),
])
m = fits.BinTableHDU.from_columns(cols, name='SPECRESP MATRIX')
for k, v in [('TELESCOP', 'TESTSAT'), ('INSTRUME', 'TESTCAM'), ('FILTER', 'NONE'), ('CHANTYPE', 'PI'),
             ('DETCHANS', detchans), ('HDUCLASS', 'OGIP'), ('HDUCLAS1', 'RESPONSE'), ('HDUCLAS2', 'RSP_MATRIX'),
             ('HDUCLAS3', 'FULL'), ('HDUVERS', '1.3.0'), ('LO_THRES', 1e-6)]:
    m.header[k] = v
e = fits.BinTableHDU.from_columns([
    fits.Column(name='CHANNEL', format='J', array=np.arange(1, detchans + 1, dtype='>i4')),
    fits.Column(name='E_MIN', format='D', unit='keV', array=np.arange(detchans) * 0.5),
    fits.Column(name='E_MAX', format='D', unit='keV', array=np.arange(1, detchans + 1) * 0.5),
], name='EBOUNDS')
for k, v in [('TELESCOP', 'TESTSAT'), ('INSTRUME', 'TESTCAM'), ('CHANTYPE', 'PI'), ('DETCHANS', detchans),
             ('HDUCLASS', 'OGIP'), ('HDUCLAS1', 'RESPONSE'), ('HDUCLAS2', 'EBOUNDS')]:
    e.header[k] = v
fits.HDUList([fits.PrimaryHDU(), m, e]).writeto(out, overwrite=True, checksum=True)
