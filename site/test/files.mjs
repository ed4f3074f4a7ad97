// Files made byte by byte for the page's fault tests: PNGs of any declared
// size, JPEGs with an Exif block of our own, and hostile variants. The
// layouts follow the published formats: PNG (ISO/IEC 15948:2004, 5.2-5.3,
// 11.2.2), JPEG (ITU-T T.81, B.1-B.2), Exif 2.32 (CIPA DC-008, 4.6) over
// TIFF 6.0 (section 2).

import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { WORK } from './helpers.mjs';

function chunk(type, data) {
  const out = Buffer.alloc(12 + data.length);
  out.writeUInt32BE(data.length, 0);
  out.write(type, 4, 'latin1');
  data.copy(out, 8);
  out.writeUInt32BE(zlib.crc32(out.subarray(4, 8 + data.length)), 8 + data.length);
  return out;
}

/**
 * png makes a grey PNG of w x h px (8 or 16 bit); pixel(x, y) gives a level
 * 0..1 (default: uniform mid grey). Rows are filtered with "none".
 * declared: the size written in IHDR, when it should lie.
 */
export function png(w, h, { bitDepth = 8, pixel = null, declared = null } = {}) {
  const bpp = bitDepth / 8;
  const stride = 1 + w * bpp;
  const raw = Buffer.alloc(stride * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const v = pixel ? pixel(x, y) : 0.5;
      if (bitDepth === 8) raw[y * stride + 1 + x] = Math.round(255 * v);
      else raw.writeUInt16BE(Math.round(65535 * v), y * stride + 1 + 2 * x);
    }
  }
  const [dw, dh] = declared || [w, h];
  return pngFile(dw, dh, bitDepth, zlib.deflateSync(raw));
}

function pngFile(w, h, bitDepth, idat) {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(w, 0);
  ihdr.writeUInt32BE(h, 4);
  ihdr[8] = bitDepth;
  ihdr[9] = 0; // grey
  return Buffer.concat([Buffer.from('\x89PNG\r\n\x1a\n', 'latin1'), chunk('IHDR', ihdr), chunk('IDAT', idat), chunk('IEND', Buffer.alloc(0))]);
}

/**
 * bigFlatPNG writes (once, under bin/test) a uniform grey PNG of w x h px: a
 * small file that decodes to many pixels.
 */
export function bigFlatPNG(name, w, h) {
  const file = path.join(WORK, name);
  if (fs.existsSync(file)) return file;
  const row = Buffer.alloc(1 + w, 128);
  row[0] = 0;
  const raw = Buffer.alloc(row.length * h);
  for (let y = 0; y < h; y++) row.copy(raw, y * row.length);
  fs.writeFileSync(file, pngFile(w, h, 8, zlib.deflateSync(raw, { level: 9 })));
  return file;
}

// ---------------------------------------------------------------- Exif

// ifd lays out one TIFF IFD (little-endian) at offset `at` of the TIFF
// block; entries: [tag, type, count, value Buffer|number]. Values over 4
// bytes go after the IFD. Returns the IFD bytes and their values.
function ifd(at, entries, next = 0) {
  const head = Buffer.alloc(2 + 12 * entries.length + 4);
  head.writeUInt16LE(entries.length, 0);
  const extra = [];
  let off = at + head.length;
  entries.forEach(([tag, type, count, value], i) => {
    const p = 2 + 12 * i;
    head.writeUInt16LE(tag, p);
    head.writeUInt16LE(type, p + 2);
    head.writeUInt32LE(count, p + 4);
    if (typeof value === 'number') head.writeUInt32LE(value, p + 8);
    else if (value.length <= 4) value.copy(head, p + 8);
    else {
      head.writeUInt32LE(off, p + 8);
      extra.push(value);
      off += value.length + (value.length & 1);
      if (value.length & 1) extra.push(Buffer.alloc(1));
    }
  });
  head.writeUInt32LE(next, 2 + 12 * entries.length);
  return Buffer.concat([head, ...extra]);
}

const ascii = (s) => Buffer.concat([Buffer.from(s, 'utf8'), Buffer.alloc(1)]);

/**
 * exifBlock builds an APP1 Exif payload: IFD0 with Make and Model and a
 * pointer to an Exif IFD holding LensModel (tag 0xA434). selfLoop makes the
 * Exif IFD pointer point at IFD0 itself.
 */
export function exifBlock({ make = 'Sagitta Test', model = 'Bench Camera', lens = 'Test Lens', selfLoop = false } = {}) {
  const mk = ascii(make);
  const md = ascii(model);
  // IFD0 at 8: three entries.
  const ifd0Size = 2 + 12 * 3 + 4;
  const ifd0Extra = (mk.length > 4 ? mk.length + (mk.length & 1) : 0) + (md.length > 4 ? md.length + (md.length & 1) : 0);
  const exifAt = selfLoop ? 8 : 8 + ifd0Size + ifd0Extra;
  const i0 = ifd(8, [[0x010f, 2, mk.length, mk], [0x0110, 2, md.length, md], [0x8769, 4, 1, exifAt]]);
  const lm = ascii(lens);
  const parts = [Buffer.from('II*\x00\x08\x00\x00\x00', 'latin1'), i0];
  if (!selfLoop) parts.push(ifd(8 + i0.length, [[0xa434, 2, lm.length, lm]]));
  return Buffer.concat([Buffer.from('Exif\x00\x00', 'latin1'), ...parts]);
}

/** withExif replaces a JPEG's APP1 segments with one holding payload. */
export function withExif(jpeg, payload) {
  const segs = [];
  let p = 2;
  while (p + 4 <= jpeg.length && jpeg[p] === 0xff && jpeg[p + 1] !== 0xda) {
    const len = jpeg.readUInt16BE(p + 2);
    if (jpeg[p + 1] !== 0xe1) segs.push(jpeg.subarray(p, p + 2 + len));
    p += 2 + len;
  }
  if (payload.length + 2 > 0xffff) throw new Error('Exif block too long for one APP1 segment');
  const app1 = Buffer.alloc(4);
  app1.writeUInt16BE(0xffe1, 0);
  app1.writeUInt16BE(payload.length + 2, 2);
  return Buffer.concat([jpeg.subarray(0, 2), app1, payload, ...segs, jpeg.subarray(p)]);
}

/** write saves bytes under bin/test and returns the path. */
export function write(name, bytes) {
  const file = path.join(WORK, name);
  fs.writeFileSync(file, bytes);
  return file;
}
