// The size a photo declares in its header, read without decoding it, so that
// the pool can bound the pixels being measured at once (pool.js). Layouts:
// PNG IHDR (ISO/IEC 15948:2004, 11.2.2), JPEG frame header SOFn (ITU-T T.81,
// B.2.2), TIFF IFD 0 ImageWidth/ImageLength (TIFF 6.0, section 2 and 8).

/**
 * declaredSize returns {width, height} from the header of a PNG, JPEG or
 * TIFF file, or null when the bytes are none of those or the header cannot
 * be found in them.
 * @param {Uint8Array} b the file
 */
export function declaredSize(b) {
  if (b.length >= 24 && b[0] === 0x89 && b[1] === 0x50 && b[2] === 0x4e && b[3] === 0x47) {
    const v = new DataView(b.buffer, b.byteOffset, b.length);
    return { width: v.getUint32(16), height: v.getUint32(20) };
  }
  if (b.length >= 4 && b[0] === 0xff && b[1] === 0xd8) return jpegSize(b);
  if (b.length >= 8 && ((b[0] === 0x49 && b[1] === 0x49 && b[2] === 0x2a) || (b[0] === 0x4d && b[1] === 0x4d && b[3] === 0x2a))) return tiffSize(b);
  return null;
}

function jpegSize(b) {
  let p = 2;
  while (p + 9 < b.length) {
    if (b[p] !== 0xff) return null;
    const m = b[p + 1];
    if (m === 0xff) {
      p++; // fill byte
      continue;
    }
    if (m === 0xd8 || m === 0x01 || (m >= 0xd0 && m <= 0xd7)) {
      p += 2;
      continue;
    }
    // SOF0..SOF15 except DHT (C4), JPG (C8) and DAC (CC).
    if (m >= 0xc0 && m <= 0xcf && m !== 0xc4 && m !== 0xc8 && m !== 0xcc) {
      return { height: (b[p + 5] << 8) | b[p + 6], width: (b[p + 7] << 8) | b[p + 8] };
    }
    if (m === 0xda || m === 0xd9) return null; // scan or end before a frame header
    p += 2 + ((b[p + 2] << 8) | b[p + 3]);
  }
  return null;
}

function tiffSize(b) {
  const v = new DataView(b.buffer, b.byteOffset, b.length);
  const le = b[0] === 0x49;
  const at = v.getUint32(4, le);
  if (at + 2 > b.length) return null;
  const n = v.getUint16(at, le);
  let width = 0;
  let height = 0;
  for (let i = 0; i < n && at + 2 + 12 * i + 12 <= b.length; i++) {
    const e = at + 2 + 12 * i;
    const tag = v.getUint16(e, le);
    const type = v.getUint16(e + 2, le);
    const value = type === 3 ? v.getUint16(e + 8, le) : v.getUint32(e + 8, le);
    if (tag === 256) width = value;
    if (tag === 257) height = value;
  }
  return width && height ? { width, height } : null;
}
